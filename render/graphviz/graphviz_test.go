package graphviz

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/internal/fixtures"
	"github.com/forkcast/forkcast/render/internal/gvcache"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Aliases for the package under test's companion.
type Options = render.Options

var (
	DOT     = render.DOT
	Money   = render.Money
	Percent = render.Percent
	Grouped = render.Grouped
)

const pruneMark = "‖"

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// The tests share one Renderer, as a program would.
var (
	sharedOnce sync.Once
	shared     *Renderer
	sharedErr  error
)

func renderer(t testing.TB) *Renderer {
	t.Helper()
	sharedOnce.Do(func() { shared, sharedErr = NewRenderer(context.Background()) })
	if sharedErr != nil {
		t.Fatalf("NewRenderer: %v", sharedErr)
	}
	return shared
}

func loadExample(t testing.TB, name string) *eval.Solution {
	t.Helper()
	ex, ok := examples.Get(name)
	if !ok {
		t.Fatalf("no example %q", name)
	}
	m, ds := lang.Load(ex.Source, lang.Options{})
	if ds.HasErrors() {
		t.Fatalf("example %s: %v", name, ds)
	}
	sol, err := eval.Solve(m)
	if err != nil {
		t.Fatalf("example %s: %v", name, err)
	}
	return sol
}

// svgGroup is one <g> of Graphviz's SVG: a node or an edge.
type svgGroup struct {
	id       string
	classes  map[string]bool
	polygons [][][2]float64
	ellipses [][4]float64 // cx, cy, rx, ry
	paths    int
	path     string // the first path's d
	texts    []string
}

func (g *svgGroup) is(c string) bool { return g.classes[c] }

// parseSVG reads the node and edge groups of an SVG document with
// encoding/xml, failing the test if the document is not well formed.
func parseSVG(t testing.TB, svg []byte) map[string]*svgGroup {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(svg))
	out := map[string]*svgGroup{}
	var stack []*svgGroup
	var inText bool
	var text strings.Builder
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the SVG is not well-formed XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			attr := map[string]string{}
			for _, a := range el.Attr {
				attr[a.Name.Local] = a.Value
			}
			var cur *svgGroup
			if len(stack) > 0 {
				cur = stack[len(stack)-1]
			}
			switch el.Name.Local {
			case "g":
				g := &svgGroup{id: attr["id"], classes: map[string]bool{}}
				for _, c := range strings.Fields(attr["class"]) {
					g.classes[c] = true
				}
				if g.is("node") || g.is("edge") {
					if out[g.id] != nil {
						t.Fatalf("two SVG groups with id %q", g.id)
					}
					out[g.id] = g
					stack = append(stack, g)
				} else {
					stack = append(stack, cur) // nested group: same owner
				}
			case "polygon":
				if cur != nil {
					cur.polygons = append(cur.polygons, parsePoints(t, attr["points"]))
				}
			case "ellipse":
				if cur != nil {
					var e [4]float64
					for k, a := range []string{"cx", "cy", "rx", "ry"} {
						e[k], _ = strconv.ParseFloat(attr[a], 64)
					}
					cur.ellipses = append(cur.ellipses, e)
				}
			case "path":
				if cur != nil {
					if cur.paths == 0 {
						cur.path = attr["d"]
					}
					cur.paths++
				}
			case "text":
				inText = true
				text.Reset()
			}
		case xml.CharData:
			if inText {
				text.Write(el)
			}
		case xml.EndElement:
			switch el.Name.Local {
			case "g":
				stack = stack[:len(stack)-1]
			case "text":
				inText = false
				if len(stack) > 0 && stack[len(stack)-1] != nil {
					g := stack[len(stack)-1]
					g.texts = append(g.texts, text.String())
				}
			}
		}
	}
	return out
}

