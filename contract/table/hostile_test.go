package table_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"io"
	"strings"
	"testing"

	"github.com/yuin/goldmark"
	"github.com/yuin/goldmark/extension"
	"golang.org/x/net/html"

	"scorewright/contract/table"
	"scorewright/generator/design"
)

// hostile labels are made of the characters Markdown, LaTeX, HTML and CSV
// give a meaning; each export must say them as written.
var hostile = []string{
	`<script>alert("x")</script> & *b* _u_ | #h {x}`,
	"$5 50% C:\\dir ~^ `c` [l](u) ![i](u) ~~s~~ 'q' \"d\"",
}

const hostileTitle = `# Title <b>&amp;</b> *not bold* \textbf{no} % $ [x](y)`

func hostileTable(t *testing.T) *table.Table {
	tb := build(t, "1 - sum(p^2)", hostile, 0.25, design.Budget{Floor: 0, Cap: 100, Unit: 1})
	tb.Meta.Title = hostileTitle
	return tb
}

func headers(tb *table.Table) []string {
	var h []string
	for k := range tb.ReportColumns() {
		h = append(h, tb.ReportHeader(k))
	}
	for k := range tb.Labels {
		h = append(h, tb.ValueHeader(k))
	}
	return h
}

// The Markdown table, rendered by goldmark (a CommonMark and GFM tables
// implementation), has the headers and the title as its text, and no
// element the labels spelt.
func TestHostileMarkdown(t *testing.T) {
	tb := hostileTable(t)
	var out bytes.Buffer
	md := goldmark.New(goldmark.WithExtensions(extension.GFM))
	if err := md.Convert(render(t, tb, "md"), &out); err != nil {
		t.Fatal(err)
	}
	root, err := html.Parse(&out)
	if err != nil {
		t.Fatal(err)
	}
	var ths, h1 []string
	visit(root, func(n *html.Node) {
		switch {
		case n.Type == html.ElementNode && n.Data == "th":
			ths = append(ths, nodeText(n))
		case n.Type == html.ElementNode && n.Data == "h1":
			h1 = append(h1, nodeText(n))
		case n.Type == html.ElementNode && strings.Contains(" script b em strong code a img del ", " "+n.Data+" ") && n.Parent.Data != "li":
			t.Errorf("Markdown renders a <%s> element from user text", n.Data)
		}
	})
	if want := headers(tb); fmt.Sprint(ths) != fmt.Sprint(want) {
		t.Errorf("header cells\n%q\nwant\n%q", ths, want)
	}
	if len(h1) != 1 || h1[0] != hostileTitle {
		t.Errorf("headings %q, want %q", h1, hostileTitle)
	}
}

func visit(n *html.Node, fn func(*html.Node)) {
	fn(n)
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		visit(c, fn)
	}
}

func nodeText(n *html.Node) string {
	var b strings.Builder
	visit(n, func(c *html.Node) {
		if c.Type == html.TextNode {
			b.WriteString(c.Data)
		}
	})
	return b.String()
}

// texText reads LaTeX text-mode source back as the text it typesets,
// following the LaTeX manual: the ten special characters # $ % & ~ _ ^ \ { }
// must appear escaped (\# \$ \% \& \_ \{ \}, \textbackslash{},
// \textasciitilde{}, \textasciicircum{}); it fails on a bare one. Cells
// are split at bare &. Commands it does not know are an error.
func texText(src string) ([]string, error) {
	words := map[string]string{"textbackslash": `\`, "textasciitilde": "~", "textasciicircum": "^", "textless": "<",
		"textgreater": ">", "textbar": "|", "textperiodcentered": "·"}
	var cells []string
	var b strings.Builder
	for i := 0; i < len(src); i++ {
		c := src[i]
		switch {
		case c == '\\' && i+1 < len(src) && strings.IndexByte("#$%&_{}", src[i+1]) >= 0:
			b.WriteByte(src[i+1])
			i++
		case c == '\\':
			j := i + 1
			for j < len(src) && (src[j] >= 'a' && src[j] <= 'z' || src[j] >= 'A' && src[j] <= 'Z') {
				j++
			}
			w, ok := words[src[i+1:j]]
			if !ok || !strings.HasPrefix(src[j:], "{}") {
				return nil, fmt.Errorf("unknown command at %q", src[i:])
			}
			b.WriteString(w)
			i = j + 1
		case c == '&':
			cells = append(cells, strings.TrimSpace(b.String()))
			b.Reset()
		case strings.IndexByte("#$%~_^{}", c) >= 0:
			return nil, fmt.Errorf("bare %c in %q", c, src)
		default:
			b.WriteByte(c)
		}
	}
	return append(cells, strings.TrimSpace(b.String())), nil
}

// The LaTeX header row typesets as the headers.
func TestHostileLaTeX(t *testing.T) {
	tb := hostileTable(t)
	lines := strings.Split(string(render(t, tb, "tex")), "\n")
	var head string
	for i, l := range lines {
		if l == `\hline` && i+1 < len(lines) && strings.HasSuffix(lines[i+1], `\\`) {
			head = strings.TrimSuffix(lines[i+1], ` \\`)
			break
		}
	}
	got, err := texText(head)
	if err != nil {
		t.Fatal(err)
	}
	if want := headers(tb); fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("header cells\n%q\nwant\n%q", got, want)
	}
	for _, l := range lines {
		if strings.HasPrefix(l, `\textbf{title:}`) {
			v, err := texText(strings.TrimSuffix(strings.TrimPrefix(l, `\textbf{title:} `), `\\`))
			if err != nil || len(v) != 1 || v[0] != hostileTitle {
				t.Errorf("title line %q reads %q, %v", l, v, err)
			}
		}
	}
}

// CSV and JSON carry the labels verbatim; the SVG figure as XML text.
func TestHostileCSVJSONSVG(t *testing.T) {
	tb := hostileTable(t)
	r := csv.NewReader(bytes.NewReader(render(t, tb, "csv")))
	r.Comment = '#'
	head, err := r.Read()
	if err != nil || fmt.Sprint(head) != fmt.Sprint(headers(tb)) {
		t.Errorf("CSV header %q (%v), want %q", head, err, headers(tb))
	}
	var js struct{ Outcomes []string }
	if err := json.Unmarshal(render(t, tb, "json"), &js); err != nil || fmt.Sprint(js.Outcomes) != fmt.Sprint(hostile) {
		t.Errorf("JSON outcomes %q (%v)", js.Outcomes, err)
	}
	dec := xml.NewDecoder(bytes.NewReader(render(t, tb, "svg")))
	var text strings.Builder
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the SVG is not XML: %v", err)
		}
		if cd, ok := tok.(xml.CharData); ok {
			text.Write(cd)
		}
	}
	for _, l := range hostile {
		if !strings.Contains(text.String(), l) {
			t.Errorf("the SVG's text lacks %q", l)
		}
	}
}

// A lone ampersand is plain text in CommonMark (spec, "Entity and numeric
// character references"), so the Markdown file keeps it as written and a
// reader of the raw file sees the label they typed; one that could start
// an entity is escaped (the hostile title's "&amp;" above).
func TestMarkdownKeepsLoneAmpersand(t *testing.T) {
	tb := build(t, "1 - sum(p^2)", []string{"rain & hail", "dry"}, 0.25, design.Budget{Floor: 0, Cap: 100, Unit: 1})
	tb.Meta.Title = "Hail & rain &copy;"
	raw := string(render(t, tb, "md"))
	if !strings.Contains(raw, "rain & hail") || !strings.Contains(raw, `Hail & rain \&copy;`) {
		t.Errorf("Markdown:\n%s", raw)
	}
}
