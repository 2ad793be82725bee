package chart

import (
	"io"
	"math"
	"testing"
)

// Finite data of any size draws, or is refused with an error; it never
// panics and never hangs (a panic inside the plotting library would come
// back as a "drawing failed" error, which is a failure here too).
func TestExtremeValues(t *testing.T) {
	for _, c := range []struct {
		name   string
		lo, hi float64
	}{
		{"huge", -1e300, 1e300},
		{"tiny span", 1, math.Nextafter(1, 2)},
		{"tiny values", 1e-300, 3e-300},
		{"equal", 7, 7},
		{"large equal", 1e15, 1e15},
	} {
		t.Run(c.name, func(t *testing.T) {
			mid := c.lo/2 + c.hi/2
			draws := map[string]func() error{
				"tornado": func() error {
					return WriteTornado(io.Discard, Tornado{Base: mid, Bars: []Bar{{Label: "a", Start: c.lo, End: c.hi, Marks: []Mark{{At: mid}}}}}, Options{})
				},
				"spider": func() error {
					return WriteSpider(io.Discard, Spider{Base: mid, Change: PercentOfRange, Lines: []SpiderLine{{Label: "a", Low: 0, High: 1, Points: []Point{{0, c.lo}, {1, c.hi}}}}}, Options{})
				},
				"sweep": func() error {
					return WriteSweep(io.Discard, Sweep{X: []float64{0, 1}, Options: []Curve{{Label: "a", Values: []float64{c.lo, c.hi}}}, Switches: []Mark{{At: 0.5}}}, Options{})
				},
				"profiles": func() error {
					return WriteProfiles(io.Discard, Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{c.lo, 0.5}, {c.hi, 0.5}}}}}, Options{})
				},
				"mass": func() error {
					return WriteMass(io.Discard, Profiles{Panels: true, Options: []Distribution{{Label: "a", Outcomes: []Outcome{{c.lo, 0.5}, {c.hi, 0.5}}}}}, Options{})
				},
				"histogram": func() error {
					return WriteHistogram(io.Discard, Simulated{Series: []SampleSet{{Label: "a", Samples: []float64{c.lo, mid, c.hi}}}}, Options{})
				},
				"cumulative": func() error {
					return WriteCumulative(io.Discard, Simulated{Series: []SampleSet{{Label: "a", Samples: []float64{c.lo, mid, c.hi}}}}, Options{})
				},
			}
			for _, name := range []string{"tornado", "spider", "sweep", "profiles", "mass", "histogram", "cumulative"} {
				t.Run(name, func(t *testing.T) {
					if err := draws[name](); err != nil {
						t.Error(err)
					}
				})
			}
		})
	}
}
