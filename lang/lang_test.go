package lang

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// load reads src with Load, fails the test on any error, and returns the
// model as written.
func load(t *testing.T, src string) *tree.Model {
	t.Helper()
	return loadC(t, src).Source()
}

// loadC reads src with Load and fails the test on any error.
func loadC(t *testing.T, src string) *compiled.Model {
	t.Helper()
	m, ds := Load([]byte(src), Options{})
	if ds.HasErrors() {
		var b strings.Builder
		ds.Print(&b, "test.fork", []byte(src))
		t.Fatalf("unexpected errors:\n%s", b.String())
	}
	return m
}

// parse reads src with Parse and fails the test on any error.
func parse(t *testing.T, src string) *tree.Model {
	t.Helper()
	m, ds := Parse([]byte(src), Options{})
	if ds.HasErrors() {
		var b strings.Builder
		ds.Print(&b, "test.fork", []byte(src))
		t.Fatalf("unexpected errors:\n%s", b.String())
	}
	return m
}

func dec(s string) decimal.Decimal { return decimal.RequireFromString(s) }

func TestHeaders(t *testing.T) {
	tests := []struct {
		src       string
		title     string
		currency  string
		objective tree.Objective
	}{
		{"decision \"D\"\n  \"a\"\n", "", "", tree.Max},
		{"title \"Fare gates\"\ncurrency EUR\nobjective max\ndecision \"D\"\n  \"a\"\n", "Fare gates", "EUR", tree.Max},
		{"objective min\ncurrency \"NZ$\"\ndecision \"D\"\n  \"a\"\n", "", "NZ$", tree.Min},
		{"decision \"D\"\n  \"a\"\ntitle \"At the end \\\"quoted\\\"\" # comment\n", `At the end "quoted"`, "", tree.Max},
	}
	for _, tt := range tests {
		m := load(t, tt.src)
		if m.Title != tt.title || m.Currency != tt.currency || m.Objective != tt.objective {
			t.Errorf("%q: got %q %q %v, want %q %q %v", tt.src, m.Title, m.Currency, m.Objective, tt.title, tt.currency, tt.objective)
		}
	}
}

func TestParams(t *testing.T) {
	src := `let licence = 240_000   in 200_000 .. 300_000
let p_slip  = 30%       in 15% .. 45%
let lease   = 12 * 61_000
decision "D"
  "a"  cost licence + lease
    chance "C"
      "x"  p_slip
      "y"  rest
`
	c := loadC(t, src)
	m := c.Source()
	if len(m.Params) != 3 {
		t.Fatalf("got %d params", len(m.Params))
	}
	want := []struct {
		name, expr, value, low, high string
		pos                          tree.Pos
	}{
		{"licence", "240_000", "240000", "200000", "300000", tree.Pos{Line: 1, Col: 5}},
		{"p_slip", "30%", "0.3", "0.15", "0.45", tree.Pos{Line: 2, Col: 5}},
		{"lease", "(12 * 61_000)", "732000", "", "", tree.Pos{Line: 3, Col: 5}},
	}
	for i, w := range want {
		p := m.Params[i]
		in, _ := c.InputNamed(p.Name)
		if p.Name != w.name || p.Expr.String() != w.expr || !in.Value.Equal(dec(w.value)) || p.Pos != w.pos {
			t.Errorf("param %d: got %s = %s (%s) at %v", i, p.Name, p.Expr, in.Value, p.Pos)
		}
		if w.low == "" {
			if p.HasRange() {
				t.Errorf("%s: unexpected range", p.Name)
			}
			continue
		}
		if !p.HasRange() || !in.HasRange || !in.Low.Equal(dec(w.low)) || !in.High.Equal(dec(w.high)) {
			t.Errorf("%s: range %s .. %s", p.Name, in.Low, in.High)
		}
	}
}

