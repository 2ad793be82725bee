package interchange

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode/utf8"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Solved is what `solve --json` adds to every node: its expected value and,
// on a decision, its optimal branches. Nodes are numbered as the compiled
// form numbers them (the root is 0).
type Solved interface {
	// Value is the expected value from node i on, in the objective's
	// terms.
	Value(i int) decimal.Decimal
	// Best lists the optimal branches of decision i, in model order.
	Best(i int) []int
}

// WriteOptions control Write. The zero value writes the model as written.
type WriteOptions struct {
	// Compiled is the model's compiled form (compiled from the model
	// written). Where a setting gave a figure a value of its own (an input
	// fixed or a probability pinned by compiled.Model.With), that value is
	// written in place of the expression, so that the output reads back as
	// the model Compiled stands for. Solved and Probabilities need it.
	Compiled *compiled.Model
	// Solved annotates every node with its value, every decision with its
	// optimal branches and the top level with the root's value (and
	// "exact": false when a figure was rounded).
	Solved Solved
	// Risk, with Solved, adds at the top level what a solve on certainty
	// equivalents reports (Solved then annotates the risk-averse policy).
	Risk *RiskSummary
	// Probabilities writes the probability of every branch under a named
	// uncertainty or a test, as the declarations give it there (revised by
	// Bayes' rule below a test reading). The reader accepts such a
	// probability when it is the one the declarations give, so the output
	// reads back.
	Probabilities bool
}

// RiskSummary is what `solve --json` adds at the top level under a risk
// tolerance: "risk_tolerance" (the one used, which may come from the
// command line), "certainty_equivalent" and "risk_premium" (rounded),
// "expected_value_policy_value" and "cost_of_caution" (exact), and
// "risk_note" saying which figures are rounded. The reader skips all but
// "risk_tolerance".
type RiskSummary struct {
	Tolerance                        decimal.Decimal
	CertaintyEquivalent, RiskPremium decimal.Decimal
	EVPolicyValue, CostOfCaution     decimal.Decimal
	Note                             string
}

// Write writes m in the JSON interchange format (docs/json.md): every input
// with its range, every uncertainty and test, and every figure as written —
// a plain number as a JSON number, a calculation as a string in the text
// language's syntax — so that what Read reads back is the same model.
// Branches keep "gain" and "cost" apart; an end node's own value is its
// "payoff", in the objective's terms.
//
// A tree nested deeper than MaxNesting allows is refused with an error
// before anything is written.
func Write(w io.Writer, m *tree.Model, opts WriteOptions) error {
	c := opts.Compiled
	switch {
	case c != nil && c.Source() != m:
		return errors.New("interchange: WriteOptions.Compiled is not compiled from the model written")
	case c == nil && (opts.Solved != nil || opts.Probabilities):
		return errors.New("interchange: WriteOptions.Solved and Probabilities need the compiled model (WriteOptions.Compiled)")
	}
	depth := 0
	tree.Walk(m.Root, func(_ *tree.Node, d int) bool { depth = max(depth, d); return true })
	if 3*depth+5 > MaxNesting {
		return fmt.Errorf("the tree is %s nodes deep; the JSON interchange carries trees at most %s deep", grouped(depth+1), grouped((MaxNesting-5)/3+1))
	}
	bw := bufio.NewWriter(w)
	jw := &writer{w: bw, m: m, c: c, opts: opts}
	if c != nil {
		jw.inputs = c.Inputs()
	}
	jw.model()
	if jw.err != nil {
		return jw.err
	}
	return bw.Flush()
}

type writer struct {
	w      *bufio.Writer
	m      *tree.Model
	c      *compiled.Model
	opts   WriteOptions
	inputs []compiled.Input
	indent int
	inline int  // inside an object written on one line
	first  bool // no member written yet in the object just opened
	err    error
}

// maxIndent caps the indentation, so that a very deep tree is written in
// linear space (a 100,000-level chain would otherwise need gigabytes).
const maxIndent = 32

// spaces is the indentation at the deepest level written.
const spaces = "                                                                "

func (j *writer) nl() {
	j.w.WriteByte('\n')
	j.w.WriteString(spaces[:2*min(j.indent, maxIndent)])
}

func (j *writer) open(c byte) {
	j.w.WriteByte(c)
	j.indent++
	j.first = true
}

