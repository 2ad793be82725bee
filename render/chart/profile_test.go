package chart

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// seriesKey is the pen of the i-th series as the SVG writes it.
func seriesKey(i int) string {
	st := series(i).line
	dash := "" // no dashes: the writer leaves the property out
	if len(st.Dashes) > 0 {
		var parts []string
		for _, d := range st.Dashes {
			parts = append(parts, fmt.Sprintf("%.5g", d.Points()))
		}
		dash = strings.Join(parts, ",")
	}
	return fmt.Sprintf("%s|%.5g|%s", colour(st.Color), st.Width.Points(), dash)
}

func TestProfilesDrawOneStepLinePerOption(t *testing.T) {
	data := demoProfiles()
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteProfiles(w, data, o) })
	var heights []float64
	keys := map[string]bool{}
	for i, d := range data.Options {
		key := seriesKey(i)
		keys[key] = true
		var lines []svgPath
		for _, p := range doc.paths {
			// A step line has two points per outcome: the foot and the
			// top of its step; it rises (the legend's sample is level).
			_, y0, _, y1 := p.bounds()
			if p.style["fill"] == "none" && p.strokeKey() == key && p.points() == 2*len(d.Outcomes) && y1 > y0 {
				lines = append(lines, p)
			}
		}
		if len(lines) != 1 {
			t.Errorf("%q: %d step lines of %d points in its pen, want 1", d.Label, len(lines), 2*len(d.Outcomes))
			continue
		}
		_, y0, _, y1 := lines[0].bounds()
		heights = append(heights, y1-y0)
		if doc.count(d.Label) != 1 {
			t.Errorf("%q written %d times, want once (legend)", d.Label, doc.count(d.Label))
		}
	}
	if len(keys) != len(data.Options) {
		t.Errorf("options share pens: %v", keys)
	}
	// Every line climbs from 0% to 100%: all rise the same height.
	for _, h := range heights {
		if math.Abs(h-heights[0]) > 0.01 {
			t.Errorf("step lines rise %v, not all the same", heights)
		}
	}
	if doc.count("Loss below 0") != 1 || doc.count("Probability of this value or less") != 1 {
		t.Errorf("reference or axis label missing: %q", doc.strings())
	}
}

func TestMassSideBySide(t *testing.T) {
	data := demoProfiles()
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteMass(w, data, o) })
	// One group per distinct payoff, labelled with it.
	for _, v := range []string{"-380,000", "520,000", "540,000", "732,000", "760,000", "770,000"} {
		if doc.count(v) != 1 {
			t.Errorf("group %q labelled %d times, want once", v, doc.count(v))
		}
	}
	// Six bars and three legend swatches, each outlined on its own.
	if n := outlinedBoxes(doc); n != 6+3 {
		t.Errorf("%d outlined boxes, want 9 (6 bars, 3 legend swatches)", n)
	}
}

func TestMassPanels(t *testing.T) {
	data := demoProfiles()
	data.Panels = true
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteMass(w, data, o) })
	for _, d := range data.Options {
		if doc.count(d.Label) != 1 {
			t.Errorf("panel heading %q written %d times, want once", d.Label, doc.count(d.Label))
		}
	}
	if n := outlinedBoxes(doc); n != 6 {
		t.Errorf("%d outlined bars, want 6", n)
	}
	// Each bar's probability above it (those that are not also tick
	// labels), and the reference line's label once, over the top panel.
	for _, s := range []string{"55%", "30%", "15%", "80%", "20%", "Loss below 0"} {
		if doc.count(s) != 1 {
			t.Errorf("%q written %d times, want once", s, doc.count(s))
		}
	}
}

// outlinedBoxes counts rectangles outlined in the bar pen.
func outlinedBoxes(doc svgDoc) int {
	n := 0
	for _, p := range doc.paths {
		if p.style["fill"] == "none" && p.style["stroke"] == colour(ink) && p.style["stroke-width"] == fmt.Sprintf("%.5g", vg.Points(0.6).Points()) && p.points() == 4 {
			n++
		}
	}
	return n
}

// More distinct payoffs than fit side by side go into panels.
func TestMassManyPayoffsUsePanels(t *testing.T) {
	var d Distribution
	for k := 0; k < MaxGroups+1; k++ {
		d.Outcomes = append(d.Outcomes, Outcome{Value: float64(k * 1000), Probability: 1.0 / float64(MaxGroups+1)})
	}
	d.Label = "Many"
	doc := parseSVG(t, drawn(t, func(w io.Writer, o Options) error { return WriteMass(w, Profiles{Options: []Distribution{d}}, o) }, Options{}))
	if doc.count("Many") != 1 || outlinedBoxes(doc) != MaxGroups+1 {
		t.Errorf("want one panel headed Many with %d bars; got %d headings, %d bars", MaxGroups+1, doc.count("Many"), outlinedBoxes(doc))
	}
}

func TestProfilesMergeEqualPayoffs(t *testing.T) {
	dists, err := Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{5, 0.25}, {-1, 0.5}, {5, 0.25}}}}}.check()
	if err != nil {
		t.Fatal(err)
	}
	if got, want := dists[0].Outcomes, []Outcome{{-1, 0.5}, {5, 0.5}}; !slices.Equal(got, want) {
		t.Errorf("merged %v, want %v", got, want)
	}
}

func TestProfilesRefuseBadData(t *testing.T) {
	for _, c := range []struct {
		name string
		data Profiles
		want string
	}{
		{"none", Profiles{}, "no options"},
		{"no label", Profiles{Options: []Distribution{{Outcomes: []Outcome{{1, 1}}}}}, "option 1 has no label"},
		{"empty", Profiles{Options: []Distribution{{Label: "a"}}}, `option "a" has no outcomes`},
		{"sum", Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{1, 0.5}, {2, 0.4}}}}}, "add up to 0.9, not 1"},
		{"negative", Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{1, -0.5}, {2, 1.5}}}}}, "a probability is a number from 0 to 1"},
		{"NaN", Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{nan(), 1}}}}}, "a probability is a number from 0 to 1"},
		{"reference", Profiles{Options: []Distribution{{Label: "a", Outcomes: []Outcome{{1, 1}}}}, References: []Mark{{At: nan()}}}, "reference line at NaN"},
	} {
		t.Run(c.name, func(t *testing.T) {
			for _, f := range []func(io.Writer, Profiles, Options) error{WriteProfiles, WriteMass} {
				err := f(io.Discard, c.data, Options{})
				if err == nil || !strings.Contains(err.Error(), c.want) {
					t.Errorf("error %v, want one containing %q", err, c.want)
				}
			}
		})
	}
}
