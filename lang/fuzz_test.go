package lang

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"reflect"
	"strings"
	"testing"
	"testing/iotest"
	"time"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/internal/fuzzkit"
	"github.com/forkcast/forkcast/register"
	"github.com/forkcast/forkcast/tree"
)

// designExample is the model from DESIGN.md.
const designExample = `# Sourcing the fare-gate controller for the depots (invented demo data)
title     "Fare-gate controller sourcing"
currency  EUR
objective max

# Inputs. ` + "`in LOW .. HIGH`" + ` is the range sweeps and breakeven searches use.
let licence = 240_000   in 200_000 .. 300_000
let p_slip  = 30%       in 15% .. 45%
let dev     = 380_000

# A named uncertainty: declared once, used wherever it occurs in the tree, so
# value-of-information analysis knows that two chance nodes are one event.
uncertainty schedule "Build schedule"
  "On time"    55%
  "Slips"      p_slip
  "Abandoned"  rest

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
  "Lease per depot"  gain 12 * 61_000
`

// Budgets of one fuzz input. The node limit bounds what an input may
// build; the time limit is far above what any input within it should take,
// so an input that passes it is a defect to find, not a slow machine.
const (
	fuzzNodeLimit = 20_000
	fuzzMaxInput  = 1 << 20
	fuzzLoadTime  = 10 * time.Second
	fuzzExprTime  = 2 * time.Second
)

// underBudget runs check on its own goroutine and fails the test if it
// reports a problem, panics or runs past limit (fuzzkit.Within).
func underBudget(t *testing.T, limit time.Duration, check func() string) {
	t.Helper()
	if problem := fuzzkit.Within(limit, 0, check); problem != "" {
		t.Fatal(problem)
	}
}

// FuzzLoad checks that no input makes the reader panic, that a model read
// without errors has a tree, that every diagnostic has a position and
// prints, and that the fast path agrees with participle on every line.
// Every input runs under a node limit and a time budget of its own.
func FuzzLoad(f *testing.F) {
	for _, s := range []string{
		designExample, fullExample, doubling(3), string(genModel(3, 2)),
		"", "# nothing\n", "decision \"D\"\n  \"a\"\n",
		"decision \"D\"\n\t\"a\"\n", "decision \"D\n", "let x = rest\n", "let x = ((((1\n",
		"subtree a\n  use a\nuse a\n", "\"a\" 1 + 2 gain -3 cost f(1, 2)\n",
		"test t on u cost 1\n  \"r\" 1% if \"s\", rest\nuncertainty u\n  \"s\" 1\n  \"t\" rest\ntest t\n  \"r\"\n",
		"decision “Go”\n  \"a\":  gain €1,000\n",
		"# mac\rdecision \"D\"\r  \"a\" gain 1\r\n  \"b\"\r",
		"decision \"D\x1b\"\n  \"a\x07\"\n  \"b\" gain 1 \x00\n",
		"let p = 30% in 5 .. 40%\ndecision \"D\"\n  \"a\" cost 100 + 20%\n    chance \"C\"\n      \"x\" p\n      \"y\" rets\n",
		registerSrc, "register r\n  threat \"1\" \"x\"\n    probability 1/3\n    impact uniform(-5, 5)\n    response \"y\" cost 0\n      residual impact 2\n",
		"let t = register r risk A with responses\nregister r\n  opportunity A \"a\"\n    probability 0\n    impact 1e9\n    delay -1 days\n",
		"let a = pert(1, 2, 4)\nlet b = a * 2\ncorrelate a c -0.5\ndecision \"D\"\n  \"x\"\n    chance a \"A\" by pearson\n      use s\n  \"y\" gain b\nsubtree s\n  chance a by swanson\n    decision \"E\"\n      \"e\" gain b\n",
	} {
		f.Add([]byte(s))
	}
	for _, s := range badInputSeeds() {
		f.Add([]byte(s))
	}
	ps := getParsers()
	f.Fuzz(func(t *testing.T, src []byte) {
		if len(src) > fuzzMaxInput {
			t.Skip("larger than the input budget")
		}
		underBudget(t, fuzzLoadTime, func() string { return checkLoad(src, ps) })
	})
}

