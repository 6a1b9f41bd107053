package annex

import (
	"bytes"
	"fmt"
	"math"
	"strings"

	"scorewright/contract/budget"
	"scorewright/contract/table"
	"scorewright/generator/design"
	"scorewright/internal/inputfile"
)

// MenuName is the name under which the PDF annex attaches the menu file
// a design names (Budget.Menu), and by which the design printed and
// attached in the annex names it: the file's base name, so that the
// attachments detached into one folder find each other. A path's folders
// (either separator, as a design may come from another system) and an
// absolute path's root are this machine's, not the contract's.
func MenuName(menu string) (string, error) {
	name := menu[strings.LastIndexAny(menu, `/\`)+1:]
	switch name {
	case "", ".", "..", "design.toml":
		return "", fmt.Errorf("annex: the menu file %q has no file name the annex can attach beside design.toml", menu)
	}
	return name, nil
}

// readMenuFile is the menu file design d names, as read, for the annex
// to attach: the same bound as the table's own read (budget.MaxMenuBytes),
// and the file must still list the reports of tb, so that the attached
// file is the menu the table was made from.
func readMenuFile(d *design.Design, tb *table.Table) ([]byte, error) {
	b, err := inputfile.ReadFile(d.MenuPath(), budget.MaxMenuBytes)
	if err != nil {
		return nil, fmt.Errorf("the design's report menu (menu = %q under [budget]): %w", d.Budget.Menu, err)
	}
	m, err := budget.ReadMenu(bytes.NewReader(b), d.Budget.Menu, d.N())
	if err != nil {
		return nil, fmt.Errorf("the design's report menu (menu = %q under [budget]): %w", d.Budget.Menu, err)
	}
	if !sameReports(m.Reports, tb.Reports) {
		return nil, fmt.Errorf("the design's report menu (menu = %q under [budget]) no longer lists the table's reports; it changed while the table was made, so make the table again", d.Budget.Menu)
	}
	return b, nil
}

// reportTol is how far a report read again may sit from the table's:
// both are the same decimal text parsed and normalised the same way, so
// only float noise of the normalisation separates them.
const reportTol = 1e-12

// sameReports reports whether a and b list the same reports in order.
func sameReports(a, b [][]float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if len(a[i]) != len(b[i]) {
			return false
		}
		for j := range a[i] {
			if !(math.Abs(a[i][j]-b[i][j]) <= reportTol) {
				return false
			}
		}
	}
	return true
}

// withMenuName is a copy of d whose menu file is named by MenuName, the
// name the annex attaches it under; d itself is left alone.
func withMenuName(d *design.Design) (*design.Design, string, error) {
	if d.Budget.Menu == "" {
		return d, "", nil
	}
	name, err := MenuName(d.Budget.Menu)
	if err != nil {
		return nil, "", err
	}
	c := *d
	c.Budget.Menu = name
	return &c, name, nil
}

// remake is the sentence that says how the design file makes the table
// again. menu is the menu file's name as the printed design gives it (""
// without one); attached says whether the document carries the menu
// file beside the design (the PDF does; a workbook or page, which
// attach nothing, can only point to the table's own report column).
func remake(menu string, attached bool) string {
	switch {
	case menu == "":
		return "Running scorewright table --design design.toml makes this table again."
	case attached:
		return fmt.Sprintf("The menu file the design names is attached beside it as %q; "+
			"running scorewright table --design design.toml in a folder that holds both attachments makes this table again.", menu)
	}
	return fmt.Sprintf("Running scorewright table --design design.toml makes this table again with the menu file %q it names beside it, "+
		"which this annex does not include: one line per row of the payment table, the row's report probabilities in order, as in section 5.", menu)
}
