package eval

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func breakeven(t *testing.T, m *tree.Model, vary string, lo, hi, at string) *Breakeven {
	t.Helper()
	v, err := ParseVary(vary)
	if err != nil {
		t.Fatal(err)
	}
	opts := BreakevenOptions{Vary: v, At: at}
	if lo != "" {
		l, h := d(lo), d(hi)
		opts.Low, opts.High = &l, &h
	}
	be, err := FindBreakeven(context.Background(), mustCompile(t, m), opts)
	if err != nil {
		t.Fatal(err)
	}
	return be
}

func TestParseVary(t *testing.T) {
	for _, c := range []struct {
		in   string
		want Vary
	}{
		{"licence", Vary{Kind: VaryParam, Name: "licence"}},
		{"defect:Defective", Vary{Kind: VaryState, Name: "defect", Label: "Defective"}},
		{`delivery:"On time"`, Vary{Kind: VaryState, Name: "delivery", Label: "On time"}},
		{"delivery:On time", Vary{Kind: VaryState, Name: "delivery", Label: "On time"}},
		{"Integration/Clean", Vary{Kind: VaryBranch, Name: "Integration", Label: "Clean"}},
		{`"Phase 1: build"/"Late/early"`, Vary{Kind: VaryBranch, Name: "Phase 1: build", Label: "Late/early"}},
	} {
		got, err := ParseVary(c.in)
		if err != nil || got != c.want {
			t.Errorf("ParseVary(%q) = %+v, %v; want %+v", c.in, got, err, c.want)
		}
		if back, err := ParseVary(got.String()); err != nil || back != got {
			t.Errorf("round trip of %q: %q → %+v, %v", c.in, got.String(), back, err)
		}
	}
	for _, bad := range []string{"", "two words", `"open`, "a:", "/b", `a"b"/c`} {
		if _, err := ParseVary(bad); err == nil {
			t.Errorf("ParseVary(%q): no error", bad)
		}
	}
}

func TestBreakevenOilPrior(t *testing.T) {
	// Hillier & Lieberman, oil-drilling prototype: drill and sell break
	// even at prior P(oil) = 0.2375 (800p − 100 = 90).
	for _, vary := range []string{"oil:Oil", "p_oil"} {
		be := breakeven(t, oilModel("0.25", false), vary, "", "", "")
		if len(be.Switches) != 1 {
			t.Fatalf("%s: %d switches: %+v", vary, len(be.Switches), be.Switches)
		}
		sw := be.Switches[0]
		wantDec(t, vary+": switch", sw.At, "0.2375") // Hillier & Lieberman
		if !sw.Exact || be.Options[sw.Below] != "Sell" || be.Options[sw.Above] != "Drill" {
			t.Errorf("%s: exact %v, below %q, above %q", vary, sw.Exact, be.Options[sw.Below], be.Options[sw.Above])
		}
		wantDec(t, vary+": drill at the switch", sw.Values[0], "90")
		wantDec(t, vary+": sell at the switch", sw.Values[1], "90")
		wantDec(t, vary+": current", be.Current, "0.25")
		if len(be.Segments) != 2 || be.Segments[0].Best != 1 || be.Segments[1].Best != 0 {
			t.Errorf("%s: segments %+v", vary, be.Segments)
		}
	}
	be := breakeven(t, oilModel("0.25", false), "oil:Oil", "", "", "")
	if !strings.Contains(be.Adjust, `"Dry"`) {
		t.Errorf("adjust %q does not name the rest state", be.Adjust)
	}
}