func (j *writer) close(c byte) {
	j.indent--
	if !j.first {
		j.nl()
	}
	j.w.WriteByte(c)
	j.first = false
}

// key starts a member of the object being written.
func (j *writer) key(k string) {
	switch {
	case j.inline > 0 && !j.first:
		j.w.WriteString(", ")
	case j.inline > 0:
	case !j.first:
		j.w.WriteByte(',')
		j.nl()
	default:
		j.nl()
	}
	j.first = false
	j.quote(k)
	j.w.WriteString(": ")
}

// item starts an element of the array being written.
func (j *writer) item() {
	if !j.first {
		j.w.WriteByte(',')
	}
	j.first = false
	j.nl()
}

// str writes a string member, left out when empty.
func (j *writer) str(k, v string) {
	if v != "" {
		j.key(k)
		j.quote(v)
	}
}

// must writes a string member the reader requires, even when empty.
func (j *writer) must(k, v string) {
	j.key(k)
	j.quote(v)
}

// raw writes a member whose value is already JSON.
func (j *writer) raw(k, v string) {
	j.key(k)
	j.w.WriteString(v)
}

// fig writes a figure member, left out when x is nil.
func (j *writer) fig(k string, x tree.Expr) {
	if x != nil {
		j.key(k)
		j.figure(x)
	}
}

// figure writes a figure: a number as a JSON number, anything else as the
// calculation in the text language's syntax.
func (j *writer) figure(x tree.Expr) {
	switch e := x.(type) {
	case *tree.Number:
		j.number(e.Value())
		return
	case *tree.Unary:
		if n, ok := e.X.(*tree.Number); ok && e.Op == '-' {
			j.number(n.Value().Neg())
			return
		}
	}
	j.quote(exprText(x))
}

// number writes an exact decimal as a JSON number.
func (j *writer) number(d decimal.Decimal) {
	j.w.WriteString(d.String())
}

// value writes a figure that a setting gave (an input fixed, a probability
// pinned): it must read back, so it may not have more digits than a figure
// may.
func (j *writer) value(d decimal.Decimal, what string) {
	if n := digitCount(d); n > lang.MaxDigits && j.err == nil {
		j.err = fmt.Errorf("%s is %s, which has %d digits; the JSON interchange carries figures of at most %d", what, d.String(), n, lang.MaxDigits)
	}
	j.number(d)
}

// digitCount is the number of digits d has written out in full.
func digitCount(d decimal.Decimal) int {
	n := 0
	for _, c := range d.String() {
		if c >= '0' && c <= '9' {
			n++
		}
	}
	return n
}

// exprText is a calculation in the text language's syntax, without the
// parentheses around the whole of it.
func exprText(x tree.Expr) string {
	s := x.String()
	if _, ok := x.(*tree.Binary); ok && len(s) >= 2 {
		s = s[1 : len(s)-1]
	}
	return s
}

// quote writes s as a JSON string. Control characters, bidirectional
// formatting characters and the line and paragraph separators are written
// as escapes, so the output is safe to show on a terminal; bytes that are
// not UTF-8 become U+FFFD.
func (j *writer) quote(s string) {
	w := j.w
	w.WriteByte('"')
	start := 0
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf && c >= 0x20 && c != '"' && c != '\\' && c != 0x7f {
			i++
			continue
		}
		r, size := rune(c), 1
		if c >= utf8.RuneSelf {
			r, size = utf8.DecodeRuneInString(s[i:])
			if !(r == utf8.RuneError && size == 1) && !escapedRune(r) {
				i += size
				continue
			}
		}
		w.WriteString(s[start:i])
		switch {
		case c == '"' || c == '\\':
			w.WriteByte('\\')
			w.WriteByte(c)
		case c == '\n':
			w.WriteString(`\n`)
		case c == '\t':
			w.WriteString(`\t`)
		case c == '\r':
			w.WriteString(`\r`)
		case r == utf8.RuneError:
			w.WriteString(`\ufffd`)
		default:
			w.WriteString(`\u`)
			h := strconv.FormatInt(int64(r), 16)
			w.WriteString(strings.Repeat("0", 4-len(h)) + h)
		}
		i += size
		start = i
	}
	w.WriteString(s[start:])
	w.WriteByte('"')
}

