package eval

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
)

func TestSweepOilDrilling(t *testing.T) {
	sw, err := SweepInput(context.Background(), mustCompile(t, oilInputs()), SweepOptions{Vary: vr(t, "oil:Oil", "0.15", "0.35"), Steps: 4})
	if err != nil {
		t.Fatal(err)
	}
	// Hillier & Lieberman, oil-drilling prototype: drill is worth
	// 800p − 100 and selling 90; they break even at p = 0.2375.
	xs := []string{"0.15", "0.2", "0.25", "0.3", "0.35"}
	drill := []string{"20", "60", "100", "140", "180"}
	best := []int{1, 1, 0, 0, 0}
	for k := range xs {
		wantDec(t, "x", sw.Input.Values[k], xs[k])
		wantDec(t, "drill at "+xs[k], sw.Values[k][0], drill[k])
		wantDec(t, "sell at "+xs[k], sw.Values[k][1], "90")
		if len(sw.Best[k]) != 1 || sw.Best[k][0] != best[k] {
			t.Errorf("best at %s: %v", xs[k], sw.Best[k])
		}
	}
	if len(sw.Switches) != 1 || !sw.Switches[0].At.Equal(d("0.2375")) || !sw.Switches[0].Exact {
		t.Errorf("switches %+v", sw.Switches)
	}
	// A tie on the grid: with the sale at 100, drill and sell tie at
	// p = 0.25 (800·0.25 − 100 = 100).
	m := oilInputs()
	m.Params[3].Expr = tree.Num(d("100"))
	sw, err = SweepInput(context.Background(), mustCompile(t, m), SweepOptions{Vary: vr(t, "p_oil", "0.15", "0.35"), Steps: 4})
	if err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(sw.Best[2]) != "[0 1]" {
		t.Errorf("best at 0.25 with a sale of 100: %v, want a tie", sw.Best[2])
	}
}

