package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render/chart"
)

// MapReport is the report of a two-way strategy map: the best option at
// the watched decision in each cell of a grid over two inputs, and the
// boundaries between the options' regions. WriteCSV gives the cells as a
// table, Chart the map as a picture.
//
// Its JSON shape (every figure an exact decimal string):
//
//	{"title", "objective", "currency",
//	 "x": {"name", "kind", "what", "range", "current", "low", "high", "narrowed", "adjust", "values": [...]},
//	 "y": {… the same},
//	 "decision", "path": [...], "options": [...],
//	 "best": [[...]],          one row per y value (ascending), one option per x value; null where the model is not valid
//	 "tied": [[...]],          true where another option ties with it
//	 "boundaries": [{"between": [A, B], "exact",
//	                 "points": [{"x", "y", "exact", "x_fraction", "y_fraction"}]}],
//	 "exact", "samples", "notes": [...]}
type MapReport struct {
	// Model is the compiled model mapped.
	Model   *compiled.Model
	Result  *eval.StrategyMap
	Options SweepOptions
}

// StrategyMap is the report of mp, a strategy map of c
// (eval.MapStrategies).
func StrategyMap(c *compiled.Model, mp *eval.StrategyMap, opts SweepOptions) *MapReport {
	return &MapReport{Model: c, Result: mp, Options: opts}
}

// cellLetter is the letter that stands for option k in the text map.
func cellLetter(k int) byte {
	switch {
	case k < 0:
		return '.'
	case k < 26:
		return byte('A' + k)
	case k < 52:
		return byte('a' + k - 26)
	}
	return '?'
}

// maxLinePoints is how many points of a boundary the text lists before it
// shows only the ends.
const maxLinePoints = 6