// TestExpressions checks precedence, associativity and exact arithmetic.
func TestExpressions(t *testing.T) {
	tests := []struct {
		expr, str, value string
	}{
		{"1 + 2 * 3", "(1 + (2 * 3))", "7"},
		{"(1 + 2) * 3", "((1 + 2) * 3)", "9"},
		{"2 - 3 - 4", "((2 - 3) - 4)", "-5"},
		{"12 / 4 / 3", "((12 / 4) / 3)", "1"},
		{"-2 * 3", "(-2 * 3)", "-6"},
		{"10 - -2", "(10 - -2)", "12"},
		{"- (1 + 2)", "-(1 + 2)", "-3"},
		{"50% * 200", "(50% * 200)", "100"},
		{"0.1 + 0.2", "(0.1 + 0.2)", "0.3"},
		{"1_000_000.50", "1_000_000.50", "1000000.5"},
		{"12.5%", "12.5%", "0.125"},
		{"123456789012345678901234567890.123456789", "123456789012345678901234567890.123456789", "123456789012345678901234567890.123456789"},
		{"1 + 2 + 3 * 4 - 5 / 5", "(((1 + 2) + (3 * 4)) - (5 / 5))", "14"},
		{"((((7))))", "7", "7"},
		{"base * (1 + 10%)", "(base * (1 + 10%))", "110"},
	}
	for _, tt := range tests {
		src := fmt.Sprintf("let base = 100\nlet x = %s\ndecision \"D\"\n  \"a\"  gain x + base\n", tt.expr)
		c := loadC(t, src)
		p := c.Source().Param("x")
		if p.Expr.String() != tt.str {
			t.Errorf("%s: parsed as %s, want %s", tt.expr, p.Expr, tt.str)
		}
		if in, _ := c.InputNamed("x"); !in.Value.Equal(dec(tt.value)) {
			t.Errorf("%s = %s, want %s", tt.expr, in.Value, tt.value)
		}
	}
}

func TestExactNumbers(t *testing.T) {
	m := parse(t, "let a = 0.1\nlet b = 55%\nlet c = 1_150_000\nlet d = 0.000000000000000000000000000001\ndecision \"D\"\n  \"a\"\n")
	for _, c := range []struct{ name, value, text string }{
		{"a", "0.1", "0.1"}, {"b", "0.55", "55%"}, {"c", "1150000", "1_150_000"}, {"d", "1e-30", "0.000000000000000000000000000001"},
	} {
		n, ok := m.Param(c.name).Expr.(*tree.Number)
		if !ok {
			t.Fatalf("%s: %T", c.name, m.Param(c.name).Expr)
		}
		if !n.Value().Equal(dec(c.value)) || n.Text() != c.text {
			t.Errorf("%s: %s %q", c.name, n.Value(), n.Text())
		}
	}
	// 0.1 + 0.2 is exactly 0.3, not 0.30000000000000004.
	c := loadC(t, "let x = 0.1 + 0.2\ndecision \"D\"\n  \"a\"  gain x\n")
	if in, _ := c.InputNamed("x"); in.Value.String() != "0.3" {
		t.Errorf("0.1 + 0.2 = %s", in.Value)
	}
}

// TestCashSigns: gain and cost are kept as written; the branch's figure in
// the objective's terms is gain − cost under max and cost − gain under min.
func TestCashSigns(t *testing.T) {
	tests := []struct {
		objective, cash, gain, cost, value string
	}{
		{"max", "gain 100", "100", "", "100"},
		{"max", "cost 30", "", "30", "-30"},
		{"max", "gain 100 cost 20", "100", "20", "80"},
		{"max", "cost 20 gain 100", "100", "20", "80"},
		{"max", "gain 5 * 20", "(5 * 20)", "", "100"},
		{"min", "gain 100", "100", "", "-100"},
		{"min", "cost 30", "", "30", "30"},
		{"min", "gain 100 cost 20", "100", "20", "-80"},
		{"min", "cost 20 gain 100", "100", "20", "-80"},
		{"max", "", "", "", "0"},
	}
	str := func(e tree.Expr) string {
		if e == nil {
			return ""
		}
		return e.String()
	}
	for _, tt := range tests {
		src := fmt.Sprintf("objective %s\ndecision \"D\"\n  \"a\"  %s\n  \"b\"\n", tt.objective, tt.cash)
		c := loadC(t, src)
		b := c.Source().Root.Branches[0]
		fig := c.Objective().Figure(c.Cash(c.Child(0, 0)))
		if str(b.Gain) != tt.gain || str(b.Cost) != tt.cost || !fig.Equal(dec(tt.value)) {
			t.Errorf("%s %q: gain %q cost %q = %s, want %q %q = %s", tt.objective, tt.cash, str(b.Gain), str(b.Cost), fig, tt.gain, tt.cost, tt.value)
		}
	}
	// The objective may come after the tree.
	c := loadC(t, "decision \"D\"\n  \"a\"  cost 7\n  \"b\"\nobjective min\n")
	if fig := c.Objective().Figure(c.Cash(c.Child(0, 0))); !fig.Equal(dec("7")) {
		t.Errorf("objective at the end: cost 7 = %s", fig)
	}
}