func TestSweepRequests(t *testing.T) {
	c := mustCompile(t, oilInputs())
	n := func(s string) tree.Expr { return tree.Num(d(s)) }
	chanceOnly := mustCompile(t, &tree.Model{
		Params: []*tree.Param{tree.Input("x", n("1")).Within(n("0"), n("2"))},
		Root:   tree.Chance("c", tree.Outcome("a", n("0.5"), tree.Gain(tree.Ref("x")), nil), tree.RestOutcome("b", tree.NoCash, nil))})
	for _, tc := range []struct {
		name string
		c    func() error
	}{
		{"no range", func() error {
			_, err := SweepInput(context.Background(), c, SweepOptions{Vary: vr(t, "p_oil", "", "")})
			return err
		}},
		{"unknown input", func() error {
			_, err := SweepInput(context.Background(), c, SweepOptions{Vary: vr(t, "nope", "", "")})
			return err
		}},
		{"no decision", func() error {
			_, err := SweepInput(context.Background(), chanceOnly, SweepOptions{Vary: vr(t, "x", "", "")})
			return err
		}},
		{"an empty range", func() error {
			_, err := SweepInput(context.Background(), c, SweepOptions{Vary: vr(t, "sale", "100", "100")})
			return err
		}},
		{"an empty range in a sensitivity analysis", func() error {
			_, err := AnalyseSensitivity(context.Background(), c, SensitivityOptions{Vary: []VaryRange{vr(t, "sale", "100", "100")}})
			return err
		}},
		{"too many steps", func() error {
			_, err := SweepInput(context.Background(), c, SweepOptions{Vary: vr(t, "sale", "", ""), Steps: MaxSweepSteps + 1})
			return err
		}},
		{"the same input twice", func() error {
			_, err := MapStrategies(context.Background(), c, MapOptions{X: vr(t, "sale", "", ""), Y: vr(t, "sale", "", "")})
			return err
		}},
		{"probability out of [0, 1]", func() error {
			_, err := MapStrategies(context.Background(), c, MapOptions{X: vr(t, "sale", "", ""), Y: vr(t, "oil:Oil", "0.5", "1.5")})
			return err
		}},
	} {
		var re *RequestError
		if err := tc.c(); !errors.As(err, &re) {
			t.Errorf("%s: %v, want a request error", tc.name, err)
		}
	}
	// The budget is reported when reached.
	_, err := MapStrategies(context.Background(), c, MapOptions{X: vr(t, "sale", "", ""), Y: vr(t, "oil_gain", "", ""), MaxSamples: 50})
	var be *BudgetError
	if !errors.As(err, &be) || be.Option != "SweepOptions.MaxSamples" {
		t.Errorf("over budget: %v", err)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := SweepInput(ctx, c, SweepOptions{Vary: vr(t, "sale", "", "")}); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
}

// mapModel is a small tree whose strategy map is known in closed form
// (invented figures). With x and y money inputs over 0 .. 100 and 0 .. 99:
//
//	Expand:  40% gain 2x, else gain y/2    worth 0.8x + 0.3y
//	Hold:    gain y                        worth y
//	Sell:    gain 50                       worth 50
//
// Expand = Hold where 0.8x = 0.7y, y = 8x/7; Expand = Sell where
// 0.8x + 0.3y = 50, y = (500 − 8x)/3; Hold = Sell where y = 50. All three
// tie where y = 50 and x = 43.75. So Sell is best below y = 50 left of the
// Expand = Sell line, Hold above y = 50 left of y = 8x/7, Expand right of
// both; the Expand | Hold line runs from (43.75, 50) to y = 99 at
// x = 86.625, the Expand | Sell line from (43.75, 50) down to (62.5, 0),
// the Hold | Sell line from (0, 50) to (43.75, 50).
func mapModel() *tree.Model {
	n := func(s string) tree.Expr { return tree.Num(d(s)) }
	mul := func(a string, x tree.Expr) tree.Expr { return &tree.Binary{Op: '*', X: n(a), Y: x} }
	return &tree.Model{
		Params: []*tree.Param{tree.Input("x", n("30")).Within(n("0"), n("100")), tree.Input("y", n("30")).Within(n("0"), n("99"))},
		Root: tree.Decision("Plan",
			tree.Choice("Expand", tree.NoCash, tree.Chance("Market",
				tree.Outcome("Up", n("0.4"), tree.Gain(mul("2", tree.Ref("x"))), nil),
				tree.RestOutcome("Down", tree.Gain(mul("0.5", tree.Ref("y"))), nil))),
			tree.Choice("Hold", tree.Gain(tree.Ref("y")), nil),
			tree.Choice("Sell", tree.Gain(n("50")), nil)),
	}
}

func TestStrategyMapClosedForm(t *testing.T) {
	mp, err := MapStrategies(context.Background(), mustCompile(t, mapModel()), MapOptions{X: vr(t, "x", "", ""), Y: vr(t, "y", "", ""), Steps: 20})
	if err != nil {
		t.Fatal(err)
	}
	r := func(s string) *big.Rat { v, _ := new(big.Rat).SetString(s); return v }
	worth := func(x, y *big.Rat) []*big.Rat {
		e := new(big.Rat).Add(new(big.Rat).Mul(r("0.8"), x), new(big.Rat).Mul(r("0.3"), y))
		return []*big.Rat{e, y, r("50")}
	}
	// Cell by cell: the best option from the closed form (the first in
	// model order on a tie).
	for j, yv := range mp.Y.Values {
		for i, xv := range mp.X.Values {
			w := worth(xv.Rat(), yv.Rat())
			best := 0
			for k := range w {
				if w[k].Cmp(w[best]) > 0 {
					best = k
				}
			}
			if mp.Best[j][i] != best {
				t.Errorf("cell (%s, %s): best %d, closed form %d", xv, yv, mp.Best[j][i], best)
			}
		}
	}
	// Every boundary segment exact, its ends on its line (checked on the
	// fractions), and the lines covered exactly once: the segments of each
	// pair add up to the closed form's extent.
	line := func(a, b int, x, y *big.Rat) bool {
		w := worth(x, y)
		return w[a].Cmp(w[b]) == 0
	}
	spanX, spanY := map[pair]*big.Rat{}, map[pair]*big.Rat{}
	for _, b := range mp.Boundaries {
		k := pairOf(b.A, b.B)
		if !b.Exact || !b.From.Exact || !b.To.Exact {
			t.Errorf("boundary %+v not exact", b)
			continue
		}
		for _, p := range []BoundaryPoint{b.From, b.To} {
			if !line(b.A, b.B, p.XFraction, p.YFraction) {
				t.Errorf("boundary %d|%d: point (%s, %s) is off the line", b.A, b.B, p.XFraction, p.YFraction)
			}
		}
		if spanX[k] == nil {
			spanX[k], spanY[k] = new(big.Rat), new(big.Rat)
		}
		dx := new(big.Rat).Sub(b.To.XFraction, b.From.XFraction)
		dy := new(big.Rat).Sub(b.To.YFraction, b.From.YFraction)
		spanX[k].Add(spanX[k], dx.Abs(dx))
		spanY[k].Add(spanY[k], dy.Abs(dy))
	}
	for _, w := range []struct {
		k      pair
		dx, dy string
	}{
		{pair{0, 1}, "42.875", "49"}, // (43.75, 50) to (86.625, 99)
		{pair{0, 2}, "18.75", "50"},  // (43.75, 50) to (62.5, 0)
		{pair{1, 2}, "43.75", "0"},   // (0, 50) to (43.75, 50)
	} {
		if spanX[w.k] == nil || spanX[w.k].Cmp(r(w.dx)) != 0 || spanY[w.k].Cmp(r(w.dy)) != 0 {
			t.Errorf("boundary %v spans %v × %v, want %s × %s", w.k, spanX[w.k], spanY[w.k], w.dx, w.dy)
		}
	}
	if !mp.Exact {
		t.Errorf("map not exact")
	}
}

// With the money input under a probability input the values are bilinear
// and the boundary a curve: drill (p·g − 100(1 − p)) against selling (90)
// ties where p = 190 / (g + 100), Hillier & Lieberman's prototype with the
// payoff with oil varied. The points on the grid lines lie on the curve
// exactly; the segments between them are marked approximate.
func TestStrategyMapCurve(t *testing.T) {
	mp, err := MapStrategies(context.Background(), mustCompile(t, oilInputs()), MapOptions{X: vr(t, "oil_gain", "", ""), Y: vr(t, "p_oil", "0.15", "0.35"), Steps: 8})
	if err != nil {
		t.Fatal(err)
	}
	if mp.Exact || len(mp.Boundaries) == 0 {
		t.Fatalf("exact %v, %d boundaries", mp.Exact, len(mp.Boundaries))
	}
	for _, b := range mp.Boundaries {
		for _, p := range []BoundaryPoint{b.From, b.To} {
			if !p.Exact {
				t.Errorf("point %+v on a grid line not exact", p)
				continue
			}
			want := new(big.Rat).Quo(big.NewRat(190, 1), new(big.Rat).Add(p.XFraction, big.NewRat(100, 1)))
			if p.YFraction.Cmp(want) != 0 {
				t.Errorf("point (%s, %s) off p = 190/(g + 100) = %s", p.XFraction, p.YFraction, want)
			}
		}
		if b.Exact {
			t.Errorf("segment %+v on a curve marked exact", b)
		}
	}
}

// The map's segments joined into lines: the three straight boundaries of
// mapModel (see there), each one line of two points.
func TestStrategyMapLines(t *testing.T) {
	mp, err := MapStrategies(context.Background(), mustCompile(t, mapModel()), MapOptions{X: vr(t, "x", "", ""), Y: vr(t, "y", "", ""), Steps: 20})
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, l := range mp.Lines() {
		s := fmt.Sprintf("%d|%d exact %v:", l.A, l.B, l.Exact)
		for _, p := range l.Points {
			s += fmt.Sprintf(" (%s, %s)", p.XFraction.RatString(), p.YFraction.RatString())
		}
		got = append(got, s)
	}
	want := []string{
		"0|1 exact true: (175/4, 50) (693/8, 99)",
		"0|2 exact true: (175/4, 50) (125/2, 0)",
		"1|2 exact true: (0, 50) (175/4, 50)",
	}
	if fmt.Sprint(got) != fmt.Sprint(want) {
		t.Errorf("lines\n%s\nwant\n%s", got, want)
	}
}

// Random trees (randomInputModel): every cell of a map against a fresh
// solve on math/big.Rat of the model with both inputs set, and every exact
// boundary point a tie of its two options there. The pairs cover a money
// input across a probability (the grid sampled column by column), the
// reverse (row by row) and two money inputs.
func TestStrategyMapRandomTrees(t *testing.T) {
	rng := rand.New(rand.NewSource(12))
	tiesChecked := 0
	trees := 16
	if testing.Short() {
		trees = 5
	}
	for it := 0; it < trees; it++ {
		m := randomInputModel(rng, 10+rng.Intn(80))
		c := mustCompile(t, m)
		env := map[string]*big.Rat{}
		for _, p := range m.Params {
			env[p.Name] = ratEnv(p.Expr, env)
		}
		// Ranges wide enough that the best option changes in most maps.
		ranges := map[string][2]string{"q": {"0", "0.3"}, "x0": {"-3000", "3000"}, "x1": {"-2000", "4000"}, "x2": {"-4000", "2500"}, "x3": {"-1500", "3500"}}
		for _, axes := range [][2]string{{"q", "x0"}, {"x1", "q"}, {"x2", "x3"}} {
			rx, ry := ranges[axes[0]], ranges[axes[1]]
			mp, err := MapStrategies(context.Background(), c, MapOptions{X: vr(t, axes[0], rx[0], rx[1]), Y: vr(t, axes[1], ry[0], ry[1]), Steps: 6})
			if err != nil {
				t.Fatalf("tree %d %v: %v", it, axes, err)
			}
			at := func(x, y *big.Rat) *ratTree {
				e := map[string]*big.Rat{}
				for k, v := range env {
					e[k] = v
				}
				e[axes[0]], e[axes[1]] = x, y
				return &ratTree{m: m, env: e, best: map[*tree.Node]int{}}
			}
			for j, yv := range mp.Y.Values {
				for i, xv := range mp.X.Values {
					fresh := at(xv.Rat(), yv.Rat())
					fresh.value(m.Root)
					if mp.Best[j][i] != fresh.best[m.Root] {
						t.Errorf("tree %d %v cell (%s, %s): best %d, big.Rat %d", it, axes, xv, yv, mp.Best[j][i], fresh.best[m.Root])
					}
				}
			}
			for _, b := range mp.Boundaries {
				for _, p := range []BoundaryPoint{b.From, b.To} {
					if !p.Exact {
						continue
					}
					tiesChecked++
					opts := at(p.XFraction, p.YFraction).options()
					if opts[b.A].Cmp(opts[b.B]) != 0 {
						t.Errorf("tree %d %v: boundary %d|%d at (%s, %s), but the options are worth %s and %s", it, axes, b.A, b.B, p.XFraction, p.YFraction, opts[b.A].RatString(), opts[b.B].RatString())
					}
				}
			}
		}
	}
	t.Logf("%d exact boundary points checked", tiesChecked)
	if tiesChecked == 0 {
		t.Errorf("no exact boundary point in any map: the trees test nothing of the boundaries")
	}
}

// The grid is sampled by several goroutines; the map is the same with any
// number of them, blank cells and the note on the first of them included.
// Two probabilities of one chance node over 0 .. 0.8 each: the model is
// invalid where they add up to more than 1 (the rest would be negative),
// the upper right corner of the grid.
func TestStrategyMapWorkers(t *testing.T) {
	n := func(s string) tree.Expr { return tree.Num(d(s)) }
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("a", n("0.3")).Within(n("0"), n("0.8")), tree.Input("b", n("0.3")).Within(n("0"), n("0.8"))},
		Root: tree.Decision("Go?",
			tree.Choice("Go", tree.NoCash, tree.Chance("Market",
				tree.Outcome("Boom", tree.Ref("a"), tree.Gain(n("300")), nil),
				tree.Outcome("Bust", tree.Ref("b"), tree.Cost(n("200")), nil),
				tree.RestOutcome("Flat", tree.NoCash, nil))),
			tree.Choice("Stay", tree.Gain(n("20")), nil)),
	}
	c := mustCompile(t, m)
	var maps []*StrategyMap
	for _, w := range []int{1, 2, 5} {
		mp, err := MapStrategies(context.Background(), c, MapOptions{X: vr(t, "a", "", ""), Y: vr(t, "b", "", ""), Steps: 8, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		maps = append(maps, mp)
	}
	for k, mp := range maps {
		blank := 0
		for j, yv := range mp.Y.Values {
			for i, xv := range mp.X.Values {
				invalid := xv.Add(yv).GreaterThan(d("1"))
				if (mp.Best[j][i] < 0) != invalid {
					t.Errorf("map %d cell (%s, %s): best %d", k, xv, yv, mp.Best[j][i])
				}
				if invalid {
					blank++
				}
			}
		}
		// Go is worth 300a − 200b against 20 for staying: by hand.
		for j, yv := range mp.Y.Values {
			for i, xv := range mp.X.Values {
				if mp.Best[j][i] < 0 {
					continue
				}
				want := 1
				if d("300").Mul(xv).Sub(d("200").Mul(yv)).GreaterThanOrEqual(d("20")) {
					want = 0
				}
				if mp.Best[j][i] != want {
					t.Errorf("map %d cell (%s, %s): best %d, want %d", k, xv, yv, mp.Best[j][i], want)
				}
			}
		}
		// Both ranges are cut to 0 .. 0.7 (with the other input at its
		// base 0.3, a or b above 0.7 leaves a negative rest), so the grid
		// steps by 0.0875; the first blank cell from the bottom row up,
		// left to right, is b = 0.35, a = 0.7 (both probabilities: in
		// percent).
		note := strings.Join(mp.Notes, "\n")
		if blank == 0 || !strings.Contains(note, "first at a = 70%, b = 35%") || !strings.Contains(note, "a: the top of the range is cut from 80% to 70%") || !strings.Contains(note, "b: the top of the range is cut from 80% to 70%") {
			t.Errorf("map %d: %d blank cells, notes %q", k, blank, mp.Notes)
		}
		if k > 0 && (fmt.Sprint(mp.Best, mp.Boundaries, mp.Notes, mp.Samples) != fmt.Sprint(maps[0].Best, maps[0].Boundaries, maps[0].Notes, maps[0].Samples)) {
			t.Errorf("map with %d workers differs from the one with 1", []int{1, 2, 5}[k])
		}
	}
}