func parsePoints(t testing.TB, s string) [][2]float64 {
	var pts [][2]float64
	for _, p := range strings.Fields(s) {
		xy := strings.Split(p, ",")
		if len(xy) != 2 {
			t.Fatalf("bad polygon point %q", p)
		}
		x, err1 := strconv.ParseFloat(xy[0], 64)
		y, err2 := strconv.ParseFloat(xy[1], 64)
		if err1 != nil || err2 != nil || math.IsNaN(x) || math.IsNaN(y) {
			t.Fatalf("bad polygon point %q", p)
		}
		pts = append(pts, [2]float64{x, y})
	}
	return pts
}

// distinct drops a polygon's closing point (Graphviz repeats the first).
func distinct(pts [][2]float64) [][2]float64 {
	if len(pts) > 1 && pts[0] == pts[len(pts)-1] {
		return pts[:len(pts)-1]
	}
	return pts
}

// expectation is what a drawing of sol with opts must hold, worked out
// from the solution directly.
type expectation struct {
	shapes  map[int]bool // nodes drawn with their own shape, by index
	stubs   map[int]bool // nodes drawn as depth stubs
	others  map[int]bool // decisions whose other options are folded
	optimal map[string]bool
}

func expect(sol *eval.Solution, opts Options) expectation {
	e := expectation{shapes: map[int]bool{}, stubs: map[int]bool{}, others: map[int]bool{}, optimal: map[string]bool{}}
	nodes := sol.Nodes()
	for i := range nodes {
		s := &nodes[i]
		drawn := true
		for c := s; c.Parent() != nil; c = c.Parent() {
			p := c.Parent()
			if opts.PolicyOnly && p.Node.Kind == tree.KindDecision && p.Chosen() != c.Via() {
				drawn = false
			}
			if opts.MaxDepth > 0 && p.Depth() >= opts.MaxDepth {
				drawn = false
			}
		}
		if !drawn {
			continue
		}
		if opts.MaxDepth > 0 && s.Depth() >= opts.MaxDepth && s.Size() > 1 {
			e.stubs[i] = true
		} else {
			e.shapes[i] = true
			if opts.PolicyOnly && s.Node.Kind == tree.KindDecision && len(s.Node.Branches) > 1 {
				e.others[i] = true
			}
		}
		if s.OnPolicy() {
			e.optimal[fmt.Sprintf("n%d", i)] = true
			if i > 0 {
				for _, id := range []string{"b%d", "e%d", "f%d"} {
					e.optimal[fmt.Sprintf(id, i)] = true
				}
			}
		}
	}
	return e
}

