package fuzzkit

import (
	"strconv"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// NodeLimit is the most nodes FromBytes builds: the node budget of every
// fuzz target that uses it.
const NodeLimit = 48

// byteReader hands out the fuzz input a piece at a time; once it is used
// up every read gives zero, so any input builds a model.
type byteReader struct{ b []byte }

func (r *byteReader) byte() byte {
	if len(r.b) == 0 {
		return 0
	}
	c := r.b[0]
	r.b = r.b[1:]
	return c
}

// str reads a string of up to 63 bytes, exactly as they come: invalid
// UTF-8, control characters and markup included.
func (r *byteReader) str() string {
	n := min(int(r.byte()%64), len(r.b))
	s := string(r.b[:n])
	r.b = r.b[n:]
	return s
}

// cash reads a signed amount with up to 3 decimals and up to 10^6 in
// scale: from -32,768,000,000 to 32,767,000,000.
func (r *byteReader) cash() decimal.Decimal {
	v := int64(int16(uint16(r.byte())<<8 | uint16(r.byte())))
	return decimal.New(v, int32(r.byte()%10)-3)
}

// FromBytes builds a small model of at most NodeLimit nodes from any
// bytes, for the fuzz targets of the renderers: every label (title,
// nodes, branches, currency) is read from the input as it is, so labels
// hold anything; the shape, cash and objective come from it too. Chance
// branches share the probability equally (the last one takes the rest);
// a label repeated among siblings gets its position added, so the model
// always resolves.
func FromBytes(data []byte) *tree.Model {
	r := &byteReader{b: data}
	m := &tree.Model{Title: r.str(), Currency: r.str()}
	if r.byte()%2 == 1 {
		m.Objective = tree.Min
	}
	count := 1
	var build func(depth int) *tree.Node
	build = func(depth int) *tree.Node {
		label := r.str()
		kind := r.byte() % 3
		if kind == 0 || depth >= 6 || count+2 > NodeLimit {
			n := &tree.Node{Kind: tree.KindEnd, Label: label}
			n.Payoff = tree.Num(r.cash())
			return n
		}
		k := 1 + int(r.byte()%4)
		if kind == 2 {
			k = max(k, 2)
		}
		k = min(k, NodeLimit-count)
		count += k
		var n *tree.Node
		if kind == 1 {
			n = tree.Decision(label)
		} else {
			n = tree.Chance(label)
		}
		share := decimal.NewFromInt(1).Div(decimal.NewFromInt(int64(k))).Round(4)
		seen := map[string]bool{}
		for j := range k {
			bl := r.str()
			if seen[bl] {
				bl += " #" + strconv.Itoa(j+1)
			}
			seen[bl] = true
			cash := tree.Gain(tree.Num(r.cash()))
			var next *tree.Node
			if r.byte()%2 == 1 {
				next = build(depth + 1)
			} else {
				count-- // the branch ends at once: no node of its own
			}
			switch {
			case kind == 1:
				n.Branches = append(n.Branches, tree.Choice(bl, cash, next))
			case j == k-1:
				n.Branches = append(n.Branches, tree.RestOutcome(bl, cash, next))
			default:
				n.Branches = append(n.Branches, tree.Outcome(bl, tree.Num(share), cash, next))
			}
		}
		return n
	}
	m.Root = build(0)
	if m.Root.Kind == tree.KindEnd {
		// A tree needs a decision or chance node at its root.
		m.Root = tree.Decision(m.Root.Label, tree.Choice("only", tree.NoCash, nil))
	}
	return m
}

// Analysable builds, from any bytes, a small valid model for the fuzz
// targets of the analyses: FromBytes's tree under a root decision that
// also offers a branch on a named uncertainty and a branch that runs a
// test of it first, with two inputs (`x`, money with a range, read by
// cash; `p`, a probability with a range, the uncertainty's first prior).
// Labels are plain, so that the model always compiles.
func Analysable(data []byte) *tree.Model {
	r := &byteReader{b: data}
	m := &tree.Model{}
	if r.byte()%2 == 1 {
		m.Objective = tree.Min
	}
	x := r.cash()
	p := decimal.New(int64(1+r.byte()%98), -2)
	m.Params = []*tree.Param{
		tree.Input("x", tree.Num(x)).Within(tree.Num(x.Sub(decimal.NewFromInt(int64(1+r.byte())))), tree.Num(x.Add(decimal.NewFromInt(int64(1+r.byte()))))),
		tree.Input("p", tree.Num(p)).Within(tree.Num(decimal.New(1, -2)), tree.Num(decimal.New(99, -2))),
	}
	like := func() tree.Expr { return tree.Num(decimal.New(int64(r.byte()%101), -2)) }
	m.Uncertainties = []*tree.Uncertainty{tree.NewUncertainty("u", "", tree.StateP("Hi", tree.Ref("p")), tree.RestState("Lo"))}
	m.Tests = []*tree.Test{tree.NewTest("t", "", "u", tree.Num(r.cash().Abs()),
		tree.ReadingIf("Yes", tree.If("Hi", like()), tree.If("Lo", like())), tree.RestReading("No"))}
	money := func() tree.Cash {
		switch r.byte() % 3 {
		case 0:
			return tree.Gain(tree.Num(r.cash()))
		case 1:
			return tree.Gain(&tree.Binary{Op: '*', X: tree.Ref("x"), Y: tree.Num(decimal.New(int64(r.byte()%7)+1, 0))})
		}
		return tree.Cost(tree.Ref("x"))
	}
	// The same choice, with the same money, stands after every reading of
	// the test and without it: a test changes what is known, not what is
	// on offer.
	goCash, hiCash, loCash, stopCash := money(), money(), money(), money()
	act := func() *tree.Node {
		return tree.Decision("Act",
			tree.Choice("Go", goCash, tree.ChanceOn("u", tree.Given("Hi", hiCash, nil), tree.Given("Lo", loCash, nil))),
			tree.Choice("Stop", stopCash, nil))
	}
	plain := FromBytes(r.b)
	relabel(plain.Root)
	m.Root = tree.Decision("Root",
		tree.Choice("Plain", money(), plain.Root),
		tree.Choice("Now", tree.NoCash, act()),
		tree.Choice("Test", tree.NoCash, tree.RunTest("t", tree.Given("Yes", tree.NoCash, act()), tree.Given("No", tree.NoCash, act()))))
	return m
}

// relabel gives every node and branch of FromBytes's tree a plain label,
// unique among its siblings, so that the analyses can name them.
func relabel(n *tree.Node) {
	tree.Walk(n, func(n *tree.Node, depth int) bool {
		n.Label = "n" + strconv.Itoa(depth)
		for j, b := range n.Branches {
			b.Label = "b" + strconv.Itoa(j)
		}
		return true
	})
}
