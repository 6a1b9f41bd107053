package table

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"scorewright/internal/num"
	"scorewright/internal/textsafe"
)

// Formats lists every export format, text formats first.
func Formats() []string { return []string{"csv", "md", "json", "tex", "svg", "png", "pdf"} }

// IsFigure reports whether format is a figure (binary or drawing) rather
// than a text table.
func IsFigure(format string) bool {
	return format == "svg" || format == "png" || format == "pdf"
}

// Write writes t in format to w.
func (t *Table) Write(w io.Writer, format string) error {
	if err := t.Check(); err != nil {
		return err
	}
	var buf bytes.Buffer
	var err error
	switch format {
	case "csv":
		err = t.writeCSV(&buf)
	case "md":
		t.writeMarkdown(&buf)
	case "json":
		err = t.writeJSON(&buf)
	case "tex":
		t.writeLaTeX(&buf)
	case "svg", "png", "pdf":
		err = t.writeFigure(&buf, format)
	default:
		return fmt.Errorf("table: unknown format %q; one of %s", format, strings.Join(Formats(), ", "))
	}
	if err != nil {
		return err
	}
	_, err = w.Write(buf.Bytes())
	return err
}

// writeCSV writes the metadata as '#' comment lines, then a header row and
// one row per report. Read it back with encoding/csv and Comment = '#'.
func (t *Table) writeCSV(w io.Writer) error {
	for _, f := range t.Meta.Fields() {
		// A comment line must stay one line.
		fmt.Fprintf(w, "# %s: %s\n", f.Key, oneLine(f.Value))
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(t.headers(nil)); err != nil {
		return err
	}
	for i := range t.Reports {
		if err := cw.Write(t.cells(i)); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// headers returns the column headings, passed through esc when given.
func (t *Table) headers(esc func(string) string) []string {
	n := len(t.Labels)
	head := make([]string, 0, t.ReportColumns()+n)
	for k := range t.ReportColumns() {
		head = append(head, t.ReportHeader(k))
	}
	for k := range n {
		head = append(head, t.ValueHeader(k))
	}
	if esc != nil {
		for i, h := range head {
			head[i] = esc(h)
		}
	}
	return head
}

// cells returns row i as text: the report's probabilities, then the values.
func (t *Table) cells(i int) []string {
	row := make([]string, 0, t.ReportColumns()+len(t.Labels))
	for _, x := range t.Reports[i] {
		row = append(row, Probability(x))
	}
	for _, v := range t.Values[i] {
		row = append(row, t.Value(v))
	}
	return row
}

// oneLine collapses s to one line without control characters or terminal
// escapes (textsafe.OneLine).
func oneLine(s string) string { return textsafe.OneLine(s) }

// writeMarkdown writes a heading, warnings as a quote block, the table and
// the metadata as a list.
func (t *Table) writeMarkdown(w io.Writer) {
	title := t.Meta.Title
	if title == "" {
		title = "Payment table"
	}
	fmt.Fprintf(w, "# %s\n\n", mdEscape(oneLine(title)))
	for _, warn := range t.Meta.Warnings {
		fmt.Fprintf(w, "> **WARNING:** %s\n\n", mdEscape(oneLine(warn)))
	}
	head := t.headers(mdEscape)
	rule := strings.Repeat("|---:", len(head)) + "|"
	fmt.Fprintf(w, "| %s |\n%s\n", strings.Join(head, " | "), rule)
	for i := range t.Reports {
		fmt.Fprintf(w, "| %s |\n", strings.Join(t.cells(i), " | "))
	}
	fmt.Fprintln(w)
	for _, f := range t.Meta.Fields() {
		if f.Key == "WARNING" {
			continue // shown above the table
		}
		v := mdEscape(oneLine(f.Value))
		if f.Key == "formula" {
			v = "`" + strings.ReplaceAll(oneLine(f.Value), "`", "'") + "`"
		}
		fmt.Fprintf(w, "- **%s:** %s\n", f.Key, v)
	}
}

// mdEscapeByte keeps user text from becoming table syntax or markup:
// every character CommonMark or its GFM tables give a meaning inline
// (emphasis, code, links and images, strikethrough, headings, raw HTML)
// is backslash-escaped or written as an entity. The ampersand is
// mdEscape's own case.
func mdEscapeByte(c byte) (string, bool) {
	switch c {
	case '<':
		return "&lt;", true
	case '>':
		return "&gt;", true
	case '\\', '|', '*', '_', '`', '[', ']', '!', '~', '#':
		return `\` + string(c), true
	}
	return "", false
}

// mdEscape escapes s for Markdown text (see mdEscapeByte). An ampersand
// followed by a letter, digit or # could begin an entity reference
// ("&amp;"), so it is backslash-escaped; any other one ("A & B") is plain
// text in CommonMark and is kept as written, so the file reads the same
// as text and rendered.
func mdEscape(s string) string {
	var b strings.Builder
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch e, ok := mdEscapeByte(c); {
		case ok:
			b.WriteString(e)
		case c == '&' && i+1 < len(s) && isEntityStart(s[i+1]):
			b.WriteString(`\&`)
		default:
			b.WriteByte(c)
		}
	}
	return b.String()
}

// isEntityStart reports whether c can follow the & of an entity reference.
func isEntityStart(c byte) bool {
	return c == '#' || c >= '0' && c <= '9' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z'
}

type jsonRow struct {
	Report []num.Float `json:"report"`
	Values []num.Float `json:"values"`
}

type jsonTable struct {
	// Warnings repeat the metadata's warnings at the top of the document.
	Warnings  []string `json:"warnings,omitempty"`
	Kind      Kind     `json:"kind"`
	ValueName string   `json:"value_name"`
	// ReportName is set for a point-forecast table (one number a report).
	ReportName string    `json:"report_name,omitempty"`
	Decimals   int       `json:"decimals"`
	Outcomes   []string  `json:"outcomes"`
	Rows       []jsonRow `json:"rows"`
	Meta       Meta      `json:"metadata"`
}

func (t *Table) writeJSON(w io.Writer) error {
	jt := jsonTable{Warnings: t.Meta.Warnings, Kind: t.Kind, ValueName: t.ValueName, ReportName: t.ReportName, Decimals: t.Decimals, Outcomes: t.Labels, Meta: t.Meta}
	for i, p := range t.Reports {
		jt.Rows = append(jt.Rows, jsonRow{Report: num.Floats(p), Values: num.Floats(t.Values[i])})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(jt)
}

// writeLaTeX writes the metadata as comment lines (for whoever opens the
// source) and again as visible text under the tabular (for whoever reads
// the typeset annex); warnings are typeset in bold above it.
func (t *Table) writeLaTeX(w io.Writer) {
	fields := t.Meta.Fields()
	for _, f := range fields {
		fmt.Fprintf(w, "%% %s: %s\n", f.Key, oneLine(f.Value))
	}
	for _, warn := range t.Meta.Warnings {
		fmt.Fprintf(w, "\\noindent\\textbf{WARNING: %s}\\par\n", texEscape(oneLine(warn)))
	}
	fmt.Fprintf(w, "\\begin{tabular}{%s|%s}\n\\hline\n", strings.Repeat("r", t.ReportColumns()), strings.Repeat("r", len(t.Labels)))
	fmt.Fprintf(w, "%s \\\\\n\\hline\n", strings.Join(t.headers(texEscape), " & "))
	for i := range t.Reports {
		fmt.Fprintf(w, "%s \\\\\n", strings.Join(t.cells(i), " & "))
	}
	fmt.Fprintf(w, "\\hline\n\\end{tabular}\n\\par\\noindent{\\footnotesize\n")
	for _, f := range fields {
		if f.Key == "WARNING" {
			continue
		}
		fmt.Fprintf(w, "\\textbf{%s:} %s\\\\\n", texEscape(f.Key), texEscape(oneLine(f.Value)))
	}
	fmt.Fprintln(w, "}")
}

// texEscape makes user text safe inside LaTeX text mode.
func texEscape(s string) string {
	r := strings.NewReplacer(
		`\`, `\textbackslash{}`, "{", `\{`, "}", `\}`, "$", `\$`, "&", `\&`, "#", `\#`,
		"^", `\textasciicircum{}`, "_", `\_`, "~", `\textasciitilde{}`, "%", `\%`,
		"<", `\textless{}`, ">", `\textgreater{}`, "|", `\textbar{}`, "·", `\textperiodcentered{}`,
	)
	return r.Replace(s)
}