// WriteText writes the map as a grid of letters, one per cell, with its
// key, then the boundaries.
func (r *MapReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, mp := r.Model.Source(), r.Result
	note := r.Options.Names.Apply
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("strategy map of %s (across) and %s (up), %d × %d steps\n", mp.X.Vary, mp.Y.Vary, len(mp.X.Values)-1, len(mp.Y.Values)-1)
	w.f("  across: %s\n", axisHeading(mp.X))
	w.f("  up:     %s\n", axisHeading(mp.Y))
	watching(w, mp.Decision, mp.Path)
	for _, n := range mp.Notes {
		w.f("note: %s\n", note(n))
	}
	writeMeans(w, r.Model)
	w.ln()
	w.f("Best option at %s in each cell\n", quoted(mp.Decision.Display()))
	ylab := make([]string, len(mp.Y.Values))
	width := 0
	for j, y := range mp.Y.Values {
		ylab[j] = showInput(y, mp.Y.Probability)
		width = max(width, len([]rune(ylab[j])))
	}
	ties := 0
	for j := len(mp.Y.Values) - 1; j >= 0; j-- {
		row := make([]byte, len(mp.X.Values))
		for i := range row {
			row[i] = cellLetter(mp.Best[j][i])
			if mp.Tied[j][i] {
				ties++
			}
		}
		w.f("  %*s | %s\n", width, ylab[j], row)
	}
	lo, hi := showInput(mp.X.Low, mp.X.Probability), showInput(mp.X.High, mp.X.Probability)
	pad := max(1, len(mp.X.Values)-len([]rune(lo))-len([]rune(hi)))
	w.f("  %*s   %s%s%s\n", width, "", lo, strings.Repeat(" ", pad), hi)
	used := map[int]bool{}
	blank := false
	for _, row := range mp.Best {
		for _, k := range row {
			used[k] = true
			blank = blank || k < 0
		}
	}
	var key []string
	for k, o := range mp.Options {
		if used[k] {
			key = append(key, fmt.Sprintf("%c = %s", cellLetter(k), o))
		}
	}
	if blank {
		key = append(key, ". = the model is not valid there")
	}
	w.f("  %s\n", strings.Join(key, ", "))
	if ties > 0 {
		w.f("  (%d cell%s where options tie show the first in model order)\n", ties, plural(ties))
	}
	w.ln()
	lines := mp.Lines()
	if len(lines) == 0 {
		w.ln("No boundary: one option is best over the whole map.")
		return w.Flush()
	}
	w.ln("Boundaries between the regions")
	for _, l := range lines {
		kind := "exact"
		if !l.Exact {
			kind = "approximate between the grid lines"
		}
		pts := make([]string, 0, len(l.Points))
		for _, p := range l.Points {
			pts = append(pts, fmt.Sprintf("(%s, %s)", showInput(p.X, mp.X.Probability), showInput(p.Y, mp.Y.Probability)))
		}
		if len(pts) > maxLinePoints {
			pts = []string{pts[0], fmt.Sprintf("… %d points …", len(pts)-2), pts[len(pts)-1]}
		}
		w.f("  %s | %s (%s): %s\n", quoted(mp.Options[l.A]), quoted(mp.Options[l.B]), kind, strings.Join(pts, " – "))
	}
	return w.Flush()
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

// WriteCSV writes one row per cell: the two inputs' values (exact decimal
// strings), the best option (empty where the model is not valid) and
// whether another option ties with it.
func (r *MapReport) WriteCSV(w io.Writer) error {
	mp := r.Result
	cw := csv.NewWriter(w)
	_ = cw.Write([]string{mp.X.Vary.String(), mp.Y.Vary.String(), "best", "tied"})
	for j, y := range mp.Y.Values {
		for i, x := range mp.X.Values {
			best := ""
			if k := mp.Best[j][i]; k >= 0 {
				best = mp.Options[k]
			}
			_ = cw.Write([]string{x.String(), y.String(), best, strconv.FormatBool(mp.Tied[j][i])})
		}
	}
	cw.Flush()
	return cw.Error()
}

type mapJSON struct {
	Title      string         `json:"title,omitempty"`
	Objective  string         `json:"objective"`
	Currency   string         `json:"currency,omitempty"`
	X          axisJSON       `json:"x"`
	Y          axisJSON       `json:"y"`
	Decision   string         `json:"decision"`
	Path       []string       `json:"path"`
	Options    []string       `json:"options"`
	Best       [][]*string    `json:"best"`
	Tied       [][]bool       `json:"tied"`
	Boundaries []boundaryJSON `json:"boundaries"`
	Exact      bool           `json:"exact"`
	Samples    int            `json:"samples"`
	Means      []meanJSON     `json:"means,omitempty"`
	Notes      []string       `json:"notes"`
}

type boundaryJSON struct {
	Between [2]string   `json:"between"`
	Exact   bool        `json:"exact"`
	Points  []pointJSON `json:"points"`
}

type pointJSON struct {
	X         string `json:"x"`
	Y         string `json:"y"`
	Exact     bool   `json:"exact"`
	XFraction string `json:"x_fraction,omitempty"`
	YFraction string `json:"y_fraction,omitempty"`
}

// WriteJSON writes the map in the shape described on MapReport.
func (r *MapReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *MapReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *MapReport) shape() mapJSON {
	m, mp := r.Model.Source(), r.Result
	out := mapJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency,
		X: axisShape(mp.X, true), Y: axisShape(mp.Y, true), Decision: mp.Decision.Display(),
		Path: append([]string{}, mp.Path...), Options: mp.Options, Tied: mp.Tied, Boundaries: []boundaryJSON{},
		Exact: mp.Exact, Samples: mp.Samples, Notes: []string{}}
	out.Means = meansNonEmpty(r.Model)
	for _, row := range mp.Best {
		rj := make([]*string, len(row))
		for i, k := range row {
			rj[i] = option(mp.Options, k)
		}
		out.Best = append(out.Best, rj)
	}
	for _, l := range mp.Lines() {
		b := boundaryJSON{Between: [2]string{mp.Options[l.A], mp.Options[l.B]}, Exact: l.Exact}
		for _, p := range l.Points {
			pj := pointJSON{X: p.X.String(), Y: p.Y.String(), Exact: p.Exact}
			if p.Exact {
				pj.XFraction, pj.YFraction = p.XFraction.RatString(), p.YFraction.RatString()
			}
			b.Points = append(b.Points, pj)
		}
		out.Boundaries = append(out.Boundaries, b)
	}
	for _, n := range mp.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	return out
}

// Chart is the map as a region chart: each cell filled by its best
// option, each region labelled, and the boundaries drawn.
func (r *MapReport) Chart() chart.StrategyMap {
	m, mp := r.Model.Source(), r.Result
	c := chart.StrategyMap{Title: chartTitle(m, "Best option at "+quoted(mp.Decision.Display())),
		X: inputAxis(mp.X), Y: inputAxis(mp.Y), Options: mp.Options, Best: mp.Best}
	for _, x := range mp.X.Values {
		c.XValues = append(c.XValues, f64(x))
	}
	for _, y := range mp.Y.Values {
		c.YValues = append(c.YValues, f64(y))
	}
	for _, b := range mp.Boundaries {
		c.Boundaries = append(c.Boundaries, chart.Segment{
			From: chart.Point{X: f64(b.From.X), Y: f64(b.From.Y)},
			To:   chart.Point{X: f64(b.To.X), Y: f64(b.To.Y)}})
	}
	return c
}