const fullExample = `# comment to end of line (also allowed after content on a line)
title     "Fare-gate controller sourcing"
currency  EUR
objective max            # or min; default max

let licence = 240_000   in 200_000 .. 300_000
let p_slip  = 30%       in 15% .. 45%
let dev     = 380_000
let lease   = 12 * 61_000

uncertainty schedule "Build schedule"
  "On time"    55%
  "Slips"      p_slip
  "Abandoned"  rest

uncertainty defect
  "Defective"  10%
  "Sound"      rest

test soak "Soak test" on defect cost 4_000
  "Alarm"   90% if "Defective", 8% if "Sound"
  "Clear"   rest

subtree after_alarm
  decision "After an alarm"
    "Fix first"  cost 30_000
    "Ship anyway"
      chance defect
        "Defective"  cost 250_000
        "Sound"

decision "Sourcing route"
  "Build in house"  cost dev
    chance schedule
      "On time"    gain 1_150_000
      "Slips"      gain   900_000
      "Abandoned"
  "Buy a licence"  cost licence
    chance "Integration"
      "Clean"   80%   gain 1_000_000
      "Rework"  rest  gain   780_000
  "Lease per depot"  gain lease
  "Run the soak test"
    test soak "Soak result"
      "Alarm"
        use after_alarm
      "Clear"
`

func TestLowering(t *testing.T) {
	m := parse(t, fullExample)
	if m.Title != "Fare-gate controller sourcing" || m.Currency != "EUR" || m.Objective != tree.Max {
		t.Errorf("headers: %q %q %v", m.Title, m.Currency, m.Objective)
	}
	// Uncertainties and states.
	if len(m.Uncertainties) != 2 {
		t.Fatalf("%d uncertainties", len(m.Uncertainties))
	}
	u := m.Uncertainties[0]
	if u.Name != "schedule" || u.Label != "Build schedule" || u.Pos != (tree.Pos{Line: 11, Col: 13}) || len(u.States) != 3 {
		t.Fatalf("uncertainty: %+v", u)
	}
	if s := u.States[0]; s.Label != "On time" || s.Prob.String() != "55%" || s.Pos != (tree.Pos{Line: 12, Col: 3}) {
		t.Errorf("state 0: %+v", s)
	}
	if s := u.States[1]; s.Prob.(*tree.Name).Name != "p_slip" {
		t.Errorf("state 1: %+v", s)
	}
	if s := u.States[2]; s.Prob != nil {
		t.Errorf("rest state has Prob %v", s.Prob)
	}
	// The test.
	ts := m.TestNamed("soak")
	if ts == nil || ts.Label != "Soak test" || ts.On != "defect" || ts.Cost.String() != "4_000" || len(ts.Readings) != 2 {
		t.Fatalf("test: %+v", ts)
	}
	alarm := ts.Readings[0]
	if alarm.Label != "Alarm" || alarm.Rest || len(alarm.Given) != 2 {
		t.Fatalf("reading: %+v", alarm)
	}
	if g := alarm.Given[1]; g.State != "Sound" || g.Prob.String() != "8%" || g.Pos != (tree.Pos{Line: 21, Col: 39}) {
		t.Errorf("likelihood: %+v", g)
	}
	if !ts.Readings[1].Rest || len(ts.Readings[1].Given) != 0 {
		t.Errorf("rest reading: %+v", ts.Readings[1])
	}
	// The tree.
	root := m.Root
	if root.Kind != tree.KindDecision || root.Label != "Sourcing route" || root.Pos != (tree.Pos{Line: 32, Col: 1}) || len(root.Branches) != 4 {
		t.Fatalf("root: %v at %v", root, root.Pos)
	}
	build := root.Branches[0]
	if build.Label != "Build in house" || build.Gain != nil || build.Cost.String() != "dev" || build.Prob != nil || build.Pos != (tree.Pos{Line: 33, Col: 3}) {
		t.Errorf("branch 0: %+v", build)
	}
	if n := build.Node; n.Kind != tree.KindChance || n.Uncertainty != "schedule" || n.Label != "" || n.Pos != (tree.Pos{Line: 34, Col: 5}) {
		t.Errorf("chance on uncertainty: %+v", n)
	}
	if b := build.Node.Branches[2]; b.Label != "Abandoned" || b.Node != nil || b.Gain != nil || b.Cost != nil || b.Prob != nil || b.Rest {
		t.Errorf("empty branch: %+v", b)
	}
	plain := root.Branches[1].Node
	if plain.Label != "Integration" || plain.Uncertainty != "" || plain.Branches[0].Prob.String() != "80%" || !plain.Branches[1].Rest {
		t.Errorf("plain chance: %+v", plain)
	}
	if c := plain.Branches[0].Gain.(*tree.Number); c.At != (tree.Pos{Line: 40, Col: 28}) {
		t.Errorf("cash position %v", c.At)
	}
	if lease := root.Branches[2]; lease.Gain.String() != "lease" || lease.Node != nil {
		t.Errorf("lease: %+v", lease)
	}
	tn := root.Branches[3].Node
	if tn.Kind != tree.KindChance || tn.Test != "soak" || tn.Label != "Soak result" || len(tn.Branches) != 2 {
		t.Fatalf("test node: %+v", tn)
	}
	sub := tn.Branches[0].Node
	if sub == nil || sub.Kind != tree.KindDecision || sub.Label != "After an alarm" || sub.Pos != (tree.Pos{Line: 25, Col: 3}) {
		t.Fatalf("expanded subtree: %+v", sub)
	}
	if d := sub.Branches[1].Node; d.Uncertainty != "defect" || d.Branches[0].Cost.String() != "250_000" {
		t.Errorf("inside the subtree: %+v", d)
	}
	// Load compiles it: the model solves (Bayes included).
	c, ds := Load([]byte(fullExample), Options{})
	if len(ds) != 0 {
		t.Fatalf("diagnostics: %v", ds)
	}
	if got := c.Len(); got != 16 {
		t.Errorf("%d nodes after Load, want 16", got)
	}
	if p := c.Prob(c.Child(c.Child(0, 3), 0)); !p.Equal(dec("0.162")) {
		t.Errorf("P(Alarm) = %s, want 0.162", p)
	}
}