// treatModel is the treat / do-not-treat tree of the threshold approach:
// treating gains the net benefit b if the patient has the disease and
// costs the net harm h if not; not treating is the reference (0).
func treatModel(b, h string, rest bool) *tree.Model {
	no := tree.Outcome("No disease", tree.Num(d("0.5")), tree.Gain(tree.Num(d(h).Neg())), nil)
	if rest {
		no = tree.RestOutcome("No disease", tree.Gain(tree.Num(d(h).Neg())), nil)
	}
	return &tree.Model{Root: tree.Decision("Treat?",
		tree.Choice("Treat", tree.NoCash, tree.Chance("Disease?",
			tree.Outcome("Disease", tree.Num(d("0.5")), tree.Gain(tree.Num(d(b))), nil), no)),
		tree.Choice("Do not treat", tree.NoCash, nil))}
}

func TestBreakevenThreshold(t *testing.T) {
	// Pauker & Kassirer (1980), N Engl J Med 302:1109–1117, the threshold
	// approach: the treatment threshold probability is H / (H + B).
	for _, c := range []struct{ b, h string }{{"3", "1"}, {"2", "1"}, {"7", "3"}, {"1", "6"}, {"0.15", "0.02"}, {"1234.5", "0.7"}} {
		for _, rest := range []bool{true, false} {
			be := breakeven(t, treatModel(c.b, c.h, rest), "Disease?/Disease", "", "", "")
			if len(be.Switches) != 1 {
				t.Fatalf("B=%s H=%s: %d switches", c.b, c.h, len(be.Switches))
			}
			sw := be.Switches[0]
			hr, br := d(c.h).Rat(), d(c.b).Rat()
			want := new(big.Rat).Quo(hr, new(big.Rat).Add(hr, br))
			near(t, "threshold B="+c.b+" H="+c.h, sw.At, want)
			exact := new(big.Rat).SetFrac(want.Num(), want.Denom())
			if d := decimal.NewFromBigRat(exact, compiled.DivisionScale); d.Rat().Cmp(want) == 0 && !sw.Exact {
				t.Errorf("B=%s H=%s: threshold %s is a terminating decimal but not reported exact", c.b, c.h, sw.At)
			}
			if be.Options[sw.Below] != "Do not treat" || be.Options[sw.Above] != "Treat" {
				t.Errorf("below %q above %q", be.Options[sw.Below], be.Options[sw.Above])
			}
			if rest != strings.Contains(be.Adjust, "takes up the difference") || rest == strings.Contains(be.Adjust, "rescaled") {
				t.Errorf("adjust %q (rest %v)", be.Adjust, rest)
			}
		}
	}
}

// cashModel: options worth 100 − x, 50 and x − 80 (invented). By hand the
// first is best below x = 50, the second from 50 to 130, the third above.
func cashModel() *tree.Model {
	x := func() tree.Expr { return &tree.Name{Name: "x"} }
	return &tree.Model{
		Params: []*tree.Param{{Name: "x", Expr: tree.Num(d("10")), Low: tree.Num(d("0")), High: tree.Num(d("200"))}},
		Root: tree.Decision("Pick",
			&tree.Branch{Label: "Low", Gain: &tree.Binary{Op: '-', X: tree.Num(d("100")), Y: x()}},
			tree.Choice("Flat", tree.Gain(tree.Num(d("50"))), nil),
			&tree.Branch{Label: "High", Gain: &tree.Binary{Op: '-', X: x(), Y: tree.Num(d("80"))}},
			tree.Choice("Never", tree.Gain(tree.Num(d("-1000"))), nil)),
	}
}

