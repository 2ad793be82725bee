package main

import (
	"strings"
	"testing"
)

// TestInReadsNumbersAsModelsDo checks that --in takes exactly the numbers a
// model may hold (lang.ParseNumber), no more and no fewer.
func TestInReadsNumbersAsModelsDo(t *testing.T) {
	for _, c := range []struct {
		in     string
		code   int
		stderr string
	}{
		{"_2_5_0___000..+4_5_0_000_", 2, `"_2_5_0___000" has two _ in a row`},
		{"200_000..+300_000", 2, `"+300_000" is not a number`},
		{"200_000..300_000_", 2, `"300_000_" has a _ that is not between two digits`},
		{"2e5..3e5", 2, `"2e5" is not a number (write the number out in full`},
		{"200_000..3__00_000", 2, `"3__00_000" has two _ in a row`},
		{"200_000 .. 300_000", 0, ""},
	} {
		code, _, errs := forkcast(t, "", "breakeven", "example:sourcing", "--vary", "licence", "--in", c.in)
		if code != c.code || !strings.Contains(errs, c.stderr) {
			t.Errorf("--in %s: exit %d, stderr:\n%s\nwant exit %d and %q", c.in, code, errs, c.code, c.stderr)
		}
	}
}

func TestParseRange(t *testing.T) {
	lo, hi, err := parseRange("25%..1_000.5")
	if err != nil || lo.String() != "0.25" || hi.String() != "1000.5" {
		t.Errorf("25%%..1_000.5: %v %v %v", lo, hi, err)
	}
	lo, hi, err = parseRange("-1_000..-5%")
	if err != nil || lo.String() != "-1000" || hi.String() != "-0.05" {
		t.Errorf("-1_000..-5%%: %v %v %v", lo, hi, err)
	}
}