func TestSubtrees(t *testing.T) {
	src := `subtree leaf
  chance "Coin"
    "Heads"  50%  gain 1
    "Tails"  rest
subtree pair
  decision "Pair"
    "Left"
      use leaf
    "Right"
      use leaf
subtree alias
  use pair
decision "Top"
  "One"
    use alias
  "Two"
    use pair
`
	c := loadC(t, src)
	m := c.Source()
	// Top + 2 × (Pair + 2 × (Coin + 2 ends)) = 1 + 2×7 = 15 nodes, + nothing else.
	if got := c.Len(); got != 15 {
		t.Errorf("%d nodes, want 15", got)
	}
	a, b := m.Root.Branches[0].Node, m.Root.Branches[1].Node
	if a == b || a.Branches[0].Node == a.Branches[1].Node || a.Branches[0] == b.Branches[0] {
		t.Error("uses share nodes; each must be a copy")
	}
	if a.Label != "Pair" || a.Branches[0].Node.Label != "Coin" {
		t.Errorf("expansion: %v / %v", a, a.Branches[0].Node)
	}
	// A subtree as the root.
	m = load(t, "subtree s\n  decision \"S\"\n    \"a\"\n    \"b\"\nuse s\n")
	if m.Root == nil || m.Root.Label != "S" {
		t.Errorf("root use: %v", m.Root)
	}
	// No placeholder may survive, even after errors.
	for _, bad := range []string{
		"decision \"D\"\n  \"a\"\n    use nowhere\n",
		"subtree s\n  use s\ndecision \"D\"\n  \"a\"\n    use s\n",
		"use nowhere\n",
	} {
		m, ds := Parse([]byte(bad), Options{})
		if !ds.HasErrors() {
			t.Errorf("%q: no error", bad)
		}
		tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
			if n.Kind == kindUse {
				t.Errorf("%q: placeholder left in the model", bad)
			}
			return true
		})
	}
}

