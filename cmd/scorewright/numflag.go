package main

import (
	"flag"
	"fmt"
	"regexp"
	"strconv"
	"strings"

	"scorewright/internal/num"
)

// numberFlag is a float flag that takes only decimal numbers (see
// num.ParseNumber): flag.Float64 would also take 0x10, NaN and Inf.
type numberFlag struct{ p *float64 }

func (f numberFlag) String() string {
	if f.p == nil {
		return "0"
	}
	return strconv.FormatFloat(*f.p, 'g', -1, 64)
}

func (f numberFlag) Set(s string) error {
	v, err := num.ParseNumber(s)
	if err != nil {
		return err
	}
	*f.p = v
	return nil
}

// wholeFlag is an int flag that takes only whole numbers in decimal.
type wholeFlag struct{ p *int }

func (f wholeFlag) String() string {
	if f.p == nil {
		return "0"
	}
	return strconv.Itoa(*f.p)
}

var wholeForm = regexp.MustCompile(`^[+-]?[0-9]+$`)

func (f wholeFlag) Set(s string) error {
	s = strings.TrimSpace(s)
	if !wholeForm.MatchString(s) {
		return fmt.Errorf("%q is not a whole number (write it like 4 or 1000)", s)
	}
	v, err := strconv.Atoi(s)
	if err != nil {
		return fmt.Errorf("%q is out of range", s)
	}
	*f.p = v
	return nil
}

// floatVar defines a decimal-number flag.
func floatVar(fs *flag.FlagSet, p *float64, name string, value float64, usage string) {
	*p = value
	fs.Var(numberFlag{p}, name, usage)
}

// floatFlag defines a decimal-number flag and returns its value's address.
func floatFlag(fs *flag.FlagSet, name string, value float64, usage string) *float64 {
	p := new(float64)
	floatVar(fs, p, name, value, usage)
	return p
}

// intVar defines a whole-number flag.
func intVar(fs *flag.FlagSet, p *int, name string, value int, usage string) {
	*p = value
	fs.Var(wholeFlag{p}, name, usage)
}

// flagMessage rewrites the flag package's messages in the one style the
// command line uses: `--cap: "0x10" is not a number (...)`.
var flagMessages = []struct {
	re   *regexp.Regexp
	with string
}{
	{regexp.MustCompile(`^invalid value ".*" for flag -([\w-]+): (.*)$`), "--$1: $2"},
	{regexp.MustCompile(`^invalid boolean value ".*" for -([\w-]+): .*$`), "--$1 is a switch; give it alone or as --$1=true / --$1=false"},
	{regexp.MustCompile(`^flag needs an argument: -([\w-]+)$`), "--$1 needs a value"},
	{regexp.MustCompile(`^flag provided but not defined: -+([\w-]+)$`), "unknown option --$1 (run with --help for the options)"},
}

func flagMessage(err error) string {
	msg := err.Error()
	for _, m := range flagMessages {
		if m.re.MatchString(msg) {
			return m.re.ReplaceAllString(msg, m.with)
		}
	}
	return msg
}