// escapedRune reports whether a character beyond ASCII is written as an
// escape: C1 controls, bidirectional formatting, line and paragraph
// separators.
func escapedRune(r rune) bool {
	switch {
	case r >= 0x80 && r < 0xa0, r == 0x2028, r == 0x2029:
		return true
	case r == 0x200e, r == 0x200f, r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069:
		return true
	}
	return false
}

func (j *writer) model() {
	m, c, sv := j.m, j.c, j.opts.Solved
	j.open('{')
	j.str("title", m.Title)
	j.str("currency", m.Currency)
	j.str("objective", m.Objective.String())
	switch rk := j.opts.Risk; {
	case rk != nil && sv != nil:
		j.key("risk_tolerance")
		j.value(rk.Tolerance, "the risk tolerance")
	case m.RiskTolerance != nil:
		j.key("risk_tolerance")
		j.value(m.RiskTolerance.Value(), "the risk tolerance")
	}
	if sv != nil && m.Root != nil {
		j.key("value")
		j.quote(sv.Value(0).String())
		if !c.Exact() {
			j.raw("exact", "false") // a division was rounded: say so
		}
		if rk := j.opts.Risk; rk != nil {
			for _, kv := range []struct {
				k string
				v decimal.Decimal
			}{{"certainty_equivalent", rk.CertaintyEquivalent}, {"risk_premium", rk.RiskPremium},
				{"expected_value_policy_value", rk.EVPolicyValue}, {"cost_of_caution", rk.CostOfCaution}} {
				j.key(kv.k)
				j.quote(kv.v.String())
			}
			j.str("risk_note", rk.Note)
		}
	}
	if len(m.Params) > 0 {
		j.key("inputs")
		j.open('[')
		for i, p := range m.Params {
			j.item()
			j.open('{')
			j.must("name", p.Name)
			if j.inputs != nil && j.inputs[i].Fixed {
				j.key("value")
				j.value(j.inputs[i].Value, fmt.Sprintf("input %q", p.Name))
			} else {
				j.fig("value", p.Expr)
			}
			if p.HasRange() {
				j.fig("low", p.Low)
				j.fig("high", p.High)
			}
			j.close('}')
		}
		j.close(']')
	}
	if len(m.Uncertainties) > 0 {
		j.key("uncertainties")
		j.open('[')
		for u, un := range m.Uncertainties {
			j.item()
			j.open('{')
			j.must("name", un.Name)
			j.str("label", un.Label)
			j.key("states")
			j.open('[')
			for s, st := range un.States {
				j.item()
				j.inlineObject(func() {
					j.must("label", st.Label)
					j.key("probability")
					switch {
					case c != nil && c.PriorPinned(u, s):
						j.value(c.Prior(u, s), fmt.Sprintf("the prior of %q", st.Label))
					case st.Prob == nil:
						j.quote("rest")
					default:
						j.figure(st.Prob)
					}
				})
			}
			j.close(']')
			j.close('}')
		}
		j.close(']')
	}
	if len(m.Tests) > 0 {
		j.key("tests")
		j.open('[')
		for _, t := range m.Tests {
			j.item()
			j.open('{')
			j.must("name", t.Name)
			j.str("label", t.Label)
			j.must("on", t.On)
			j.fig("cost", t.Cost)
			j.key("readings")
			j.open('[')
			for _, rd := range t.Readings {
				j.item()
				j.inlineObject(func() {
					j.must("label", rd.Label)
					j.key("likelihoods")
					j.w.WriteByte('[')
					for k, l := range rd.Given {
						if k > 0 {
							j.w.WriteString(", ")
						}
						j.inlineObject(func() {
							j.must("state", l.State)
							j.fig("probability", l.Prob)
						})
					}
					j.w.WriteByte(']')
					if rd.Rest {
						j.raw("rest", "true")
					}
				})
			}
			j.close(']')
			j.close('}')
		}
		j.close(']')
	}
	if len(m.Correlations) > 0 {
		j.key("correlations")
		j.open('[')
		for _, cr := range m.Correlations {
			j.item()
			j.inlineObject(func() {
				j.must("a", cr.A)
				j.must("b", cr.B)
				j.fig("rho", cr.Rho)
			})
		}
		j.close(']')
	}
	if m.Root != nil {
		j.key("root")
		j.tree()
	}
	j.close('}')
	j.w.WriteByte('\n')
}