func TestCycles(t *testing.T) {
	tests := []struct{ src, want string }{
		{"subtree a\n  use a\nuse a\n", `2:7: subtree "a" uses itself`},
		{"subtree a\n  decision \"A\"\n    \"x\"\n      use b\nsubtree b\n  decision \"B\"\n    \"y\"\n      use c\nsubtree c\n  use a\nuse a\n",
			`10:7: subtree "a" uses itself: a → b → c → a`},
	}
	for _, tt := range tests {
		_, ds := Parse([]byte(tt.src), Options{})
		found := false
		for _, d := range ds {
			if strings.Contains(d.Error(), tt.want) {
				found = true
			}
		}
		if !found {
			t.Errorf("%q: want %q in %v", tt.src, tt.want, ds)
		}
	}
}

// doubling returns a model whose subtrees each use the next one twice, for
// levels levels: 2^levels paths.
func doubling(levels int) string {
	var b strings.Builder
	for i := 0; i < levels; i++ {
		fmt.Fprintf(&b, "subtree l%d\n  decision \"L%d\"\n    \"a\"\n      use l%d\n    \"b\"\n      use l%d\n", i, i, i+1, i+1)
	}
	fmt.Fprintf(&b, "subtree l%d\n  decision \"End\"\n    \"a\"\n    \"b\"\n", levels)
	b.WriteString("decision \"Top\"\n  \"go\"\n    use l0\n  \"stop\"\n")
	return b.String()
}

func TestNodeLimit(t *testing.T) {
	// 40 levels of doubling would be 2^41 nodes: refused at once, at the use.
	_, ds := Parse([]byte(doubling(40)), Options{})
	if len(ds) != 1 || !strings.Contains(ds[0].Summary, `using subtree "l0" here takes the tree past the limit of 2,000,000 nodes`) {
		t.Fatalf("got %v", ds)
	}
	if ds[0].Pos != (tree.Pos{Line: 40*6 + 4 + 3, Col: 9}) {
		t.Errorf("at %v", ds[0].Pos)
	}
	// 3 levels: Top + l0..l2 (1+2+4 decisions) + 8 End decisions with 16 ends, + the stop end.
	n := loadC(t, doubling(3)).Len()
	if n != 1+7+8+16+1 {
		t.Errorf("%d nodes", n)
	}
	if _, ds := Parse([]byte(doubling(3)), Options{NodeLimit: n}); ds.HasErrors() {
		t.Errorf("at the limit: %v", ds)
	}
	if _, ds := Parse([]byte(doubling(3)), Options{NodeLimit: n - 1}); !ds.HasErrors() {
		t.Error("one past the limit: no error")
	}
	// A literal tree past the limit.
	_, ds = Parse([]byte("decision \"D\"\n  \"a\"\n  \"b\"\n  \"c\"\n"), Options{NodeLimit: 3})
	if len(ds) != 1 || !strings.Contains(ds[0].Summary, "more than 3 nodes") {
		t.Errorf("literal: %v", ds)
	}
}