func TestBreakevenCash(t *testing.T) {
	be := breakeven(t, cashModel(), "x", "", "", "")
	if len(be.Switches) != 2 {
		t.Fatalf("switches %+v", be.Switches)
	}
	// By hand: 100 − x = 50 at x = 50; 50 = x − 80 at x = 130.
	wantDec(t, "first switch", be.Switches[0].At, "50")
	wantDec(t, "second switch", be.Switches[1].At, "130")
	for i, want := range [][2]string{{"Low", "Flat"}, {"Flat", "High"}} {
		sw := be.Switches[i]
		if !sw.Exact || be.Options[sw.Below] != want[0] || be.Options[sw.Above] != want[1] {
			t.Errorf("switch %d: exact %v %q → %q", i, sw.Exact, be.Options[sw.Below], be.Options[sw.Above])
		}
	}
	wantDec(t, "Flat at 130", be.Switches[1].Values[1], "50")
	wantDec(t, "High at 130", be.Switches[1].Values[2], "50")
	// Over 140 .. 150 nothing changes.
	none := breakeven(t, cashModel(), "x", "140", "150", "")
	if len(none.Switches) != 0 || len(none.Segments) != 1 || none.Options[none.Segments[0].Best] != "High" {
		t.Errorf("no switch expected: %+v", none)
	}
	// A crossing that is not a terminating decimal: 100 − 3x = 0 at 100/3
	// (by hand).
	m := cashModel()
	m.Root.Branches[0].Gain = &tree.Binary{Op: '-', X: tree.Num(d("100")), Y: &tree.Binary{Op: '*', X: tree.Num(d("3")), Y: &tree.Name{Name: "x"}}}
	m.Root.Branches[1].Gain = tree.Num(decimal.Zero)
	m.Root.Branches[2].Gain = tree.Num(d("-500"))
	be = breakeven(t, m, "x", "", "", "")
	if len(be.Switches) != 1 {
		t.Fatalf("switches %+v", be.Switches)
	}
	near(t, "100/3", be.Switches[0].At, big.NewRat(100, 3))
	// The values are lines in x, so the switch is exact: as a fraction,
	// since 100/3 is no finite decimal.
	if sw := be.Switches[0]; !sw.Exact || sw.Fraction == nil || sw.Fraction.Cmp(big.NewRat(100, 3)) != 0 || sw.IsDecimal() {
		t.Errorf("switch at 100/3: exact %v, fraction %v, decimal %v", sw.Exact, sw.Fraction, sw.IsDecimal())
	}
}

// TestBreakevenNonlinear: a probability used twice makes the value
// quadratic, and the switch is found by narrowing.
func TestBreakevenNonlinear(t *testing.T) {
	p := func() tree.Expr { return &tree.Name{Name: "p"} }
	m := &tree.Model{
		Params: []*tree.Param{{Name: "p", Expr: tree.Num(d("0.2")), Low: tree.Num(d("0")), High: tree.Num(d("1"))}},
		Root: tree.Decision("Pick",
			tree.Choice("Both", tree.NoCash, tree.Chance("First",
				&tree.Branch{Label: "Yes", Prob: p(), Node: tree.Chance("Second",
					&tree.Branch{Label: "Yes", Prob: p(), Gain: tree.Num(d("100"))},
					&tree.Branch{Label: "No", Rest: true})},
				&tree.Branch{Label: "No", Rest: true})),
			tree.Choice("Sure", tree.Gain(tree.Num(d("30"))), nil)),
	}
	be := breakeven(t, m, "p", "", "", "")
	if len(be.Switches) != 1 || be.Switches[0].Exact {
		t.Fatalf("switches %+v", be.Switches)
	}
	// By hand: 100 p² = 30 at p = √0.3.
	x := be.Switches[0].At
	if diff := x.Mul(x).Sub(d("0.3")).Abs(); diff.GreaterThan(d("1e-48")) {
		t.Errorf("p = %s: p² − 0.3 = %s", x, diff)
	}
}

