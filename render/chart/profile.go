package chart

import (
	"cmp"
	"fmt"
	"io"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Profiles is the data of risk profiles: for each option, the probability
// distribution of its payoff. WriteProfiles draws the cumulative profiles
// on one chart; WriteMass draws the probability mass as bars.
type Profiles struct {
	// Title is the chart's heading; empty for none.
	Title string
	// Value is the horizontal axis: the payoff.
	Value Axis
	// Cumulative is the vertical axis's label of the cumulative chart;
	// empty means "Probability of this value or less".
	Cumulative string
	// Options are the distributions, one per option.
	Options []Distribution
	// References are vertical lines across the chart, each labelled above
	// it: a loss threshold, a percentile, a budget.
	References []Mark
	// Panels draws the probability mass of each option in a panel of its
	// own, one above the other on a shared scale, instead of side by side
	// on one chart. Only WriteMass reads it.
	Panels bool
}

// Distribution is one option's distribution of payoffs.
type Distribution struct {
	// Label names the option.
	Label string
	// Outcomes are the payoffs and their probabilities, in any order;
	// equal payoffs are merged. The probabilities must add up to 1 (to
	// within 1e-9).
	Outcomes []Outcome
}

// Outcome is one payoff and its probability.
type Outcome struct{ Value, Probability float64 }

// WriteProfiles draws the cumulative risk profiles: for each option a step
// line of the probability that the payoff is at most x, against x, from
// the option's lowest payoff to its highest. Lines
// differ by dash, weight, grey and marker (at the top of each step when an
// option has few outcomes).
func WriteProfiles(w io.Writer, pr Profiles, opt Options) error {
	dists, err := pr.check()
	if err != nil {
		return err
	}
	lo, hi := pr.valueRange(dists)
	p := newPlot(pr.Value, Axis{Label: cmp.Or(pr.Cumulative, "Probability of this value or less"), Percent: true})
	p.X.Min, p.X.Max = padRange(lo, hi, 0.05)
	p.Y.Min, p.Y.Max = 0, 1
	p.Y.Padding = vg.Points(6)
	p.Add(gridLines(true, true))
	var legend []legendItem
	for i, d := range dists {
		st := series(i)
		// Each line starts at its lowest payoff and ends at its highest:
		// lines extended to the chart's edges would lie on top of each
		// other at 0% and 100%.
		var xs, ys []float64
		cum := 0.0
		var tops []int
		for _, o := range d.Outcomes {
			xs = append(xs, o.Value, o.Value)
			ys = append(ys, cum, math.Min(cum+o.Probability, 1))
			cum += o.Probability
			tops = append(tops, len(xs)-1)
		}
		if len(tops) > 25 {
			tops = nil
		}
		p.Add(&polyline{xs: xs, ys: ys, line: st.line, glyph: st.marker, marks: tops})
		legend = append(legend, legendItem{d.Label, []plot.Thumbnailer{lineThumb{line: st.line, glyph: st.marker, marker: tops != nil}}})
	}
	pn := panel{plot: p}
	if g := referenceGuides(pr.References, pr.Value.Percent); g != nil {
		p.Add(g)
		pn.aware = append(pn.aware, g)
	}
	fig := &figure{title: pr.Title, panels: []panel{pn}, legend: legend}
	return fig.write(w, opt, 560, 360)
}

// WriteMass draws the probability mass of each option's payoff as bars.
// Side by side (the default), every distinct payoff is a group on the
// horizontal axis, in ascending order and labelled with the payoff, and
// each option has a bar in each group; with more than MaxGroups distinct
// payoffs, or with Profiles.Panels, each option gets a panel of its own on
// a shared scale of payoffs instead. Each option's bars have their own
// grey and hatching.
func WriteMass(w io.Writer, pr Profiles, opt Options) error {
	dists, err := pr.check()
	if err != nil {
		return err
	}
	top := 0.0
	for _, d := range dists {
		for _, o := range d.Outcomes {
			top = max(top, o.Probability)
		}
	}
	yAxis := Axis{Label: "Probability", Percent: true}
	values := distinctValues(dists)
	fig := &figure{title: pr.Title}
	if !pr.Panels && len(values) <= MaxGroups {
		p := newPlot(pr.Value, yAxis)
		p.X.Min, p.X.Max = -0.6, float64(len(values))-0.4
		p.Y.Min, p.Y.Max = 0, top*1.12
		p.Y.Padding = 0
		ticks := make(plot.ConstantTicks, len(values))
		for k, v := range values {
			ticks[k] = plot.Tick{Value: float64(k), Label: formatValue(v, pr.Value.Percent)}
		}
		p.X.Tick.Marker = ticks
		if len(values) > 6 {
			// Long payoffs side by side would run into each other.
			p.X.Tick.Label.Rotation = math.Pi / 6
			p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XRight, draw.YTop
		}
		group := func(v float64) float64 {
			k, _ := slices.BinarySearch(values, v)
			return float64(k)
		}
		p.Add(gridLines(false, true), &massBars{dists: dists, only: -1, pos: group, width: 0.8})
		pn := panel{plot: p}
		// A reference line between two groups stands halfway between them.
		refs := slices.Clone(pr.References)
		for i, m := range refs {
			k, exact := slices.BinarySearch(values, m.At)
			refs[i].At = float64(k)
			if !exact {
				refs[i].At -= 0.5
			}
			refs[i].Label = cmp.Or(m.Label, formatValue(m.At, pr.Value.Percent))
		}
		if g := referenceGuides(refs, false); g != nil {
			p.Add(g)
			pn.aware = append(pn.aware, g)
		}
		fig.panels = []panel{pn}
		for i, d := range dists {
			fig.legend = append(fig.legend, legendItem{d.Label, []plot.Thumbnailer{swatch{fills(i), ink}}})
		}
		return fig.write(w, opt, 560, 360)
	}
	lo, hi := pr.valueRange(dists)
	xlo, xhi := padRange(lo, hi, 0.06)
	for i, d := range dists {
		gap := minGap(distinctValues(dists[i : i+1]))
		ax := pr.Value
		if i < len(dists)-1 {
			ax.Label = "" // the shared scale is named once, under the last panel
		}
		p := newPlot(ax, yAxis)
		p.X.Min, p.X.Max = xlo, xhi
		p.Y.Min, p.Y.Max = 0, top*1.15
		p.Y.Padding = 0
		p.Add(gridLines(false, true), &massBars{dists: dists, only: i, pos: func(v float64) float64 { return v }, gap: gap, labels: true})
		pn := panel{heading: d.Label, plot: p}
		if ax.Label != "" {
			pn.extra = p.X.Label.TextStyle.Height(ax.Label) + p.X.Label.Padding
		}
		if g := referenceGuides(pr.References, pr.Value.Percent); g != nil {
			// Labels once, over the top panel; the panels below keep the
			// same room so that all have the same scale.
			g.silent = i > 0
			p.Add(g)
			pn.aware = append(pn.aware, g)
		}
		fig.panels = append(fig.panels, pn)
	}
	return fig.write(w, opt, 560, 70+150*float64(len(dists)))
}

// MaxGroups is the most distinct payoffs WriteMass draws side by side;
// more are drawn in panels.
const MaxGroups = 16

// referenceGuides are labelled vertical lines in a dark grey, dashed, or
// nil when there are none.
func referenceGuides(refs []Mark, percent bool) *guides {
	if len(refs) == 0 {
		return nil
	}
	g := &guides{line: referenceLine(), style: guideStyle()}
	for _, m := range refs {
		g.items = append(g.items, guide{at: m.At, label: cmp.Or(m.Label, formatValue(m.At, percent))})
	}
	return g
}

// referenceLine is the pen of reference lines: dark grey, finely dashed.
func referenceLine() draw.LineStyle {
	return draw.LineStyle{Color: greyDark, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(2), vg.Points(2)}}
}