// TestNodeLimitWhileReading checks that a tree written out line by line is
// refused as soon as it passes the node limit, at the line that passes it,
// without reading (or building) the rest of the file, read whole or as a
// stream; and that a subtree's definition counts only where it is used.
func TestNodeLimitWhileReading(t *testing.T) {
	// genModel(3, 4): 1 + 3 + 9 + 27 + 81 = 121 nodes as written, then a
	// line with a mistake that is only reported when it is read.
	src := string(genModel(3, 4)) + "decision \"oops\n"
	for _, limit := range []int{50, 120} {
		m, ds := Parse([]byte(src), Options{NodeLimit: limit})
		b := newBuilder(Options{NodeLimit: limit})
		if err := b.readFrom(strings.NewReader(src), 64); err != nil {
			t.Fatal(err)
		}
		sm, sds := b.done([]byte(src))
		if len(ds) != 1 || !strings.Contains(ds[0].Summary, fmt.Sprintf("the tree has more than %d nodes; reading stopped here", limit)) {
			t.Fatalf("limit %d: %v", limit, ds)
		}
		// The first branch line that makes limit+1 nodes (the root and
		// one a branch) is where reading stops.
		lines := strings.Split(src, "\n")
		branches, at := 0, 0
		for i, l := range lines {
			if strings.HasPrefix(strings.TrimLeft(l, " "), "\"") {
				if branches++; 1+branches > limit {
					at = i + 1
					break
				}
			}
		}
		if int(ds[0].Pos.Line) != at {
			t.Errorf("limit %d: at %v, want line %d", limit, ds[0].Pos, at)
		}
		if !reflect.DeepEqual(ds, sds) || !reflect.DeepEqual(m, sm) {
			t.Errorf("limit %d: the stream gives %v, the text whole %v", limit, sds, ds)
		}
	}
	// At the limit the whole file is read: the last line's mistake is
	// reported, and nothing about the limit.
	_, ds := Parse([]byte(src), Options{NodeLimit: 121})
	last := false
	for _, d := range ds.Errors() {
		last = last || d.Pos.Line == int32(strings.Count(src, "\n"))
		if strings.Contains(d.Summary, "more than") {
			t.Errorf("at the limit: %v", d)
		}
	}
	if !last {
		t.Errorf("at the limit, the last line is not read: %v", ds)
	}
	// A subtree of 10 ends used once: 1 + (1 + 10) = 12 nodes expanded,
	// though 1 + 1 + 10 branches are written.
	sub := "decision \"D\"\n  \"go\"\n    use s\nsubtree s\n  decision \"S\"\n"
	for i := range 10 {
		sub += fmt.Sprintf("    \"x%d\"\n", i)
	}
	if _, ds := Parse([]byte(sub), Options{NodeLimit: 12}); len(ds) != 0 {
		t.Errorf("at the limit through a subtree: %v", ds)
	}
	if _, ds := Parse([]byte(sub), Options{NodeLimit: 11}); !ds.HasErrors() {
		t.Error("one past the limit through a subtree: no error")
	}
}

// TestDeepChain reads a tree 100 000 levels deep: a chain of subtrees each
// using the next (by indentation alone such a file would be quadratic in
// size), and a 2 000-level chain written out with indentation.
func TestDeepChain(t *testing.T) {
	const depth = 100_000
	var b strings.Builder
	for i := 0; i < depth; i++ {
		fmt.Fprintf(&b, "subtree s%d\n  decision \"Level %d\"\n    \"on\"\n      use s%d\n    \"stop\"  gain 1\n", i, i, i+1)
	}
	fmt.Fprintf(&b, "subtree s%d\n  decision \"Last\"\n    \"end\"  gain 2\n", depth)
	b.WriteString("use s0\n")
	c := loadC(t, b.String())
	if got := c.Len(); got != 2*depth+2 {
		t.Errorf("%d nodes, want %d", got, 2*depth+2)
	}
	maxDepth := 0
	depths := make([]int, c.Len())
	for i := 1; i < c.Len(); i++ {
		depths[i] = depths[c.Parent(i)] + 1
		maxDepth = max(maxDepth, depths[i])
	}
	if maxDepth != depth+1 {
		t.Errorf("depth %d", maxDepth)
	}

	b.Reset()
	const levels = 2_000
	for i := 0; i < levels; i++ {
		ind := strings.Repeat(" ", 2*i)
		fmt.Fprintf(&b, "%sdecision \"D%d\"\n%s \"stop\"\n%s \"go\"\n", ind, i, ind, ind)
	}
	if got := loadC(t, b.String()).Len(); got != 2*levels+1 {
		t.Errorf("indented chain: %d nodes", got)
	}
}