// checkDrawing checks an SVG drawing of sol against the solution.
func checkDrawing(t *testing.T, sol *eval.Solution, opts Options, svg []byte) {
	t.Helper()
	groups := parseSVG(t, svg)
	e := expect(sol, opts)
	cur := sol.Model.Currency
	if opts.Currency != "" {
		cur = opts.Currency
	}
	ends := map[int]eval.EndPoint{}
	for _, ep := range sol.Ends() {
		ends[ep.Index()] = ep
	}
	counts := map[string]int{}
	for _, g := range groups {
		for _, k := range []string{"decision", "chance", "end", "stub"} {
			if g.is(k) {
				counts[k]++
			}
		}
	}
	want := map[string]int{"stub": len(e.stubs)}
	nodes := sol.Nodes()
	for i := range e.shapes {
		want[nodes[i].Node.Kind.String()]++
	}
	for _, k := range []string{"decision", "chance", "end", "stub"} {
		if counts[k] != want[k] {
			t.Errorf("%d %s nodes drawn, want %d", counts[k], k, want[k])
		}
	}
	// A node's value is what follows it ("from here"); an option's value
	// at its decision includes the cash on its branch; an end shows its
	// path's total.
	value := func(v decimal.Decimal) string {
		if sol.Model.Objective == tree.Min {
			return "expected cost from here " + Money(v, cur)
		}
		return "EV from here " + Money(v, cur)
	}
	option := func(v decimal.Decimal) string {
		if sol.Model.Objective == tree.Min {
			return "option expected cost " + Money(v, cur)
		}
		return "option EV " + Money(v, cur)
	}
	for i := range nodes {
		s := &nodes[i]
		id := fmt.Sprintf("n%d", i)
		g := groups[id]
		if !e.shapes[i] && !e.stubs[i] {
			if g != nil {
				t.Errorf("%s (%s) is drawn but should not be", id, s.Node.Display())
			}
			continue
		}
		if g == nil {
			t.Errorf("%s (%s) is not drawn", id, s.Node.Display())
			continue
		}
		if e.stubs[i] {
			if !g.is("stub") || g.paths == 0 {
				t.Errorf("%s: want a depth stub (a rounded box), got classes %v", id, g.classes)
			}
			hasText(t, g, value(s.Value()))
			hasText(t, g, fmt.Sprintf("%s %s not drawn", Grouped(strconv.Itoa(s.Size())), plural(s.Size(), "node", "nodes")))
			continue
		}
		if !g.is(s.Node.Kind.String()) {
			t.Errorf("%s: classes %v, want %s", id, g.classes, s.Node.Kind)
		}
		switch s.Node.Kind {
		case tree.KindDecision:
			if len(g.polygons) != 1 || len(distinct(g.polygons[0])) != 4 {
				t.Errorf("%s: a decision must be one polygon of 4 points, got %v", id, g.polygons)
			} else if w, h := extent(g.polygons[0]); math.Abs(w-h) > 0.5 {
				t.Errorf("%s: a decision must be a square, got %.2f × %.2f", id, w, h)
			}
			hasText(t, g, value(s.Value()))
		case tree.KindChance:
			if len(g.ellipses) != 1 || len(g.polygons) != 0 || math.Abs(g.ellipses[0][2]-g.ellipses[0][3]) > 0.01 {
				t.Errorf("%s: a chance node must be one circle, got ellipses %v polygons %v", id, g.ellipses, g.polygons)
			}
			hasText(t, g, value(s.Value()))
		case tree.KindEnd:
			if len(g.polygons) != 1 || len(distinct(g.polygons[0])) != 3 {
				t.Errorf("%s: an end node must be one polygon of 3 points, got %v", id, g.polygons)
			} else if !pointsRight(distinct(g.polygons[0])) {
				t.Errorf("%s: the triangle must point right: %v", id, g.polygons[0])
			}
			ep := ends[i]
			word := "path total "
			if sol.Model.Objective == tree.Min {
				word = "path total cost "
			}
			hasText(t, g, word+Money(ep.Payoff, cur))
			hasText(t, g, "path probability "+Percent(ep.Prob, 2))
		}
		if i > 0 {
			for _, f := range []string{"b%d", "e%d", "f%d"} {
				if groups[fmt.Sprintf(f, i)] == nil {
					t.Errorf("the branch into %s has no %s", id, fmt.Sprintf(f, i))
				}
			}
			checkBranchGeometry(t, id, g, groups[fmt.Sprintf("e%d", i)], groups[fmt.Sprintf("f%d", i)])
			if s.Parent().Node.Kind == tree.KindChance {
				hasText(t, groups[fmt.Sprintf("b%d", i)], Percent(s.Parent().Prob(s.Via()), 2))
			}
			if s.Parent().Node.Kind == tree.KindDecision {
				hasText(t, groups[fmt.Sprintf("b%d", i)], option(s.Parent().BranchValue(s.Via())))
			}
		}
	}
	for i := range e.others {
		if g := groups[fmt.Sprintf("b%dx", i)]; g == nil || !g.is("others") || g.is("optimal") {
			t.Errorf("decision n%d: want one stub for its other options", i)
		}
	}
	for id, g := range groups {
		if g.is("optimal") != e.optimal[id] {
			t.Errorf("%s: class optimal is %v, want %v (classes %v)", id, g.is("optimal"), e.optimal[id], g.classes)
		}
	}
	for id := range e.optimal {
		if groups[id] == nil {
			t.Errorf("%s is on the optimal policy but not drawn", id)
		}
	}
}