// check checks the profiles and returns the distributions with equal
// payoffs merged, in ascending order of payoff.
func (pr Profiles) check() ([]Distribution, error) {
	switch {
	case len(pr.Options) == 0:
		return nil, fmt.Errorf("chart: risk profile: no options to draw")
	case len(pr.Options) > MaxSeries:
		return nil, fmt.Errorf("chart: risk profile: %d options, more than the limit of %d", len(pr.Options), MaxSeries)
	case len(pr.References) > MaxMarks:
		return nil, fmt.Errorf("chart: risk profile: %d reference lines, more than the limit of %d", len(pr.References), MaxMarks)
	}
	for _, m := range pr.References {
		if !drawable(m.At) {
			return nil, fmt.Errorf("chart: risk profile: a reference line at %v, not a drawable number", m.At)
		}
	}
	out := make([]Distribution, len(pr.Options))
	for i, d := range pr.Options {
		switch {
		case d.Label == "":
			return nil, fmt.Errorf("chart: risk profile: option %d has no label", i+1)
		case len(d.Outcomes) == 0:
			return nil, fmt.Errorf("chart: risk profile: option %q has no outcomes", d.Label)
		case len(d.Outcomes) > MaxPoints:
			return nil, fmt.Errorf("chart: risk profile: option %q has %d outcomes, more than the limit of %d", d.Label, len(d.Outcomes), MaxPoints)
		}
		sum := 0.0
		for _, o := range d.Outcomes {
			if !drawable(o.Value, o.Probability) || o.Probability < 0 || o.Probability > 1 {
				return nil, fmt.Errorf("chart: risk profile: option %q has the outcome %v with probability %v; a probability is a number from 0 to 1", d.Label, o.Value, o.Probability)
			}
			sum += o.Probability
		}
		if math.Abs(sum-1) > 1e-9 {
			return nil, fmt.Errorf("chart: risk profile: the probabilities of option %q add up to %v, not 1", d.Label, sum)
		}
		merged := slices.Clone(d.Outcomes)
		slices.SortStableFunc(merged, func(a, b Outcome) int { return cmp.Compare(a.Value, b.Value) })
		k := 0
		for _, o := range merged {
			if k > 0 && merged[k-1].Value == o.Value {
				merged[k-1].Probability += o.Probability
				continue
			}
			merged[k] = o
			k++
		}
		out[i] = Distribution{Label: d.Label, Outcomes: merged[:k]}
	}
	return out, nil
}