// TestLargeModel is a sanity check, not a timing: a generated model of
// 111 111 nodes reads without error (it takes a fraction of a second).
func TestLargeModel(t *testing.T) {
	if testing.Short() {
		t.Skip("large model")
	}
	src := genModel(10, 5)
	m, ds := Load(src, Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	if got := m.Len(); got != 111_111 {
		t.Errorf("%d nodes", got)
	}
}

func BenchmarkParseLarge(b *testing.B) {
	src := genModel(10, 5)
	b.SetBytes(int64(len(src)))
	for b.Loop() {
		Parse(src, Options{})
	}
}

// TestAllErrors checks that one mistake on each of several lines gives one
// diagnostic for each, in order.
func TestAllErrors(t *testing.T) {
	src := `let a = 1__0
let b = 2 +
decision "D"
  "x"  gain 12%%
  "y"  cost (1
  "z"  gain rest
`
	_, ds := Load([]byte(src), Options{})
	var lines []int
	for _, d := range ds {
		lines = append(lines, int(d.Pos.Line))
	}
	if !reflect.DeepEqual(lines, []int{1, 2, 4, 5, 6}) {
		t.Errorf("lines %v: %v", lines, ds)
	}
}

func TestPositionsInCharacters(t *testing.T) {
	src := "decision \"Zürich — Genève\"\n  \"Größe ünd\"  gain prize\n  \"b\"\n"
	_, ds := Load([]byte(src), Options{})
	if len(ds) != 1 || ds[0].Pos != (tree.Pos{Line: 2, Col: 21}) || ds[0].Len != 5 {
		t.Errorf("got %v (len %d)", ds, ds[0].Len)
	}
}

func TestLineEndings(t *testing.T) {
	unix := "title \"T\"\ndecision \"D\"\n  \"a\"  gain 1\n  \"b\"\n"
	dos := "\ufeff" + strings.ReplaceAll(unix, "\n", "\r\n")
	a, b := load(t, unix), load(t, dos)
	if a.Title != b.Title || tree.Count(a.Root) != tree.Count(b.Root) || a.Root.Branches[0].Pos != b.Root.Branches[0].Pos {
		t.Error("CRLF and BOM read differently")
	}
	// Lone CRs (old Mac files), alone or mixed with the others, starting
	// with a comment: the same model, the same positions.
	withComment := "# sourcing\n" + unix
	want := load(t, withComment)
	for _, src := range []string{
		strings.ReplaceAll(withComment, "\n", "\r"),
		"# sourcing\r" + strings.ReplaceAll(unix, "\n", "\r\n"),
		"# sourcing\r\ntitle \"T\"\rdecision \"D\"\n  \"a\"  gain 1\r  \"b\"",
	} {
		m, ds := Parse([]byte(src), Options{})
		if ds.HasErrors() || m.Title != want.Title || tree.Count(m.Root) != tree.Count(want.Root) ||
			m.Root.Branches[1].Pos != want.Root.Branches[1].Pos {
			t.Errorf("%q: read differently: %v", src, ds)
		}
	}
	// Positions in diagnostics count lone CRs as line ends too, and the
	// printed line is the one they point at.
	src := []byte("# c\rdecision \"D\"\r  \"a\"  gain nope\r")
	_, ds := Load(src, Options{})
	var out strings.Builder
	ds.Print(&out, "f", src)
	if len(ds) != 1 || ds[0].Pos != (tree.Pos{Line: 3, Col: 13}) || !strings.Contains(out.String(), "\n      \"a\"  gain nope\n") {
		t.Errorf("got %v:\n%s", ds, out.String())
	}
}

func TestEmpty(t *testing.T) {
	for _, src := range []string{"", "\n\n", "# only a comment\n   # indented comment\n", "# only\r# comments\r\r"} {
		m, ds := Parse([]byte(src), Options{})
		if len(ds) != 1 || !strings.HasPrefix(ds[0].Summary, "the model is empty") || m == nil || m.Root != nil {
			t.Errorf("%q: %v", src, ds)
		}
	}
}

// TestFastPathAgrees reads every test input twice, with the fast path and
// with participle alone, and checks that both give the same model and the
// same diagnostics, and that participle accepts every line the fast path
// reads.
func TestFastPathAgrees(t *testing.T) {
	srcs := []string{fullExample, string(genModel(3, 3)), doubling(3), manyNames(50),
		"\"a\" 1 + 2\n\"a\" (1 + 2) gain -3 cost f(1, 2, x)\n\"a\" rest if \"x\", 5% if \"y\" gain 1\n\"a\" gain\n\"a\" 5 5\nchance x \"y\"\nchance \"y\"\nchance x\nuse s\ndecision \"d\"\n",
		fastShapes}
	srcs = append(srcs, badInputs(t)...)
	// Every line end, a byte-order mark, no line end at the end, a line
	// longer than the stream's buffer.
	srcs = append(srcs, strings.ReplaceAll(fullExample, "\n", "\r\n"), strings.ReplaceAll(fullExample, "\n", "\r"),
		"\ufeff"+fullExample, strings.TrimSuffix(fullExample, "\n"), "\ufeff", "\r", "\r\n\r\n", "\n\r",
		"decision \"D\"\r\n  \"a\" gain 1\r  \"b\" cost 2\n\r  \"c\"",
		"decision \""+strings.Repeat("long ", 200)+"\"\n  \"a\"\n  \"b\"\n")
	ps := getParsers()
	checked := 0
	for _, src := range srcs {
		problem, fast := fastAgrees([]byte(src))
		if problem != "" {
			t.Errorf("%s\nin:\n%s", problem, src)
			continue
		}
		lines := tree.SplitLines([]byte(src))
		for _, num := range fast {
			raw := string(lines[num-1])
			content := strings.TrimLeft(raw, " ")
			l := &srcLine{lineHead: lineHead{num: num, indent: len(raw) - len(content)}}
			l.lx = lexLine(content, num, l.indent+1, &l.diags)
			l.setHead()
			ps.parseLine(l)
			if l.err != nil || len(l.diags) > 0 || l.ast == nil {
				t.Errorf("line %d %q: the fast path reads what participle rejects: %v %v", num, raw, l.err, l.diags)
			}
			checked++
		}
	}
	if checked < 100 {
		t.Errorf("only %d lines checked", checked)
	}
}

// fastShapes has every shape of line the fast path reads, and near misses
// that it must leave to participle.
const fastShapes = `let fee = 2_500 in 1_000 .. 4_000
let unit = 1_200
let p = 30% in 15% .. 45%
let q = (p + 0.1) * 2 - -fee / 3
let r = 5 in 1 .. 40%
let s = fee + 10%
uncertainty u "U"
  "a" 30%
  "b" p
  "c" rest
decision "Root"
  "Build"  gain 15_500  cost fee
    chance "Market"
      "High"  0.23  gain unit * 2 cost (fee + 1) * 2
      "Mid"  (p - 0.1)  cost 3
      "Low"  p
      "None"  rest  gain -5
  "Buy"  cost 1 gain 2
    chance u
      "a"
      "b"  gain 00.50
      "c"  gain 1_0 cost 0.000_1
  "Lease" gain ((1)) + (2 * (3)) cost -(fee)
    chance u "Named"
      "a"  cost  undefined_name
      "b"  gain unitt
      "c"  cost 1.5% + 2
  "Wait"
    use later
  "Café ☕"  gain 1__0
  "x" gain 1e6
  "y" cost 12345678901234567890
  "z" gain 5 gain 6
  "" gain 1
subtree later
  decision "Later"
    "l" gain 1
`

// TestLoadFile checks that reading a file as a stream gives what reading
// its text whole gives: every node's value and choice, and the diagnostics
// with their spans (a figure that compiling finds wrong has its span
// from the file, read again).
func TestLoadFile(t *testing.T) {
	dir := t.TempDir()
	srcs := []string{fullExample, string(genModel(4, 3)), registerSrc,
		"decision \"D\"\r\n  \"a\"  gain (1 + 2) / (3 - 3)\r\n  \"b\"\r\n",
		"let x = 1\ndecision \"D\"\n  \"a\"  gain y\n  \"b\"\n",
		"decision \"D\n"}
	for i, src := range srcs {
		path := filepath.Join(dir, fmt.Sprintf("m%d.fork", i))
		if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		want, wantDs := Load([]byte(src), Options{})
		got, gotDs, err := LoadFile(path, Options{})
		if err != nil {
			t.Fatalf("%d: %v", i, err)
		}
		if !reflect.DeepEqual(gotDs, wantDs) {
			t.Errorf("%d: diagnostics %v, want %v", i, gotDs, wantDs)
		}
		if (got == nil) != (want == nil) {
			t.Fatalf("%d: compiled %v, want %v", i, got != nil, want != nil)
		}
		if got == nil || !want.HasTree() {
			continue
		}
		if got.Len() != want.Len() {
			t.Fatalf("%d: %d nodes, want %d", i, got.Len(), want.Len())
		}
		gr, wr := got.Rollback(), want.Rollback()
		for k := range want.Len() {
			gv, _ := gr.Value(k)
			wv, _ := wr.Value(k)
			if !gv.Equal(wv) || gr.Best(k) != wr.Best(k) {
				t.Errorf("%d: node %d: value %s best %d, want %s best %d", i, k, gv, gr.Best(k), wv, wr.Best(k))
			}
		}
	}
	if _, _, err := LoadFile(filepath.Join(dir, "missing.fork"), Options{}); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v", err)
	}
}
