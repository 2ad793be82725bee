package lang

import (
	"cmp"
	"fmt"
	"hash/maphash"
	"slices"
	"strings"
	"unicode"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Checks of the model as written for things that read but are almost
// certainly not meant: they need the expressions as the user wrote them
// (a percent literal, a bound without its %), which the lowered model no
// longer shows.

// term is one term of a sum as written, with its sign.
type term struct {
	x   exprValue
	neg bool
}

// sumTerms flattens the top-level sum of e: a + b - (c + d) gives a, b,
// -c, -d. Parentheses around a sum are looked through; products, calls and
// minus signs are terms of their own.
func sumTerms(e exprValue, neg bool, out []term) []term {
	switch x := e.(type) {
	case *eParen:
		return sumTerms(x.X, neg, out)
	case *eBin:
		switch x.Op.Value {
		case "+":
			return sumTerms(x.Y, neg, sumTerms(x.X, neg, out))
		case "-":
			return sumTerms(x.Y, !neg, sumTerms(x.X, neg, out))
		}
	}
	return append(out, term{e, neg})
}

// isPercent reports whether e is a number written with %.
func isPercent(e exprValue) (*eNum, bool) {
	n, ok := e.(*eNum)
	return n, ok && strings.HasSuffix(n.Tok.Value, "%")
}

// percentAdded is a bare percentage added to (or taken from) other terms:
// licence + 20% adds 0.2, where 20% more (licence * 120%) is meant.
type percentAdded struct {
	pct    *eNum
	width  int
	neg    bool
	others []term
}

// findPercentAdded returns the first bare percentage among the terms of
// e's sum, when the sum also has terms that are not percentages.
func findPercentAdded(e exprValue, lx lexed) *percentAdded {
	if _, isSum := e.(*eBin); !isSum {
		if _, isParen := e.(*eParen); !isParen {
			return nil // the common case: a single number or name
		}
	}
	ts := sumTerms(e, false, nil)
	var p *percentAdded
	var others []term
	for _, t := range ts {
		if n, ok := isPercent(t.x); ok {
			if p == nil {
				p = &percentAdded{pct: n, width: tokWidth(lx, n.Tok), neg: t.neg}
			}
			continue
		}
		others = append(others, t)
	}
	if p == nil || len(others) == 0 {
		return nil
	}
	p.others = others
	return p
}

// warnPercentAdded warns about a bare percentage added to money. prefix is
// what the hint writes before the corrected amount ("cost ", "let x = ").
func (b *builder) warnPercentAdded(p *percentAdded, prefix string) {
	v, msg, _ := parseNumber(p.pct.Tok.Value)
	if msg != "" {
		return // reported as a bad number
	}
	factor := decimal.NewFromInt(1).Add(v)
	if p.neg {
		factor = decimal.NewFromInt(1).Sub(v)
	}
	var rest strings.Builder
	for i, t := range p.others {
		switch {
		case i == 0 && t.neg:
			rest.WriteString("-")
		case i > 0 && t.neg:
			rest.WriteString(" - ")
		case i > 0:
			rest.WriteString(" + ")
		}
		rest.WriteString(exprText(t.x))
	}
	base := rest.String()
	if len(p.others) > 1 || p.others[0].neg {
		base = "(" + base + ")"
	}
	what := fmt.Sprintf("to add %s to the amount", p.pct.Tok.Value)
	if p.neg {
		what = fmt.Sprintf("to take %s off the amount", p.pct.Tok.Value)
	}
	hint := fmt.Sprintf("%s, multiply: %s%s * %s%%; if %s is really meant, write it as a number", what, prefix, base, factor.Shift(2).String(), v.String())
	if !factor.IsPositive() {
		hint = fmt.Sprintf("a percentage of an amount is written as a product, such as %s * %s; if %s is really meant, write it as a number", base, p.pct.Tok.Value, v.String())
	}
	summary := fmt.Sprintf("a bare %s added to an amount of money adds just %s", p.pct.Tok.Value, v.String())
	if p.neg {
		summary = fmt.Sprintf("a bare %s taken from an amount of money takes off just %s", p.pct.Tok.Value, v.String())
	}
	b.ds = append(b.ds, tree.Diagnostic{Severity: tree.Warning, Pos: tokPos(p.pct.Tok), Len: p.width, Summary: summary, Hint: hint})
}

// percentLet is a let whose value adds a bare percentage; it is warned
// about if the let is used as an amount of money.
type percentLet struct {
	name  string
	p     *percentAdded
	money bool
}

// exprText renders an expression as written (spacing normalised).
func exprText(e exprValue) string {
	switch x := e.(type) {
	case *eNum:
		return x.Tok.Value
	case *eRest:
		return "rest"
	case *eName:
		return x.Tok.Value
	case *eCall:
		args := make([]string, len(x.Args))
		for i, a := range x.Args {
			args[i] = exprText(a)
		}
		return x.Name.Value + "(" + strings.Join(args, ", ") + ")"
	case *eParen:
		return "(" + exprText(x.X) + ")"
	case *eNeg:
		return "-" + exprText(x.X)
	case *eBin:
		return exprText(x.X) + " " + x.Op.Value + " " + exprText(x.Y)
	}
	return ""
}

// rangePercent reports a range whose bounds mix a percent and a plain
// number when the plain one is most likely missing its %: the range runs
// downwards as written, as in `in 5 .. 40%` (5 down to 0.4), or the value
// is a percent and the plain bound is above 1, as in `= 10% in 2% .. 25`;
// and with the % the range would be in order.
func (b *builder) rangePercent(name string, value, lo, hi exprValue, lx lexed) {
	ln, ok1 := lo.(*eNum)
	hn, ok2 := hi.(*eNum)
	if !ok1 || !ok2 {
		return
	}
	_, lp := isPercent(ln)
	_, hp := isPercent(hn)
	if lp == hp {
		return
	}
	lv, m1, _ := parseNumber(ln.Tok.Value)
	hv, m2, _ := parseNumber(hn.Tok.Value)
	bare := ln
	if lp {
		bare = hn
	}
	bv, _, _ := parseNumber(bare.Tok.Value)
	_, valuePercent := isPercent(value)
	if m1 != "" || m2 != "" || !lv.GreaterThan(hv) && !(valuePercent && bv.GreaterThan(decimal.NewFromInt(1))) {
		return
	}
	if lp {
		hv = bv.Shift(-2)
	} else {
		lv = bv.Shift(-2)
	}
	if lv.GreaterThan(hv) {
		return // not just the missing %: compiling says the range runs downwards
	}
	fixed := func(n *eNum) string {
		if n == bare {
			return n.Tok.Value + "%"
		}
		return n.Tok.Value
	}
	b.errAt(tokPos(bare.Tok), tokWidth(lx, bare.Tok), fmt.Sprintf("write in %s .. %s", fixed(ln), fixed(hn)),
		"the range of %q mixes %s with %s: the %% is missing on %s", name, ln.Tok.Value, hn.Tok.Value, bare.Tok.Value)
}

// plainChance is a plain chance node as written (main tree or subtree),
// for repeatedChance.
type plainChance struct {
	n     *tree.Node
	line  int32
	width int32
}

// repeatedChance warns when plain chance nodes with the same label have
// the same outcomes and probabilities. They are most likely one event
// written twice; as plain nodes, value-of-information analysis takes them
// as independent events, which overstates what information is worth.
// One warning a label is enough to make the point, and once it is given
// the label's other nodes are not looked at: a generated model with
// thousands of copies of one chance node costs next to nothing.
func (b *builder) repeatedChance() {
	if len(b.chances) < 2 {
		return
	}
	// maxKinds bounds the distinct outcome sets compared under one label:
	// a label reused on purpose for many different nodes is left alone,
	// and the work stays linear.
	const maxKinds = 8
	type label struct {
		kinds  []*chanceOutcomes
		lines  []int
		warned bool
	}
	// Only labels met more than once can repeat: find them by sorting
	// the nodes by a hash of their label (most labels of a large model are
	// unique, and a map entry for each would cost more than the rest of
	// the check; sorting hashes reads no label again). Nodes whose hashes
	// are equal are then compared by label, which a rare collision of two
	// labels' hashes cannot fool.
	type keyed struct {
		h uint64
		i int32
	}
	seed := maphash.MakeSeed()
	keys := make([]keyed, 0, len(b.chances))
	for i := range b.chances {
		if c := &b.chances[i]; c.n.Label != "" && len(c.n.Branches) >= 2 {
			keys = append(keys, keyed{maphash.String(seed, c.n.Label), int32(i)})
		}
	}
	slices.SortFunc(keys, func(x, y keyed) int { return cmp.Compare(x.h, y.h) })
	repeated := make([]bool, len(b.chances))
	for lo := 0; lo < len(keys); {
		hi := lo + 1
		for hi < len(keys) && keys[hi].h == keys[lo].h {
			hi++
		}
		// A node already marked was marked with every later node of its
		// label, by the first of them: a label on thousands of nodes is
		// one pass.
		for x := lo; x < hi; x++ {
			if repeated[keys[x].i] {
				continue
			}
			for y := x + 1; y < hi; y++ {
				if b.chances[keys[x].i].n.Label == b.chances[keys[y].i].n.Label {
					repeated[keys[x].i], repeated[keys[y].i] = true, true
				}
			}
		}
		lo = hi
	}
	labels := map[string]*label{}
	for i := range b.chances {
		if !repeated[i] {
			continue
		}
		c := &b.chances[i]
		l := labels[c.n.Label]
		if l == nil {
			l = &label{}
			labels[c.n.Label] = l
		}
		if l.warned {
			continue
		}
		o := newChanceOutcomes(c.n)
		k := -1
		for j, x := range l.kinds {
			if x.same(o) {
				k = j
				break
			}
		}
		if k < 0 {
			if len(l.kinds) < maxKinds {
				l.kinds = append(l.kinds, o)
				l.lines = append(l.lines, int(c.line))
			}
			continue
		}
		l.warned = true
		name := uncertaintyName(c.n.Label)
		hint := fmt.Sprintf("if they are one event, declare it once as a named uncertainty (`uncertainty %s %q` with the outcomes as its states) and write `chance %s` at each place: "+
			"as plain chance nodes, value-of-information analysis treats them as independent events; if they are separate events, give them different labels", name, c.n.Label, name)
		b.ds = append(b.ds, tree.Diagnostic{Severity: tree.Warning, Pos: c.n.Pos, Len: int(c.width), Hint: hint,
			Summary: fmt.Sprintf("chance node %q repeats the one on line %d, with the same outcomes and probabilities", c.n.Label, l.lines[k])})
	}
}

// chanceOutcomes is a plain chance node's branches, for comparing outcome
// sets without building keys.
type chanceOutcomes struct {
	n      *tree.Node
	sorted []*tree.Branch   // in label order, made when needed
	rest   *decimal.Decimal // the value of its `rest`, computed when needed
	bad    bool             // rest cannot be valued (the others are not all numbers)
}

func newChanceOutcomes(n *tree.Node) *chanceOutcomes { return &chanceOutcomes{n: n} }

// byLabel returns the branches in label order.
func (o *chanceOutcomes) byLabel() []*tree.Branch {
	if o.sorted == nil {
		o.sorted = slices.Clone(o.n.Branches)
		slices.SortFunc(o.sorted, byBranchLabel)
	}
	return o.sorted
}

func byBranchLabel(x, y *tree.Branch) int { return strings.Compare(x.Label, y.Label) }

// restValue is 1 minus the other branches' probabilities, when they are
// all numbers.
func (o *chanceOutcomes) restValue() (decimal.Decimal, bool) {
	if o.rest == nil && !o.bad {
		sum := decimal.Zero
		for _, br := range o.n.Branches {
			if br.Rest {
				continue
			}
			n, ok := br.Prob.(*tree.Number)
			if !ok {
				o.bad = true
				break
			}
			sum = sum.Add(n.Value())
		}
		r := decimal.NewFromInt(1).Sub(sum)
		o.rest = &r
	}
	return *o.rest, !o.bad
}

// same reports whether two chance nodes have the same outcome labels with
// the same probabilities (30% and 0.3 are the same; so are 40% and a
// `rest` that leaves 40%).
func (o *chanceOutcomes) same(p *chanceOutcomes) bool {
	ob, pb := o.n.Branches, p.n.Branches
	if len(ob) != len(pb) {
		return false
	}
	// Most often the outcomes are written in one order; if not, compare
	// them in label order.
	for i, x := range ob {
		if x.Label != pb[i].Label {
			ob, pb = o.byLabel(), p.byLabel()
			break
		}
	}
	for i, x := range ob {
		if x.Label != pb[i].Label {
			return false
		}
	}
	for i, x := range ob {
		y := pb[i]
		switch {
		case x.Rest && y.Rest:
		case x.Rest || y.Rest:
			r, ok := o.restValue()
			other := y.Prob
			if y.Rest {
				r, ok = p.restValue()
				other = x.Prob
			}
			n, isNum := other.(*tree.Number)
			if !ok || !isNum || !n.Value().Equal(r) {
				return false
			}
		default:
			xn, ok1 := x.Prob.(*tree.Number)
			yn, ok2 := y.Prob.(*tree.Number)
			switch {
			case ok1 && ok2:
				if !xn.Value().Equal(yn.Value()) {
					return false
				}
			case x.Prob == nil || y.Prob == nil || exprKey(x.Prob) != exprKey(y.Prob):
				return false
			}
		}
	}
	return true
}

// exprKey is an expression's value as written, with numbers compared by
// value (30% and 0.3 are the same).
func exprKey(e tree.Expr) string {
	switch x := e.(type) {
	case *tree.Number:
		return x.Value().String()
	case *tree.Name:
		return x.Name
	case *tree.Unary:
		return "-" + exprKey(x.X)
	case *tree.Binary:
		return "(" + exprKey(x.X) + string(x.Op) + exprKey(x.Y) + ")"
	case *tree.Call:
		args := make([]string, len(x.Args))
		for i, a := range x.Args {
			args[i] = exprKey(a)
		}
		return x.Func + "(" + strings.Join(args, ",") + ")"
	}
	return ""
}

// uncertaintyName proposes a name for an uncertainty from a label:
// "Market demand" gives market_demand.
func uncertaintyName(label string) string {
	var b strings.Builder
	under := false
	for _, r := range strings.ToLower(label) {
		if unicode.IsLetter(r) || unicode.IsDigit(r) {
			if under && b.Len() > 0 {
				b.WriteByte('_')
			}
			under = false
			b.WriteRune(r)
			continue
		}
		under = true
	}
	s := b.String()
	if s == "" || reserved[s] || lineKinds[s] != kNone || unicode.IsDigit([]rune(s)[0]) {
		return "NAME"
	}
	return s
}