// checkBranchGeometry checks that a branch reads as one line: the edge
// from the label on (f) is level, at the height of the node's centre, and
// starts where the edge into the label (e) ends, one label's width on.
func checkBranchGeometry(t *testing.T, id string, node, e, f *svgGroup) {
	t.Helper()
	if node == nil || e == nil || f == nil {
		return
	}
	_, eEnd, ok1 := ends(e.path)
	fStart, fEnd, ok2 := ends(f.path)
	if !ok1 || !ok2 {
		t.Errorf("%s: cannot read the edges %q, %q", id, e.path, f.path)
		return
	}
	if math.Abs(fStart[1]-fEnd[1]) > 0.01 || math.Abs(eEnd[1]-fStart[1]) > 0.01 || eEnd[0] >= fStart[0] {
		t.Errorf("%s: the branch is not one level line through its label: e ends %v, f runs %v to %v", id, eEnd, fStart, fEnd)
	}
	var cy float64
	switch {
	case len(node.ellipses) > 0:
		cy = node.ellipses[0][1]
	case len(node.polygons) > 0:
		_, h := extent(node.polygons[0])
		minY := math.Inf(1)
		for _, p := range node.polygons[0] {
			minY = math.Min(minY, p[1])
		}
		cy = minY + h/2
	default:
		return // a stub box: a path
	}
	if math.Abs(cy-fEnd[1]) > 0.01 {
		t.Errorf("%s: the branch meets the node at y=%.2f, its centre is at %.2f", id, fEnd[1], cy)
	}
}

// ends reads the first and last points of an SVG path "Mx,yC...".
func ends(d string) (first, last [2]float64, ok bool) {
	fields := strings.FieldsFunc(d, func(r rune) bool { return r == 'M' || r == 'C' || r == ' ' })
	var pts [][2]float64
	for _, f := range fields {
		xy := strings.Split(f, ",")
		if len(xy) != 2 {
			return first, last, false
		}
		x, err1 := strconv.ParseFloat(xy[0], 64)
		y, err2 := strconv.ParseFloat(xy[1], 64)
		if err1 != nil || err2 != nil {
			return first, last, false
		}
		pts = append(pts, [2]float64{x, y})
	}
	if len(pts) < 2 {
		return first, last, false
	}
	return pts[0], pts[len(pts)-1], true
}

func hasText(t *testing.T, g *svgGroup, want string) {
	t.Helper()
	if g == nil {
		return
	}
	for _, s := range g.texts {
		if strings.Contains(s, want) {
			return
		}
	}
	t.Errorf("%s: no text %q among %q", g.id, want, g.texts)
}

func extent(pts [][2]float64) (w, h float64) {
	minX, minY, maxX, maxY := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for _, p := range pts {
		minX, maxX = math.Min(minX, p[0]), math.Max(maxX, p[0])
		minY, maxY = math.Min(minY, p[1]), math.Max(maxY, p[1])
	}
	return maxX - minX, maxY - minY
}

// pointsRight reports whether a triangle has one vertex right of the other
// two, which share an x.
func pointsRight(pts [][2]float64) bool {
	if len(pts) != 3 {
		return false
	}
	for k := range pts {
		a, b := pts[(k+1)%3], pts[(k+2)%3]
		if math.Abs(a[0]-b[0]) < 0.5 && pts[k][0] > a[0]+1 {
			return true
		}
	}
	return false
}

func drawSVG(t *testing.T, sol *eval.Solution, opts Options) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := renderer(t).Draw(context.Background(), sol, opts, SVG, &buf); err != nil {
		t.Fatalf("Draw: %v", err)
	}
	return buf.Bytes()
}

