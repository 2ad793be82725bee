package chart

import (
	"io"
	"math"
	"strings"
	"testing"
)

func TestSweepDrawsOneLinePerOption(t *testing.T) {
	data := demoSweep()
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteSweep(w, data, o) })
	pens := map[string]bool{}
	for _, p := range doc.paths {
		if p.style["fill"] == "none" && p.points() == len(data.X) {
			pens[p.strokeKey()] = true
		}
	}
	if len(pens) != len(data.Options) {
		t.Errorf("%d distinct lines through the %d grid points, want %d: %v", len(pens), len(data.X), len(data.Options), pens)
	}
	for _, s := range []string{"Build in house", "Buy a licence", "Lease per depot", "Best option",
		"26.7%: Build → Buy", "36.7%: Buy → Lease", "Best option changes"} {
		if doc.count(s) != 1 {
			t.Errorf("%q written %d times, want once", s, doc.count(s))
		}
	}
	// Two guides and the legend's sample in the accent colour; the
	// envelope once on the data and once in the legend.
	guides, band := 0, 0
	for _, p := range doc.paths {
		switch p.style["stroke"] {
		case colour(accent):
			guides++
		case colour(accentTint):
			band++
		}
	}
	if guides != 3 || band != 2 {
		t.Errorf("%d accent guides (want 3) and %d envelope paths (want 2)", guides, band)
	}
}

// The envelope of the demo's three lines, worked by hand: build
// 520,000 − 600,000·p is best up to p = 4/15 (where it meets buy at
// 360,000), buy up to p = 11/30 (where lease meets it at 360,000), lease
// after. Minimising instead: lease 295,000 at p = 0.15 is lowest until it
// meets build at p = 0.3 (340,000), build after.
func TestEnvelope(t *testing.T) {
	s := demoSweep()
	for _, c := range []struct {
		minimise bool
		want     map[float64]float64
	}{
		{false, map[float64]float64{0.15: 430_000, 4.0 / 15: 360_000, 0.3: 360_000, 11.0 / 30: 360_000, 0.45: 385_000}},
		{true, map[float64]float64{0.15: 295_000, 0.3: 340_000, 0.45: 250_000}},
	} {
		ex, ey := envelope(s.X, s.Options, c.minimise)
		for x, y := range c.want {
			found := false
			for i := range ex {
				if math.Abs(ex[i]-x) < 1e-12 {
					found = true
					if math.Abs(ey[i]-y) > 1e-6 {
						t.Errorf("minimise %v: envelope at %v is %v, want %v", c.minimise, x, ey[i], y)
					}
				}
			}
			if !found {
				t.Errorf("minimise %v: the envelope has no point at %v: %v", c.minimise, x, ex)
			}
		}
		for i := 1; i < len(ex); i++ {
			if ex[i] < ex[i-1] {
				t.Errorf("envelope x not ascending at %d: %v", i, ex)
			}
		}
		// Every envelope point is the best option's value there.
		for i := range ex {
			best := math.Inf(1)
			if !c.minimise {
				best = math.Inf(-1)
			}
			for _, v := range []float64{520_000 - 600_000*ex[i], 360_000, 250_000 + 300_000*ex[i]} {
				if c.minimise {
					best = math.Min(best, v)
				} else {
					best = math.Max(best, v)
				}
			}
			if math.Abs(ey[i]-best) > 1e-6 {
				t.Errorf("minimise %v: envelope (%v, %v), but the best there is %v", c.minimise, ex[i], ey[i], best)
			}
		}
	}
}

func TestSweepRefusesBadData(t *testing.T) {
	one := []Curve{{Label: "a", Values: []float64{1, 2}}}
	for _, c := range []struct {
		name string
		data Sweep
		want string
	}{
		{"one value", Sweep{X: []float64{1}, Options: one}, "needs at least 2"},
		{"no options", Sweep{X: []float64{1, 2}}, "no options"},
		{"descending", Sweep{X: []float64{2, 1}, Options: one}, "input value 2 (1) is not above the one before (2)"},
		{"repeated", Sweep{X: []float64{1, 1}, Options: one}, "is not above"},
		{"short", Sweep{X: []float64{1, 2, 3}, Options: one}, `option "a" has 2 values for 3 input values`},
		{"no label", Sweep{X: []float64{1, 2}, Options: []Curve{{Values: []float64{1, 2}}}}, "option 1 has no label"},
		{"NaN", Sweep{X: []float64{1, 2}, Options: []Curve{{Label: "a", Values: []float64{1, math.NaN()}}}}, "not a drawable number"},
		{"bad switch", Sweep{X: []float64{1, 2}, Options: one, Switches: []Mark{{At: math.Inf(1)}}}, "switch at +Inf"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := WriteSweep(io.Discard, c.data, Options{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}
