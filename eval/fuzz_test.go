package eval_test

import (
	"context"
	"errors"
	"strings"
	"testing"
	"time"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/internal/fuzzkit"
)

// FuzzParseVary: any text is a Vary or a RequestError, and what parses
// prints back to text that parses to the same Vary.
func FuzzParseVary(f *testing.F) {
	for _, s := range []string{"licence", "defect:Defective", `"Phase 1: build"/"Late/early"`, `a"b"/c`, `"`, ":", "/", " x ", "a:b:c", "日本:語"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		v, err := eval.ParseVary(s)
		if err != nil {
			var re *eval.RequestError
			if !errors.As(err, &re) || err.Error() == "" {
				t.Fatalf("%q: %T %v", s, err, err)
			}
			return
		}
		back, err := eval.ParseVary(v.String())
		if err != nil || back != v {
			t.Fatalf("%q → %+v → %q → %+v, %v", s, v, v.String(), back, err)
		}
	})
}

// analysable compiles fuzzkit.Analysable's model of data (it always
// compiles) and solves it.
func analysable(t *testing.T, data []byte) (*compiled.Model, *eval.Solution) {
	c, ds := compiled.Compile(fuzzkit.Analysable(data))
	if ds.HasErrors() {
		t.Fatalf("the fuzz model does not compile: %v", ds)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	return c, sol
}

// FuzzBreakeven: on models built from the input, a breakeven search on any
// of the inputs, states and branches, watching any decision the input
// names, ends within its budget with a result whose segments cover the
// range in order, or with an error that says why — never a panic, a hang
// or a runaway allocation.
func FuzzBreakeven(f *testing.F) {
	f.Add([]byte{1, 2, 3}, "x", "")
	f.Add([]byte("a model from these bytes"), "u:Hi", "Act")
	f.Add([]byte{0xff, 0, 0x80, 7, 7, 7}, "n1/b0", "Now/Act")
	f.Add([]byte{}, "p", "Root")
	f.Fuzz(func(t *testing.T, data []byte, vary, at string) {
		v, err := eval.ParseVary(vary)
		if err != nil {
			return
		}
		c, _ := analysable(t, data)
		if problem := fuzzkit.Within(20*time.Second, 1<<30, func() string {
			be, err := eval.FindBreakeven(context.Background(), c, eval.BreakevenOptions{Vary: v, At: at, Grid: 8, MaxSamples: 2000})
			if err != nil {
				if err.Error() == "" || strings.Contains(err.Error(), "internal error") {
					return "error: " + err.Error()
				}
				return ""
			}
			if len(be.Segments) == 0 || !be.Segments[0].From.Equal(be.Low) || !be.Segments[len(be.Segments)-1].To.Equal(be.High) {
				return "segments do not cover the range"
			}
			for i := 1; i < len(be.Segments); i++ {
				if be.Segments[i].From.LessThan(be.Segments[i-1].From) {
					return "segments out of order"
				}
			}
			for _, sw := range be.Switches {
				if sw.Exact && sw.Fraction == nil {
					return "an exact switch without its fraction"
				}
			}
			return ""
		}); problem != "" {
			t.Fatalf("%s\nvary %q at %q, data %q", problem, vary, at, data)
		}
	})
}

// FuzzValueOfInformation: on models built from the input, the whole
// analysis ends within its budget, every value of information is not
// negative, and no EVSI exceeds the EVPI it is measured against.
func FuzzValueOfInformation(f *testing.F) {
	f.Add([]byte{1, 2, 3})
	f.Add([]byte("a model from these bytes"))
	f.Add([]byte{0xff, 0, 0x80, 7, 7, 7, 0x40, 0x40})
	f.Fuzz(func(t *testing.T, data []byte) {
		_, sol := analysable(t, data)
		if problem := fuzzkit.Within(20*time.Second, 1<<30, func() string {
			info, err := eval.ValueOfInformation(context.Background(), sol, eval.VOIOptions{MaxWork: 200_000})
			if err != nil {
				return "error: " + err.Error()
			}
			if info.Total != nil && info.Total.EVPI.IsNegative() {
				return "negative total EVPI"
			}
			for _, pi := range info.Uncertainties {
				if pi.EVPI.IsNegative() {
					return "negative EVPI of " + pi.Uncertainty.Name
				}
			}
			for _, tv := range info.Tests {
				for _, s := range tv.Sites {
					if s.EVSI.GreaterThan(s.EVPI) || s.EVPI.IsNegative() || s.MostToPay.IsNegative() {
						return "EVSI " + s.EVSI.String() + " against EVPI " + s.EVPI.String()
					}
				}
			}
			return ""
		}); problem != "" {
			t.Fatalf("%s\ndata %q", problem, data)
		}
	})
}
