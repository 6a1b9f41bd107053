package design

import (
	"bytes"
	"testing"
)

// FuzzDecode feeds arbitrary bytes to the design-file loader. Nothing may
// panic; a design that loads must validate, have a one-line title, and
// survive a save and a load unchanged in what it says.
func FuzzDecode(f *testing.F) {
	f.Add([]byte(goodDesign))
	f.Add([]byte(goodDesign + "title = \"a\\nb\"\n[budget]\nfloor = 0\ncap = 10\nstep = 0.1\nunit = 0.01\n"))
	f.Add([]byte("version = 1\nmode = \"point\"\ninterval = [0, 10]\nformula = \"-x^2\"\n[budget]\nstep = 1\n"))
	f.Add([]byte("version = 1\nmode = \"generator\"\noutcomes = [\"a\", \"b\"]\npreset = \"log\"\n[budget]\nmean_pay = 3\nreference = [0.5, 0.5]\n"))
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := Decode(b)
		if err != nil {
			if bytes.ContainsAny([]byte(err.Error()), "\x1b\r") {
				t.Fatalf("error message carries a control character: %q", err)
			}
			return
		}
		if err := d.Validate(); err != nil {
			t.Fatalf("decoded design does not validate: %v", err)
		}
		if bytes.ContainsAny([]byte(d.Title), "\n\r\x1b") {
			t.Fatalf("title %q is not one line", d.Title)
		}
		out, err := d.Encode()
		if err != nil {
			t.Fatalf("encode: %v", err)
		}
		again, err := Decode(out)
		if err != nil {
			t.Fatalf("saved design does not load: %v\n%s", err, out)
		}
		if again.Formula != d.Formula || again.Title != d.Title || len(again.Labels) != len(d.Labels) || again.Mode != d.Mode {
			t.Fatalf("save and load changed the design:\n%s", out)
		}
	})
}