func TestBreakevenAt(t *testing.T) {
	// Invented: the root chooses between the cash game (worth 100 − x) and
	// a later decision "Later" between 40 and x − 20. At the root the
	// switch is where 100 − x = max(40, x − 20): x = 60. At "Later" the
	// switch is x = 60 too, but between "Forty" and "Minus twenty"; with a
	// base of 40 → 45 at "Later" it moves to 65.
	m := cashModel()
	m.Root = tree.Decision("Root",
		&tree.Branch{Label: "Cash game", Gain: &tree.Binary{Op: '-', X: tree.Num(d("100")), Y: &tree.Name{Name: "x"}}},
		tree.Choice("Wait", tree.NoCash, tree.Decision("Later",
			tree.Choice("Forty-five", tree.Gain(tree.Num(d("45"))), nil),
			&tree.Branch{Label: "Minus twenty", Gain: &tree.Binary{Op: '-', X: &tree.Name{Name: "x"}, Y: tree.Num(d("20"))}})),
	)
	root := breakeven(t, m, "x", "", "", "")
	// By hand: 100 − x = 45 at x = 55 (then x − 20 = 35 < 45).
	if len(root.Switches) != 1 {
		t.Fatalf("root switches %+v", root.Switches)
	}
	wantDec(t, "root switch", root.Switches[0].At, "55")
	later := breakeven(t, m, "x", "", "", "Later")
	if later.Decision.Label != "Later" || len(later.Switches) != 1 {
		t.Fatalf("later: %+v", later)
	}
	// By hand: 45 = x − 20 at x = 65.
	wantDec(t, "switch at Later", later.Switches[0].At, "65")
	if len(later.Path) != 1 || later.Path[0] != "Wait" {
		t.Errorf("path %q", later.Path)
	}
}

func TestBreakevenNarrowed(t *testing.T) {
	// Invented: three branches, the varied one with 30% fixed beside it
	// and a rest: it can be at most 70%.
	m := &tree.Model{Root: tree.Decision("Go?",
		tree.Choice("Go", tree.NoCash, tree.Chance("Market",
			tree.Outcome("Boom", tree.Num(d("0.2")), tree.Gain(tree.Num(d("100"))), nil),
			tree.Outcome("Flat", tree.Num(d("0.3")), tree.Gain(tree.Num(d("10"))), nil),
			tree.RestOutcome("Bust", tree.Gain(tree.Num(d("-50"))), nil))),
		tree.Choice("Stay", tree.NoCash, nil))}
	mustSolve(t, m)
	be := breakeven(t, m, "Market/Boom", "", "", "")
	wantDec(t, "high end", be.High, "0.7")
	if !be.Narrowed {
		t.Error("not narrowed")
	}
	// By hand: 100 b + 3 − 50 (0.7 − b) = 0 at b = 32/150 = 16/75.
	if len(be.Switches) != 1 {
		t.Fatalf("switches %+v", be.Switches)
	}
	near(t, "switch", be.Switches[0].At, big.NewRat(16, 75))
	// The caller's model is untouched.
	if got := m.Root.Branches[0].Node.Branches[0].Prob.String(); got != "0.2" {
		t.Errorf("model changed: %s", got)
	}
}

func TestBreakevenParamNarrowed(t *testing.T) {
	// The oil model's p_oil over 0 .. 1.5: beyond 1 "Dry" (the rest) would
	// be negative, so the range is cut at 1.
	m := oilModel("0.25", false)
	m.Params[0].High = tree.Num(d("1.5"))
	be := breakeven(t, m, "p_oil", "", "", "")
	wantDec(t, "high", be.High, "1")
	if !be.Narrowed || len(be.Switches) != 1 {
		t.Errorf("narrowed %v, switches %+v, notes %q", be.Narrowed, be.Switches, be.Notes)
	}
}