var optionSets = []struct {
	name string
	opts Options
}{
	{"full", Options{}},
	{"policy-only", Options{PolicyOnly: true}},
	{"depth-1", Options{MaxDepth: 1}},
	{"depth-2", Options{MaxDepth: 2}},
	{"policy-depth-2", Options{PolicyOnly: true, MaxDepth: 2}},
	{"narrow-wrap", Options{WrapWidth: 8, Currency: "USD"}},
}

func TestDrawStructure(t *testing.T) {
	models := map[string]func(t *testing.T) *eval.Solution{
		"tie":       func(t *testing.T) *eval.Solution { return fixtures.Solve(t, fixtures.Tie()) },
		"cost":      func(t *testing.T) *eval.Solution { return fixtures.Solve(t, fixtures.Cost()) },
		"odd":       func(t *testing.T) *eval.Solution { return fixtures.Solve(t, fixtures.Odd()) },
		"generated": func(t *testing.T) *eval.Solution { return fixtures.Solve(t, fixtures.Generated(60)) },
	}
	for _, name := range examples.Names() {
		models["example:"+name] = func(t *testing.T) *eval.Solution { return loadExample(t, name) }
	}
	for name, mk := range models {
		for _, os := range optionSets {
			t.Run(name+"/"+os.name, func(t *testing.T) {
				sol := mk(t)
				checkDrawing(t, sol, os.opts, drawSVG(t, sol, os.opts))
			})
		}
	}
}

// TestExamplesDeterministic draws every bundled example twice: the SVG
// must be the same to the byte.
func TestExamplesDeterministic(t *testing.T) {
	if len(examples.Names()) == 0 {
		t.Fatal("no bundled examples")
	}
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			a := drawSVG(t, loadExample(t, name), Options{})
			b := drawSVG(t, loadExample(t, name), Options{})
			if !bytes.Equal(a, b) {
				t.Errorf("two drawings of %s differ", name)
			}
			da, _ := DOT(loadExample(t, name), Options{})
			db, _ := DOT(loadExample(t, name), Options{})
			if !bytes.Equal(da, db) {
				t.Errorf("two DOT texts of %s differ", name)
			}
		})
	}
}

func TestTieAndPruning(t *testing.T) {
	sol := fixtures.Solve(t, fixtures.Tie())
	// Road: -100 + (0.5·400 + 0.5·200) = 200 ties with Rail (200).
	if !sol.Root.Tied() {
		t.Fatal("the tie model must tie")
	}
	svg := drawSVG(t, sol, Options{})
	groups := parseSVG(t, svg)
	rail := groups[fmt.Sprintf("b%d", sol.Root.Kid(1).Index())]
	home := groups[fmt.Sprintf("b%d", sol.Root.Kid(2).Index())]
	if rail == nil || home == nil {
		t.Fatal("missing branch labels")
	}
	hasText(t, rail, pruneMark+" Rail (tie)")
	hasText(t, home, pruneMark+" Stay home")
	if !rail.is("pruned") || !home.is("pruned") {
		t.Errorf("rejected options must have the class pruned")
	}
	if !strings.Contains(string(svg), `stroke-dasharray`) {
		t.Errorf("rejected options must be dashed")
	}
	// Title text is escaped, not markup.
	if !strings.Contains(string(svg), "Tied &lt;options&gt; &amp; &#34;quotes&#34;") && !strings.Contains(string(svg), "Tied &lt;options&gt; &amp; &quot;quotes&quot;") {
		t.Errorf("the title is not in the SVG, escaped")
	}
	// Policy only: one stub for the two other options.
	groups = parseSVG(t, drawSVG(t, sol, Options{PolicyOnly: true}))
	stub := groups["b0x"]
	if stub == nil {
		t.Fatal("no stub for the other options")
	}
	hasText(t, stub, pruneMark+" 2 other options")
	hasText(t, stub, "best: Rail")
	hasText(t, stub, "option EV 200.00 EUR (tie)")
}

