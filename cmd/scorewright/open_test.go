package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// scorewright open names the file and the problem, and refuses to start
// the workbench without a terminal.
func TestOpenMessages(t *testing.T) {
	dir := t.TempDir()
	write := func(name, body string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	good := write("good.toml", "version = 1\nmode = \"generator\"\noutcomes = [\"frost\", \"no frost\"]\npreset = \"quadratic\"\n")
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"open"}, "open takes one design file"},
		{[]string{"open", filepath.Join(dir, "missing.toml")}, "missing.toml: no such file"},
		{[]string{"open", write("nover.toml", "mode = \"generator\"\noutcomes = [\"a\", \"b\"]\nformula = \"1\"\n")}, "version: missing"},
		{[]string{"open", write("type.toml", "version = 1\nmode = \"generator\"\noutcomes = \"a,b\"\nformula = \"1\"\n")}, "line 3: outcomes: expected a list, found text"},
		{[]string{"open", write("preset.toml", "version = 1\nmode = \"generator\"\noutcomes = [\"a\", \"b\"]\npreset = \"nosuch\"\n")}, `unknown preset "nosuch"`},
		{[]string{"open", good}, "the workbench needs a terminal"},
		{nil, "the workbench needs a terminal"},
	}
	for _, c := range cases {
		code, _, stderr := runCmd(t, c.args...)
		if code != exitUsage || !strings.Contains(stderr, c.want) || strings.Count(stderr, "\n") != 1 {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and one line with %q", c.args, code, stderr, c.want)
		}
	}
}
