package scorewright

import (
	"os"
	"regexp"
	"strings"
	"testing"
)

// The README names the Go version of go.mod's go line, so that a reader
// installs the version the build asks for.
func TestReadmeGoVersionMatchesGoMod(t *testing.T) {
	mod, err := os.ReadFile("go.mod")
	if err != nil {
		t.Fatal(err)
	}
	m := regexp.MustCompile(`(?m)^go (\S+)$`).FindSubmatch(mod)
	if m == nil {
		t.Fatal("go.mod has no go line")
	}
	readme, err := os.ReadFile("README.md")
	if err != nil {
		t.Fatal(err)
	}
	want := "Go " + string(m[1]) + " (the `go` line of go.mod)"
	if !strings.Contains(string(readme), want) {
		t.Errorf("README does not say %q", want)
	}
	if _, err := os.Stat("testdata/annex/page-1.png"); err != nil {
		t.Errorf("the README's picture of the annex is missing: %v", err)
	}
}
