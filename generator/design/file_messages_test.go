package design

import "testing"

// A value of the wrong type is named by key and line in the file's words.
func TestDecodeTypeMessages(t *testing.T) {
	cases := []struct{ src, want string }{
		{"version = 1\nmode = \"generator\"\noutcomes = \"a,b\"\nformula = \"1\"\n", "line 3: outcomes: expected a list, found text"},
		{"version = 1\nmode = \"generator\"\noutcomes = [\"a\", \"b\"]\nformula = \"1\"\n[budget]\ncap = \"ten\"\n", "line 6: budget.cap: expected a number, found text"},
		{"version = \"one\"\n", "line 1: version: expected a whole number, found text"},
	}
	for _, c := range cases {
		_, err := Decode([]byte(c.src))
		if err == nil || err.Error() != c.want {
			t.Errorf("Decode(%q) = %v, want %q", c.src, err, c.want)
		}
	}
}
