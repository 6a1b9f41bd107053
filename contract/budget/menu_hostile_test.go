package budget

import (
	"errors"
	"strings"
	"testing"

	"scorewright/internal/inputfile"
)

func TestReadMenuStopsAnEndlessStream(t *testing.T) {
	for _, fill := range []byte{'1', '"', '#', ' '} {
		src := &inputfile.Endless{Fill: fill}
		_, err := ReadMenu(src, "menu.csv", 2)
		if !errors.Is(err, inputfile.ErrTooLarge) || !strings.Contains(err.Error(), "menu.csv") || !strings.Contains(err.Error(), "8 MiB") {
			t.Errorf("fill %q: %v", fill, err)
		}
		if src.N > MaxMenuBytes+1<<20 {
			t.Errorf("fill %q: read %d bytes", fill, src.N)
		}
	}
}

func TestReadMenuAcceptsBOM(t *testing.T) {
	m, err := ReadMenu(strings.NewReader("\ufeff0.2\n0.5\n0.8\n"), "menu.csv", 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Reports) != 3 || m.Reports[0][0] != 0.2 {
		t.Errorf("reports %v", m.Reports)
	}
}

func TestFileMenuRefusesDevices(t *testing.T) {
	if _, err := FileMenu("/dev/zero", 2); !errors.Is(err, inputfile.ErrNotRegular) {
		t.Errorf("/dev/zero: %v", err)
	}
}