func TestCostWords(t *testing.T) {
	// Under min the drawing says cost for a positive figure.
	sol := fixtures.Solve(t, fixtures.Cost())
	groups := parseSVG(t, drawSVG(t, sol, Options{}))
	hasText(t, groups[fmt.Sprintf("b%d", sol.Root.Kid(1).Index())], "cost 50,000 JPY")
	hasText(t, groups["n0"], "expected cost from here 50,000 JPY")
}

// An option rejected for the cost on its own branch must not read as the
// cheaper one: its chance node's expected cost from here (159,000) is
// below the chosen option's (455,500) only because the 300,000 paid on
// the way in is left out. The figures the decision compares are the
// options' own, with that cost in: 459,000 against 455,500. (Invented
// figures; the arithmetic is in the comments.)
func TestOptionsCompareWithTheirOwnCash(t *testing.T) {
	m := &tree.Model{
		Title: "Supplier for the depot scanners", Currency: "EUR", Objective: tree.Min,
		Root: tree.Decision("Supplier",
			// 300,000 + (0.5 · 18,000 + 0.5 · 300,000) = 300,000 + 159,000
			tree.Choice("Low bid, setup fee", tree.Cost(tree.Num(decimal.NewFromInt(300_000))), tree.Chance("Low bidder's delivery",
				tree.Outcome("Smooth", tree.Num(decimal.RequireFromString("0.5")), tree.Cost(tree.Num(decimal.NewFromInt(18_000))), nil),
				tree.RestOutcome("Troubled", tree.Cost(tree.Num(decimal.NewFromInt(300_000))), nil))),
			// 0.5 · 411,000 + 0.5 · 500,000 = 455,500
			tree.Choice("Established vendor", tree.Cost(tree.Num(decimal.Zero)), tree.Chance("Vendor's delivery",
				tree.Outcome("Smooth", tree.Num(decimal.RequireFromString("0.5")), tree.Cost(tree.Num(decimal.NewFromInt(411_000))), nil),
				tree.RestOutcome("Troubled", tree.Cost(tree.Num(decimal.NewFromInt(500_000))), nil))),
		),
	}
	sol := fixtures.Solve(t, m)
	if sol.Root.Chosen() != 1 {
		t.Fatalf("the established vendor (455,500) must beat the low bid (459,000)")
	}
	for _, opts := range []Options{{}, {PolicyOnly: true}} {
		groups := parseSVG(t, drawSVG(t, sol, opts))
		low, vendor := sol.Root.Kids()[0], sol.Root.Kids()[1]
		hasText(t, groups[fmt.Sprintf("b%d", vendor.Index())], "option expected cost 455,500.00 EUR")
		hasText(t, groups[fmt.Sprintf("n%d", vendor.Index())], "expected cost from here 455,500.00 EUR")
		if opts.PolicyOnly {
			hasText(t, groups["b0x"], "option expected cost 459,000.00 EUR")
			continue
		}
		hasText(t, groups[fmt.Sprintf("b%d", low.Index())], "option expected cost 459,000.00 EUR")
		hasText(t, groups[fmt.Sprintf("n%d", low.Index())], "expected cost from here 159,000.00 EUR")
		// No figure in the tree is a bare "expected cost": each says
		// whether it is from a node on, an option's or a path's total.
		for id, g := range groups {
			for _, text := range g.texts {
				if strings.HasPrefix(text, "expected cost ") && !strings.HasPrefix(text, "expected cost from here ") {
					t.Errorf("%s: %q does not say what it counts", id, text)
				}
			}
		}
	}
}