// valueRange spans every payoff and reference line.
func (pr Profiles) valueRange(dists []Distribution) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, d := range dists {
		lo, hi = min(lo, d.Outcomes[0].Value), max(hi, d.Outcomes[len(d.Outcomes)-1].Value)
	}
	for _, m := range pr.References {
		lo, hi = min(lo, m.At), max(hi, m.At)
	}
	return lo, hi
}

// distinctValues are the payoffs of every option, ascending, each once.
func distinctValues(dists []Distribution) []float64 {
	var all []float64
	for _, d := range dists {
		for _, o := range d.Outcomes {
			all = append(all, o.Value)
		}
	}
	slices.Sort(all)
	return slices.Compact(all)
}

// minGap is the smallest distance between neighbouring values (0 for
// fewer than two).
func minGap(values []float64) float64 {
	gap := 0.0
	for i := 1; i < len(values); i++ {
		if d := values[i] - values[i-1]; gap == 0 || d < gap {
			gap = d
		}
	}
	return gap
}

// massBars draws probability mass as bars: of every option side by side
// (only < 0), or of one option (a panel). pos maps a payoff to its place on
// the horizontal axis. Bars are width data units wide, or, when width is
// 0, as wide as the smallest gap between payoffs allows (in points, within
// minBarWidth and maxBarWidth).
type massBars struct {
	dists  []Distribution
	only   int
	pos    func(float64) float64
	width  float64
	gap    float64
	labels bool // write each bar's probability above it, where it fits
}

// Widest and narrowest bar of a panel, in points.
const (
	maxBarWidth = vg.Length(16)
	minBarWidth = vg.Length(2)
)

// Plot implements plot.Plotter.
func (m *massBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	first, last := 0, len(m.dists)-1
	if m.only >= 0 {
		first, last = m.only, m.only
	}
	n := last - first + 1
	var width vg.Length
	if m.width > 0 {
		width = (trX(m.width) - trX(0)) / vg.Length(n)
	} else {
		width = maxBarWidth
		if m.gap > 0 {
			width = min(width, (trX(m.gap)-trX(0))*0.8)
		}
		width = max(width, minBarWidth)
	}
	labelSty := textStyle(noteSize, false, ink)
	labelSty.XAlign, labelSty.YAlign = draw.XCenter, draw.YBottom
	lastLabelEnd := vg.Length(math.Inf(-1))
	for i := first; i <= last; i++ {
		off := (vg.Length(i-first) - vg.Length(n-1)/2) * width
		var rects []vg.Rectangle
		for _, o := range m.dists[i].Outcomes {
			x := trX(m.pos(o.Value)) + off
			rects = append(rects, vg.Rectangle{Min: vg.Point{X: x - width/2, Y: trY(0)}, Max: vg.Point{X: x + width/2, Y: trY(o.Probability)}})
		}
		fillRects(&c, fills(i), rects)
		c.SetLineStyle(draw.LineStyle{Color: ink, Width: vg.Points(0.6)})
		for _, r := range rects {
			c.Stroke(r.Path())
		}
		if !m.labels {
			continue
		}
		for j, o := range m.dists[i].Outcomes {
			text := formatValue(o.Probability, true)
			r := labelSty.Rectangle(text)
			x := (rects[j].Min.X + rects[j].Max.X) / 2
			if x+r.Min.X < lastLabelEnd+3 {
				continue // would run into the label before it
			}
			lastLabelEnd = x + r.Max.X
			c.FillText(labelSty, vg.Point{X: x, Y: rects[j].Max.Y + 2}, text)
		}
	}
}