// fastAgrees reads src with the fast path and with participle alone, and
// as a stream, and says how the models or diagnostics differ ("" when they
// do not); it also returns the lines the fast path read.
func fastAgrees(src []byte) (string, []int) {
	fb := newBuilder(Options{NodeLimit: fuzzNodeLimit})
	fb.trace = true
	fb.read(src)
	fm, fds := fb.done(src)
	sb := newBuilder(Options{NodeLimit: fuzzNodeLimit})
	sb.noFast = true
	sb.read(src)
	sm, sds := sb.done(src)
	if !reflect.DeepEqual(fds, sds) {
		return fmt.Sprintf("diagnostics: fast path %v, participle %v", fds, sds), nil
	}
	if !reflect.DeepEqual(fm, sm) {
		return fmt.Sprintf("models differ: fast path\n%s\nparticiple\n%s", dumpModel(fm), dumpModel(sm)), nil
	}
	// Read as a stream, through a buffer that starts at a few bytes (so
	// that lines and line ends straddle its refills and long lines grow
	// it), a byte at a time: the same model and diagnostics.
	for _, r := range []io.Reader{bytes.NewReader(src), iotest.OneByteReader(bytes.NewReader(src))} {
		rb := newBuilder(Options{NodeLimit: fuzzNodeLimit})
		if err := rb.readFrom(r, 3); err != nil {
			return fmt.Sprintf("reading a stream: %v", err), nil
		}
		rm, rds := rb.done(src)
		if !reflect.DeepEqual(rds, fds) {
			return fmt.Sprintf("diagnostics: stream %v, whole text %v", rds, fds), nil
		}
		if !reflect.DeepEqual(rm, fm) {
			return fmt.Sprintf("models differ: stream\n%s\nwhole text\n%s", dumpModel(rm), dumpModel(fm)), nil
		}
	}
	return "", fb.fastRead
}

// dumpModel writes a model's tree with its positions, for messages.
func dumpModel(m *tree.Model) string {
	var b strings.Builder
	for _, p := range m.Params {
		fmt.Fprintf(&b, "let %s = %s at %v\n", p.Name, p.Expr, p.Pos)
	}
	tree.Walk(m.Root, func(n *tree.Node, d int) bool {
		fmt.Fprintf(&b, "%*s%s %q at %v\n", 2*d, "", n.Kind, n.Label, n.Pos)
		for _, br := range n.Branches {
			fmt.Fprintf(&b, "%*s- %q p=%v rest=%v gain=%v cost=%v at %v\n", 2*d+1, "", br.Label, br.Prob, br.Rest, br.Gain, br.Cost, br.Pos)
		}
		return true
	})
	return b.String()
}

// checkLoad reads src and returns what is wrong with the result ("" when
// nothing is).
func checkLoad(src []byte, ps *parsers) string {
	m, ds := Parse(src, Options{NodeLimit: fuzzNodeLimit})
	if m == nil {
		return "nil model"
	}
	if !ds.HasErrors() && m.Root == nil && len(m.Registers) == 0 {
		return "no errors but no tree and no register"
	}
	if !ds.HasErrors() {
		// What reads without errors compiles, or says why not, and
		// what compiles solves (its registers too).
		c, cs := compile(m)
		if (c == nil) != cs.HasErrors() {
			return fmt.Sprintf("compiled %v with errors %v", c != nil, cs)
		}
		if c != nil && c.HasTree() {
			c.Rollback()
		}
		if c != nil {
			if msg := checkRegisters(c); msg != "" {
				return msg
			}
		}
		ds = append(ds, cs...)
	}
	for _, d := range ds {
		if !d.Pos.IsValid() || d.Summary == "" {
			return fmt.Sprintf("diagnostic without position or text: %#v", d)
		}
	}
	var out strings.Builder
	ds.Print(&out, "fuzz.fork", src)
	for _, r := range out.String() {
		if r != '\n' && (r < 0x20 || r >= 0x7f && r < 0xa0) {
			return fmt.Sprintf("a control character %U reaches the printed diagnostics", r)
		}
	}
	placeholder := false
	tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
		placeholder = placeholder || n.Kind == kindUse
		return !placeholder
	})
	if placeholder {
		return "placeholder left in the model"
	}
	if problem, _ := fastAgrees(src); problem != "" {
		return problem
	}
	return ""
}

// FuzzExpr feeds the expression parser alone: any text as a calculation.
// No input may panic or take long; a calculation that reads prints (as
// written, and as tree.Expr renders it) to text that reads back to the
// same calculation; and participle, given the same tokens on a let line,
// reads the same expression as the hand-written parser.
func FuzzExpr(f *testing.F) {
	for _, s := range []string{
		"1", "1 + 2 * 3", "-(a - -b) / 4%", "f(1, g(x), (2))", "((((1))))", "10 - 3 - 2",
		"licence + 60_000 + 20%", "x * (y + z) - 3 / 4", "rest", "-rest * 2",
		"1__0", "1 +", "(1", "a b", "1..2", "%65", "65 %", "f(", "f(1,)", ")",
		strings.Repeat("-", 40) + "1", strings.Repeat("(", 40) + "1" + strings.Repeat(")", 40),
		"1" + strings.Repeat(" + 1", 200), "\"label\" + 1", "1e6", ".5", "5.",
	} {
		f.Add(s)
	}
	ps := getParsers()
	f.Fuzz(func(t *testing.T, text string) {
		if len(text) > fuzzMaxInput {
			t.Skip("larger than the input budget")
		}
		underBudget(t, fuzzExprTime, func() string { return checkExpr(text, ps) })
	})
}