func TestBadInput(t *testing.T) {
	ctx := context.Background()
	r := renderer(t)
	if err := r.Draw(ctx, nil, Options{}, SVG, io.Discard); !errors.Is(err, render.ErrNoTree) {
		t.Errorf("Draw(nil) = %v, want render.ErrNoTree", err)
	}
	var buf bytes.Buffer
	for _, dot := range []string{"", "not a graph", "digraph { a -> ", "\x00\xff", "digraph { graph [layout=bogus] a }"} {
		buf.Reset()
		if err := r.Render(ctx, []byte(dot), SVG, &buf); err == nil {
			t.Errorf("Render(%q): no error", dot)
		}
		if buf.Len() != 0 {
			t.Errorf("Render(%q) wrote output on failure", dot)
		}
	}
	// Graphviz recovers from a broken HTML-like label (it draws the text
	// as it is): no panic, and the renderer goes on working.
	_ = r.Render(ctx, []byte("graph { a [label=<<TABLE><TR>>] }"), SVG, io.Discard)
	if err := r.Render(ctx, []byte("digraph { a }"), Format("gif"), &buf); err == nil {
		t.Error("Render(gif): no error")
	}
	// The renderer still works after all that.
	buf.Reset()
	if err := r.Render(ctx, []byte("digraph { a -> b }"), SVG, &buf); err != nil || !bytes.Contains(buf.Bytes(), []byte("</svg>")) {
		t.Errorf("Render after errors: %v", err)
	}
	cancelled, cancel := context.WithCancel(ctx)
	cancel()
	if err := r.Render(cancelled, []byte("digraph { a }"), SVG, io.Discard); err == nil {
		t.Error("Render with a cancelled context: no error")
	}
	if _, err := ParseFormat("jpeg"); err == nil {
		t.Error("ParseFormat(jpeg): no error")
	}
	if f, err := ParseFormat("PNG"); err != nil || f != PNG {
		t.Errorf("ParseFormat(PNG) = %v, %v", f, err)
	}
	own, err := NewRenderer(ctx)
	if err != nil {
		t.Fatal(err)
	}
	if err := own.Close(); err != nil {
		t.Errorf("Close: %v", err)
	}
	if err := own.Close(); err != nil {
		t.Errorf("second Close: %v", err)
	}
	if err := own.Render(ctx, []byte("digraph { a }"), SVG, io.Discard); err == nil {
		t.Error("Render on a closed renderer: no error")
	}
}