func TestBreakevenBadRequests(t *testing.T) {
	m := oilModel("0.25", false)
	for _, c := range []struct {
		vary, lo, hi, at string
		want             string
	}{
		{"nonesuch", "", "", "", `no parameter "nonesuch"`},
		{"oil", "", "", "", "is an uncertainty"},
		{"oil:Gas", "", "", "", `no state "Gas"`},
		{"gas:Oil", "", "", "", `no uncertainty "gas"`},
		{"Nowhere/Oil", "", "", "", `no chance node labelled "Nowhere"`},
		{"oil:Oil", "-0.1", "0.5", "", "[0, 1]"},
		{"oil:Oil", "0.5", "1.5", "", "[0, 1]"},
		{"p_oil", "0.5", "0.1", "", "downwards"},
		{"p_oil", "", "", "Nowhere", `no decision labelled "Nowhere"`},
	} {
		v, err := ParseVary(c.vary)
		if err != nil {
			t.Fatal(err)
		}
		opts := BreakevenOptions{Vary: v, At: c.at}
		if c.lo != "" {
			l, h := d(c.lo), d(c.hi)
			opts.Low, opts.High = &l, &h
		}
		_, err = FindBreakeven(context.Background(), mustCompile(t, m), opts)
		var re *RequestError
		if !errors.As(err, &re) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s %s..%s at %q: error %v, want a RequestError with %q", c.vary, c.lo, c.hi, c.at, err, c.want)
		}
	}
	// A parameter with no range and no --in.
	m.Params[0].Low, m.Params[0].High = nil, nil
	v, _ := ParseVary("p_oil")
	if _, err := FindBreakeven(context.Background(), mustCompile(t, m), BreakevenOptions{Vary: v}); err == nil || !strings.Contains(err.Error(), "no range") {
		t.Errorf("no range: %v", err)
	}
}

// TestBreakevenRandomLines: options whose values are lines a + b·x in a
// cash parameter (random, invented); the switches of the upper envelope
// computed on math/big.Rat must be found, in order, with the options on
// each side.
func TestBreakevenRandomLines(t *testing.T) {
	r := rand.New(rand.NewSource(99))
	for it := 0; it < 300; it++ {
		k := 2 + r.Intn(5)
		a, b := make([]int64, k), make([]int64, k)
		obj := tree.Objective(r.Intn(2))
		pick := tree.Decision("Pick")
		for i := range a {
			a[i], b[i] = int64(r.Intn(41)-20), int64(r.Intn(11)-5)
			cash := &tree.Binary{Op: '+', X: tree.Num(decimal.NewFromInt(a[i])), Y: &tree.Binary{Op: '*', X: tree.Num(decimal.NewFromInt(b[i])), Y: &tree.Name{Name: "x"}}}
			// Under min the figures are costs.
			b := &tree.Branch{Label: fmt.Sprintf("O%d", i), Gain: cash}
			if obj == tree.Min {
				b.Gain, b.Cost = nil, cash
			}
			pick.Branches = append(pick.Branches, b)
		}
		m := &tree.Model{Objective: obj, Root: pick,
			Params: []*tree.Param{{Name: "x", Expr: tree.Num(decimal.Zero), Low: tree.Num(d("-10")), High: tree.Num(d("10"))}}}
		be := breakeven(t, m, "x", "", "", "")
		// The envelope on Rat, in goodness terms (negated under min).
		g := func(i int) (*big.Rat, *big.Rat) {
			ga, gb := big.NewRat(a[i], 1), big.NewRat(b[i], 1)
			if obj == tree.Min {
				ga.Neg(ga)
				gb.Neg(gb)
			}
			return ga, gb
		}
		at := func(i int, x *big.Rat) *big.Rat {
			ga, gb := g(i)
			return new(big.Rat).Add(ga, new(big.Rat).Mul(gb, x))
		}
		best := func(x *big.Rat) int {
			c := 0
			for i := 1; i < k; i++ {
				if at(i, x).Cmp(at(c, x)) > 0 {
					c = i
				}
			}
			return c
		}
		x := big.NewRat(-10, 1)
		hi := big.NewRat(10, 1)
		c := best(x)
		type sw struct {
			x            *big.Rat
			below, above int
		}
		var want []sw
		for {
			var next *big.Rat
			nj := -1
			_, gbc := g(c)
			for j := 0; j < k; j++ {
				_, gbj := g(j)
				if j == c || gbj.Cmp(gbc) <= 0 {
					continue
				}
				gac, _ := g(c)
				gaj, _ := g(j)
				xj := new(big.Rat).Quo(new(big.Rat).Sub(gac, gaj), new(big.Rat).Sub(gbj, gbc))
				// A tie at the end of the range is a switch only when the tie goes
				// to j there (the first option in model order is chosen).
				if xj.Cmp(x) < 0 || xj.Cmp(hi) > 0 || (xj.Cmp(hi) == 0 && j > c) {
					continue
				}
				gbn := new(big.Rat)
				if nj >= 0 {
					_, gbn = g(nj)
				}
				if next == nil || xj.Cmp(next) < 0 || (xj.Cmp(next) == 0 && gbj.Cmp(gbn) > 0) {
					next, nj = xj, j
				}
			}
			if next == nil {
				break
			}
			want = append(want, sw{next, c, nj})
			x, c = next, nj
		}
		if len(be.Switches) != len(want) {
			t.Errorf("tree %d (%v, a %v b %v): %d switches, want %d", it, obj, a, b, len(be.Switches), len(want))
			continue
		}
		for i, w := range want {
			got := be.Switches[i]
			near(t, fmt.Sprintf("tree %d switch %d", it, i), got.At, w.x)
			if got.Below != w.below || got.Above != w.above {
				t.Errorf("tree %d switch %d: %d → %d, want %d → %d", it, i, got.Below, got.Above, w.below, w.above)
			}
			if exact := decimal.NewFromBigRat(w.x, compiled.DivisionScale); exact.Rat().Cmp(w.x) == 0 && !got.Exact {
				t.Errorf("tree %d switch %d at %s: not exact", it, i, got.At)
			}
		}
	}
}

