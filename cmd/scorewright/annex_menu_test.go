package main

import (
	"bytes"
	"compress/zlib"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf16"
)

// pdfAttachments reads back the files embedded in a PDF as fpdf writes
// them: each /EmbeddedFile stream (Flate) is followed by its /Filespec,
// whose /UF string is the file name in UTF-16 (big-endian, with a byte
// order mark). A name read twice fails the test.
func pdfAttachments(t *testing.T, b []byte) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	for rest := b; ; {
		i := bytes.Index(rest, []byte("/Type /EmbeddedFile "))
		if i < 0 {
			return files
		}
		rest = rest[i:]
		s := bytes.Index(rest, []byte("stream\n"))
		e := bytes.Index(rest, []byte("endstream"))
		if s < 0 || e < s {
			t.Fatal("an embedded file without its stream")
		}
		r, err := zlib.NewReader(bytes.NewReader(rest[s+len("stream\n") : e]))
		if err != nil {
			t.Fatal(err)
		}
		content, err := io.ReadAll(r)
		if err != nil {
			t.Fatal(err)
		}
		rest = rest[e:]
		u := bytes.Index(rest, []byte("/UF ("))
		if u < 0 {
			t.Fatal("an embedded file without its name")
		}
		rest = rest[u+len("/UF ("):]
		name, n := pdfString(rest)
		rest = rest[n:]
		if _, dup := files[name]; dup {
			t.Fatalf("%q attached twice", name)
		}
		files[name] = content
	}
}

// pdfString decodes a PDF literal string up to its closing parenthesis
// (backslash escapes of one character; fpdf writes no octal escapes in
// names) from UTF-16BE with a byte order mark; n is the bytes consumed.
func pdfString(b []byte) (string, int) {
	var raw []byte
	n := 0
	for n < len(b) && b[n] != ')' {
		if b[n] == '\\' && n+1 < len(b) {
			n++
		}
		raw = append(raw, b[n])
		n++
	}
	raw = bytes.TrimPrefix(raw, []byte{0xfe, 0xff})
	u := make([]uint16, len(raw)/2)
	for i := range u {
		u[i] = uint16(raw[2*i])<<8 | uint16(raw[2*i+1])
	}
	return string(utf16.Decode(u)), n + 1
}

// An invented design whose menu comes from a file: a ferry operator paid
// for forecasts of sailing delays in three bands, seven reports allowed.
const menuDesign = `version = 1
title = "Sailing delay outlook — Corriemoor Ferries"
outcomes = ["on time", "under an hour late", "later"]
ordered = true
mode = "generator"
preset = "ranked"
formula = "csum(c*(1-c))"

[budget]
floor = 10
cap = 60
unit = 0.5
rounding = "nearest"
menu = "MENU"

[contract]
buyer = "Corriemoor Ferries"
currency = "credits"
forecasts = 30
base_rate = [0.6, 0.3, 0.1]
`

const menuCSV = "# allowed reports\n1,0,0\n0,1,0\n0,0,1\n0.5,0.5,0\n0,0.5,0.5\n0.6,0.3,0.1\n0.4,0.4,0.2\n"

// TestPDFAnnexRemakesAMenuTable: the PDF annex of a design that reads its
// menu from a file attaches the design and the menu file; detached alone
// into an empty folder they make the same table again, by the command a
// user runs. A menu named through a folder is attached, and named in the
// attached design, by its base name; the table's record then names the
// file as the design it was made from does, so only that line differs.
func TestPDFAnnexRemakesAMenuTable(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "1790000000")
	for _, menu := range []string{"levels.csv", "menus/levels.csv"} {
		t.Run(strings.ReplaceAll(menu, "/", "_"), func(t *testing.T) {
			dir := t.TempDir()
			if err := os.MkdirAll(filepath.Dir(filepath.Join(dir, menu)), 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(filepath.Join(dir, menu), []byte(menuCSV), 0o644); err != nil {
				t.Fatal(err)
			}
			designPath := filepath.Join(dir, "ferry.toml")
			if err := os.WriteFile(designPath, []byte(strings.Replace(menuDesign, "MENU", menu, 1)), 0o644); err != nil {
				t.Fatal(err)
			}
			pdfPath := filepath.Join(dir, "annex.pdf")
			if code, _, errs := runCmd(t, "table", "--design", designPath, "--out", pdfPath); code != 0 {
				t.Fatalf("annex: exit %d: %s", code, errs)
			}
			b, err := os.ReadFile(pdfPath)
			if err != nil {
				t.Fatal(err)
			}
			files := pdfAttachments(t, b)
			if len(files) != 2 || files["design.toml"] == nil || string(files["levels.csv"]) != menuCSV {
				names := []string{}
				for n := range files {
					names = append(names, n)
				}
				t.Fatalf("attachments %q; want design.toml and levels.csv as written", names)
			}
			if !strings.Contains(string(files["design.toml"]), `menu = "levels.csv"`) {
				t.Errorf("attached design does not name the attached menu:\n%s", files["design.toml"])
			}
			out := t.TempDir()
			for n, c := range files {
				if err := os.WriteFile(filepath.Join(out, n), c, 0o644); err != nil {
					t.Fatal(err)
				}
			}
			code, first, errs := runCmd(t, "table", "--design", designPath, "--format", "csv")
			if code != 0 {
				t.Fatalf("first: exit %d: %s", code, errs)
			}
			code, again, errs := runCmd(t, "table", "--design", filepath.Join(out, "design.toml"), "--format", "csv")
			if code != 0 {
				t.Fatalf("from the attachments: exit %d: %s", code, errs)
			}
			first = strings.Replace(first, "listed in "+menu+" ", "listed in levels.csv ", 1)
			if again != first {
				t.Errorf("the attachments make another table:\n%s\nwant\n%s", again, first)
			}
			if !strings.Contains(again, "\n1,0,0,") || !strings.Contains(again, "7 reports listed in levels.csv") {
				t.Errorf("the remade table is not the menu's:\n%s", again)
			}
		})
	}
}