func TestPNG(t *testing.T) {
	var buf bytes.Buffer
	if err := renderer(t).Draw(context.Background(), fixtures.Solve(t, fixtures.Tie()), Options{}, PNG, &buf); err != nil {
		t.Fatal(err)
	}
	if !bytes.HasPrefix(buf.Bytes(), []byte("\x89PNG\r\n\x1a\n")) {
		t.Errorf("not a PNG: % x", buf.Bytes()[:min(8, buf.Len())])
	}
	// A chain of 300 decisions is far too wide for one raster: a clear
	// error, nothing written, and the renderer goes on working.
	var root *tree.Node
	for i := 0; i < 300; i++ {
		root = tree.Decision(fmt.Sprintf("Step %d", i),
			tree.Choice("Go on", tree.Gain(tree.Num(decimal.NewFromInt(1))), root),
			tree.Choice("Stop", tree.NoCash, nil))
	}
	buf.Reset()
	// The refusal comes from the layout's size, before any painting: a
	// renderer of its own counts the pages its PNG painter begins.
	own, err := NewRenderer(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	defer own.Close()
	huge := fixtures.Solve(t, &tree.Model{Root: root})
	err = own.Draw(context.Background(), huge, Options{}, PNG, &buf)
	var big *PNGTooBigError
	if !errors.As(err, &big) || big.Width <= MaxPNGSide || !strings.Contains(err.Error(), "too big") || buf.Len() != 0 {
		t.Errorf("a huge PNG: err %v, %d bytes written", err, buf.Len())
	}
	if n := own.c.PNGPages(); n != 0 {
		t.Errorf("the PNG painter began %d pages before the refusal", n)
	}
	// DOT from elsewhere has no layout size: the painter refuses it at
	// its first page (a box 300 inches wide is 43,200 pixels at 144 dpi),
	// and paints nothing.
	if err := own.Render(context.Background(), []byte("digraph { a [shape=box width=300 height=1] }"), PNG, &buf); !errors.As(err, &big) || buf.Len() != 0 {
		t.Errorf("a huge PNG from DOT: err %v, %d bytes written", err, buf.Len())
	}
	if err := own.Draw(context.Background(), fixtures.Solve(t, fixtures.Tie()), Options{}, PNG, io.Discard); err != nil {
		t.Errorf("a PNG after a refused one: %v", err)
	}
}

// The size the layout predicts is the size of the PNG drawn, to within a
// few points, so that the refusal from it is the right one.
func TestPNGSizeFromLayout(t *testing.T) {
	sols := []*eval.Solution{fixtures.Solve(t, fixtures.Tie()), fixtures.Solve(t, fixtures.Odd()), fixtures.Solve(t, fixtures.Generated(60))}
	for _, name := range examples.Names() {
		sols = append(sols, loadExample(t, name))
	}
	for _, sol := range sols {
		pic, err := render.Layout(sol, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := renderer(t).RenderPicture(context.Background(), pic, PNG, &buf); err != nil {
			t.Fatal(err)
		}
		cfg, err := png.DecodeConfig(&buf)
		if err != nil {
			t.Fatal(err)
		}
		w, h := PNGSize(pic)
		// 8 points at 144 dpi are 16 pixels.
		if math.Abs(float64(w-cfg.Width)) > 16 || math.Abs(float64(h-cfg.Height)) > 16 {
			t.Errorf("%q: the layout predicts %d × %d pixels, the PNG is %d × %d", sol.Model.Title, w, h, cfg.Width, cfg.Height)
		}
	}
}

// TestConcurrent draws from several goroutines through two renderers:
// go-graphviz's single WebAssembly instance must be guarded.
func TestConcurrent(t *testing.T) {
	other, err := NewRenderer(context.Background())
	if err != nil {
		t.Fatal(err)
	}
	defer other.Close()
	sol := fixtures.Solve(t, fixtures.Generated(40))
	want := drawSVG(t, sol, Options{})
	var wg sync.WaitGroup
	errs := make(chan error, 8)
	for g := 0; g < 4; g++ {
		wg.Add(1)
		go func(r *Renderer) {
			defer wg.Done()
			for k := 0; k < 3; k++ {
				var buf bytes.Buffer
				if err := r.Draw(context.Background(), sol, Options{}, SVG, &buf); err != nil {
					errs <- err
					return
				}
				if !bytes.Equal(buf.Bytes(), want) {
					errs <- errors.New("a concurrent drawing differs")
					return
				}
			}
		}([]*Renderer{renderer(t), other}[g%2])
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
}

// TestCacheDir checks that go-graphviz's compilation cache went to the
// user's cache directory and that the temporary directory was given back.
func TestCacheDir(t *testing.T) {
	renderer(t)
	dir := gvcache.Dir()
	base, err := os.UserCacheDir()
	if err != nil {
		if dir != "" {
			t.Errorf("no user cache dir, yet the cache is at %s", dir)
		}
		t.Skip("no user cache directory here")
	}
	if want := filepath.Join(base, "forkcast", "go-graphviz"); dir != want {
		t.Fatalf("cache dir %q, want %q", dir, want)
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatalf("the cache directory was not made: %v", err)
	}
	found := false
	for _, e := range entries {
		found = found || strings.HasPrefix(e.Name(), "wazero")
	}
	if !found {
		t.Errorf("no wazero cache in %s", dir)
	}
	if strings.HasPrefix(os.TempDir(), filepath.Join(base, "forkcast")) {
		t.Errorf("the temporary directory is still redirected: %s", os.TempDir())
	}
}