// A switch and a switch back inside one grid interval: option A is an inner
// decision worth max(x, 100.8 − x), at least 50.4, so the sure 50.5 of B is
// best only for x in (50.3, 50.5), a sliver of one of the 64 grid
// intervals over 0..100. Worked by hand.
func TestBreakevenSwitchAndBackInOneInterval(t *testing.T) {
	x := &tree.Name{Name: "x"}
	m := &tree.Model{
		Params: []*tree.Param{{Name: "x", Expr: tree.Num(d("10")), Low: tree.Num(d("0")), High: tree.Num(d("100"))}},
		Root: tree.Decision("Pick",
			&tree.Branch{Label: "A", Node: tree.Decision("Inner",
				&tree.Branch{Label: "up", Gain: x},
				&tree.Branch{Label: "down", Gain: &tree.Binary{Op: '-', X: tree.Num(d("100.8")), Y: x}})},
			tree.Choice("B", tree.Gain(tree.Num(d("50.5"))), nil)),
	}
	be := breakeven(t, m, "x", "", "", "")
	if len(be.Switches) != 2 {
		t.Fatalf("switches %+v, want two (50.3 and 50.5)", be.Switches)
	}
	for i, want := range []string{"50.3", "50.5"} {
		sw := be.Switches[i]
		if !sw.Exact || !sw.At.Equal(d(want)) {
			t.Errorf("switch %d at %s (exact %v), want exactly %s", i, sw.At, sw.Exact, want)
		}
	}
}

// Hillier & Lieberman, Introduction to Operations Research, decision
// analysis chapter: drill and sell break even at prior P(oil) = 0.2375.
// With the seismic survey in the tree, "Drill or sell" stands three times;
// --at "No survey/Drill or sell" picks the one reached without the survey.
func TestBreakevenAtPath(t *testing.T) {
	be := breakeven(t, oilModel("0.25", true), "p_oil", "0", "1", "No survey/Drill or sell")
	if len(be.Switches) != 1 || !be.Switches[0].At.Equal(d("0.2375")) || !be.Switches[0].Exact {
		t.Fatalf("switches %+v, want exactly one, at 0.2375", be.Switches)
	}
	if be.Decision.Label != "Drill or sell" || len(be.Path) != 1 || be.Path[0] != "No survey" {
		t.Errorf("watching %q after %v", be.Decision.Label, be.Path)
	}
}