// inline writes a short object on one line: {"k": v, ...}.
func (j *writer) inlineObject(body func()) {
	j.w.WriteByte('{')
	j.first = true
	j.inline++
	body()
	j.inline--
	j.w.WriteByte('}')
	j.first = false
}

// wnode is a node of the tree being written, with the compiled number of
// the node and the next branch to write.
type wnode struct {
	n    *tree.Node
	i    int
	next int
}

// tree writes the tree under "root", iteratively: a stack of nodes whose
// branches are being written.
func (j *writer) tree() {
	var stack []wnode
	if j.node(j.m.Root, 0) {
		stack = append(stack, wnode{n: j.m.Root})
	}
	for len(stack) > 0 {
		f := &stack[len(stack)-1]
		if f.next > 0 {
			j.close('}') // the branch written last
		}
		if f.next == len(f.n.Branches) {
			j.close(']')
			j.close('}')
			stack = stack[:len(stack)-1]
			continue
		}
		k := f.next
		f.next++
		b := f.n.Branches[k]
		ci := 0
		if j.c != nil {
			ci = j.c.Child(f.i, k)
		}
		j.item()
		j.open('{')
		j.must("label", b.Label)
		j.branchProb(f.n, b, ci)
		j.fig("gain", b.Gain)
		j.fig("cost", b.Cost)
		child := b.Node
		switch {
		case child == nil && j.opts.Solved != nil:
			// Solved output carries a value on every node, the end a
			// branch with nothing under it leads to included.
			child = &tree.Node{Kind: tree.KindEnd}
		case child != nil && j.opts.Solved == nil && plainEnd(child):
			child = nil // the reader puts it back
		}
		if child != nil {
			j.key("node")
			if j.node(child, ci) {
				stack = append(stack, wnode{n: child, i: ci})
			}
		}
	}
}

// plainEnd is an end node with nothing to say: the writer leaves it out.
func plainEnd(n *tree.Node) bool {
	return n.Kind == tree.KindEnd && n.Label == "" && n.Payoff == nil && len(n.Branches) == 0
}

// branchProb writes a branch's probability: as written (a figure or
// "rest"), a value a setting gave it, or, under a named uncertainty or a
// test when asked for, the one the declarations give there.
func (j *writer) branchProb(n *tree.Node, b *tree.Branch, ci int) {
	c := j.c
	chance := n.Kind == tree.KindChance
	named := n.Uncertainty != "" || n.Test != ""
	switch {
	case chance && named && j.opts.Probabilities:
		// Written when it reads back; a probability with more digits than
		// a figure may have is left out (it is recomputed anyway).
		if p := c.Prob(ci); digitCount(p) <= lang.MaxDigits {
			j.raw("probability", p.String())
		}
	case chance && !named && c != nil && c.Pinned(ci):
		j.key("probability")
		j.value(c.Prob(ci), fmt.Sprintf("the probability of %q", b.Label))
	case b.Rest:
		j.raw("probability", `"rest"`)
	default:
		j.fig("probability", b.Prob)
	}
}

// node opens node n (compiled number i) and writes its members up to its
// branches; it reports whether it has branches to write (then "branches"
// is open), and otherwise closes the node.
func (j *writer) node(n *tree.Node, i int) bool {
	sv, obj := j.opts.Solved, j.m.Objective
	j.open('{')
	j.str("type", n.Kind.String())
	j.str("label", n.Label)
	j.str("uncertainty", n.Uncertainty)
	j.str("test", n.Test)
	if sp := n.Split; sp != nil {
		j.key("split")
		j.inlineObject(func() {
			j.must("input", sp.Input)
			j.must("rule", sp.Rule.String())
		})
	}
	if n.Payoff != nil {
		// Held as net value; written in the objective's terms.
		j.fig("payoff", obj.FigureExpr(n.Payoff))
	}
	if sv != nil {
		j.key("value")
		j.quote(sv.Value(i).String())
		if n.Kind == tree.KindDecision {
			j.key("best")
			j.w.WriteByte('[')
			for k, b := range sv.Best(i) {
				if k > 0 {
					j.w.WriteString(", ")
				}
				j.quote(n.Branches[b].Label)
			}
			j.w.WriteByte(']')
		}
	}
	if len(n.Branches) == 0 {
		j.close('}')
		return false
	}
	j.key("branches")
	j.open('[')
	return true
}