// readExpr reads text as one whole calculation; ok is false when it does
// not read (a lexer error, a syntax error, or tokens left over).
func readExpr(text string) (e exprValue, lx lexed, ok bool) {
	var ds tree.Diagnostics
	lx = lexLine(text, 1, 1, &ds)
	if lx.noParse || lx.lexErr {
		return nil, lx, false
	}
	c := &cursor{toks: lx.toks, eof: lexer.EOFToken(lexer.Position{Line: 1, Column: lx.endCol})}
	e, err := exprOn(c)
	if err != nil || c.i != len(c.toks) {
		return nil, lx, false
	}
	return e, lx, true
}

// checkExpr reads text as a calculation and returns what is wrong with the
// result ("" when nothing is).
func checkExpr(text string, ps *parsers) string {
	e, lx, ok := readExpr(text)

	// Participle on `let x = TEXT`: the same expression, or an error
	// where the hand-written parser stopped too.
	let := append([]lexer.Token{
		{Type: tokIdent, Value: "let", Pos: lexer.Position{Line: 1, Column: 1}},
		{Type: tokIdent, Value: "x", Pos: lexer.Position{Line: 1, Column: 1}},
		{Type: tokPunct, Value: "=", Pos: lexer.Position{Line: 1, Column: 1}},
	}, lx.toks...)
	if !lx.noParse && !lx.lexErr && len(lx.toks) > 0 && !hasToken(lx.toks, "in") {
		g, err := parseWith(ps.let, let, lexer.Position{Line: 1, Column: lx.endCol})
		switch {
		case ok && err != nil:
			return fmt.Sprintf("%q: the parser reads it, participle does not: %v", text, err)
		case !ok && err == nil:
			return fmt.Sprintf("%q: participle reads it, the parser does not", text)
		case ok && !reflect.DeepEqual(g.Value, e):
			return fmt.Sprintf("%q: the parser reads %#v, participle %#v", text, e, g.Value)
		}
	}
	// ParseExpr, the same parser for programs: it reads what the parser
	// reads and lowers without errors, and nothing else; its errors have
	// positions.
	px, pds := ParseExpr(text, tree.Pos{Line: 1, Col: 1})
	if !ok {
		if px != nil || len(pds) == 0 {
			return fmt.Sprintf("%q does not read, but ParseExpr gives %v (%v)", text, px, pds)
		}
		for _, d := range pds {
			if !d.Pos.IsValid() || d.Summary == "" {
				return fmt.Sprintf("%q: ParseExpr diagnostic without position or text: %#v", text, d)
			}
		}
		return ""
	}
	b := &builder{}
	x := b.expr(e, ctxCash, lx)
	rendered := x.String()
	if !b.ds.HasErrors() && (px == nil || px.String() != rendered) {
		return fmt.Sprintf("%q reads as %s, ParseExpr gives %v (%v)", text, rendered, px, pds)
	}

	// As written: the same structure.
	written := exprText(e)
	e2, lx2, ok := readExpr(written)
	if !ok {
		return fmt.Sprintf("%q prints as %q, which does not read", text, written)
	}
	if got := b.expr(e2, ctxCash, lx2).String(); got != rendered {
		return fmt.Sprintf("%q prints as %q, which reads as %s, not %s", text, written, got, rendered)
	}
	// As rendered (fully parenthesised): the same, when its nesting is
	// within the limit the lexer sets.
	var ds tree.Diagnostics
	if lexLine(rendered, 1, 1, &ds).noParse {
		return ""
	}
	e3, lx3, ok := readExpr(rendered)
	if !ok {
		return fmt.Sprintf("%q renders as %q, which does not read", text, rendered)
	}
	if got := b.expr(e3, ctxCash, lx3).String(); got != rendered {
		return fmt.Sprintf("%q renders as %q, which reads as %s", text, rendered, got)
	}
	return ""
}

func hasToken(toks []lexer.Token, v string) bool {
	for _, t := range toks {
		if t.Value == v {
			return true
		}
	}
	return false
}

// checkRegisters analyses the exact parts of every register of c and
// draws each of its totals a few times: nothing may panic, and a total's
// mean must be finite.
func checkRegisters(c *compiled.Model) string {
	for _, r := range c.Source().Registers {
		reg, err := register.FromModel(c, r.Name)
		if err != nil {
			return fmt.Sprintf("register %s compiled but does not convert: %v", r.Name, err)
		}
		for _, responses := range []bool{false, true} {
			tot, err := register.NewTotal(reg, register.TotalOptions{Risk: -1, Responses: responses})
			if err != nil {
				continue // a figure Check refuses (too large to simulate)
			}
			src := rand.NewPCG(1, 2)
			for range 3 {
				if x := tot.Rand(src); math.IsNaN(x) {
					return fmt.Sprintf("register %s drew NaN", r.Name)
				}
			}
		}
	}
	return ""
}
