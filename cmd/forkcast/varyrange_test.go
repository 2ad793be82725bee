package main

import (
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"github.com/forkcast/forkcast/eval"
)

func TestParseVaryRange(t *testing.T) {
	for _, c := range []struct {
		in, vary, lo, hi string
	}{
		{"licence", "licence", "", ""},
		{"licence=200_000..300_000", "licence", "200000", "300000"},
		{" defect:Defective = 5% .. 40% ", "defect:Defective", "0.05", "0.4"},
		{`"a=b"/"c"`, `"a=b"/c`, "", ""},
		{`"a=b"/c=0..1`, `"a=b"/c`, "0", "1"},
		{"x=-10..-5", "x", "-10", "-5"},
	} {
		vr, err := parseVaryRange(c.in)
		if err != nil {
			t.Errorf("%q: %v", c.in, err)
			continue
		}
		lo, hi := "", ""
		if vr.Low != nil {
			lo, hi = vr.Low.String(), vr.High.String()
		}
		if vr.Vary.String() != c.vary || lo != c.lo || hi != c.hi {
			t.Errorf("%q: %s %s..%s, want %s %s..%s", c.in, vr.Vary, lo, hi, c.vary, c.lo, c.hi)
		}
	}
	for _, bad := range []string{"", "=1..2", "x=", "x=1", "x=2..1", "x=1..2..3", "x=a..b", `"x=1..2`, "two words=1..2"} {
		if _, err := parseVaryRange(bad); err == nil {
			t.Errorf("%q: no error", bad)
		}
	}
	for _, c := range []struct{ in, want string }{{"20", "0.2"}, {"20%", "0.2"}, {"2.5", "0.025"}, {"1_00", "1"}} {
		if p, err := parsePercent(c.in); err != nil || p.String() != c.want {
			t.Errorf("parsePercent(%q) = %v, %v; want %s", c.in, p, err, c.want)
		}
	}
	for _, bad := range []string{"0", "-5", "abc", "", "5%%"} {
		if _, err := parsePercent(bad); err == nil {
			t.Errorf("parsePercent(%q): no error", bad)
		}
	}
}

// FuzzParseVaryRange: any text is read or refused with a message, quickly;
// what is read writes back in a form that reads the same.
func FuzzParseVaryRange(f *testing.F) {
	for _, s := range []string{"licence", "licence=1..2", `"a=b"/c=0..1`, "defect:Defective=5%..40%", "x==1..2", `"`, "=", "a:b:c", "x=1_000..2e3", "x=..", "p=-1%..1%"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		if len(s) > 1000 {
			t.Skip("longer than any flag")
		}
		start := time.Now()
		vr, err := parseVaryRange(s)
		if d := time.Since(start); d > 100*time.Millisecond {
			t.Fatalf("%q took %v", s, d)
		}
		if err != nil {
			if msg := err.Error(); msg == "" || !utf8.ValidString(msg) && utf8.ValidString(s) {
				t.Fatalf("%q: empty or broken message %q", s, msg)
			}
			return
		}
		if vr.Low != nil && vr.Low.GreaterThan(*vr.High) {
			t.Fatalf("%q: a range running downwards was read", s)
		}
		back := vr.Vary.String()
		if vr.Low != nil {
			back += "=" + vr.Low.String() + ".." + vr.High.String()
		}
		again, err := parseVaryRange(back)
		if err != nil || again.Vary != vr.Vary || (again.Low == nil) != (vr.Low == nil) ||
			(vr.Low != nil && (!again.Low.Equal(*vr.Low) || !again.High.Equal(*vr.High))) {
			t.Fatalf("%q read as %q, which reads back as %+v, %v", s, back, again, err)
		}
		if _, err := eval.ParseVary(vr.Vary.String()); err != nil && !strings.Contains(s, "=") {
			t.Fatalf("%q: the name does not read back: %v", s, err)
		}
	})
}
