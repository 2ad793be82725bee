package lang

import (
	"strings"

	"github.com/forkcast/forkcast/tree"
)

// A split is `chance NAME by swanson` (or `by pearson`): a chance node of
// three branches, the percentiles of the input NAME by a three-point rule,
// with one node indented under it that each branch leads to, NAME taking
// that branch's value in it (tree.Split; compiled checks NAME and gives
// the values). While reading, the node holds one unlabelled branch to the
// node under it; once every `use` is expanded, splitOut makes the three
// branches, each with its own copy of that node. The node limit counts the
// copies.

// splitRules are the words after `by`.
var splitRules = map[string]tree.SplitRule{"swanson": tree.SwansonMegill, "pearson": tree.PearsonTukey}

// splitLine reads `chance NAME ["Label"] by RULE` and places it.
func (b *builder) splitLine(l *srcLine, g *gChance, parent *frame, quiet bool) *frame {
	n := &tree.Node{Kind: tree.KindChance, Pos: tokPos(g.Kw)}
	form := "a three-point chance node reads `chance NAME by swanson` or `chance NAME by pearson`, NAME an input written as a distribution"
	if g.Name == nil {
		b.errAt(tokPos(*g.By), tokWidth(l.lx, *g.By), form, "`by` needs the input to split before it")
	}
	rule, ok := splitRules[g.Rule.Value]
	if !ok {
		b.errAt(tokPos(*g.Rule), tokWidth(l.lx, *g.Rule),
			"`by swanson`: P10, P50, P90 with probabilities 30%, 40%, 30%; `by pearson`: P5, P50, P95 with 18.5%, 63%, 18.5%",
			"unknown three-point rule %q", shorten(g.Rule.Value))
		rule = tree.SwansonMegill
	}
	if g.Label != nil {
		n.Label = b.labelTok(l, *g.Label)
	}
	n.Split = &tree.Split{Rule: rule}
	b.splits++
	if g.Name != nil {
		n.Split.Input, n.Split.InputPos = g.Name.Value, tokPos(*g.Name)
		if n.Label == "" {
			n.Label = tree.SplitLabel(n.Split.Input, rule)
		}
	}
	body := &tree.Branch{Pos: n.Pos}
	n.Branches = []*tree.Branch{body}
	f := b.placeNode(&l.lineHead, parent, n, "chance", n.Split.Input, g.Label != nil, quiet)
	if f.kind == fNode {
		f.kind, f.branch, f.split = fBranch, body, true
	}
	return f
}

// splitLabels names a split's branches for messages.
func splitLabels(n *tree.Node) string {
	rule := tree.SwansonMegill
	if n != nil && n.Split != nil {
		rule = n.Split.Rule
	}
	labels, _, _ := rule.Points()
	return strings.Join(labels[:], ", ")
}

// isSplitHolder reports whether n is a split still holding the one
// branch to the node under it.
func isSplitHolder(n *tree.Node) bool {
	return n.Split != nil && len(n.Branches) == 1 && n.Branches[0].Label == ""
}

// splitOut gives every split in the tree its three branches.
func (b *builder) splitOut() {
	if b.m.Root == nil || b.splits == 0 {
		return
	}
	stack := []*tree.Node{b.m.Root}
	for len(stack) > 0 {
		n := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if isSplitHolder(n) {
			n.Branches = tree.SplitBranches(n.Split.Rule, n.Branches[0].Node)
		}
		for _, br := range n.Branches {
			if br.Node != nil {
				stack = append(stack, br.Node)
			}
		}
	}
}

// copies is how many times the nodes under n's branches appear once the
// tree is built: three under a split, once elsewhere.
func copies(n *tree.Node) int {
	if isSplitHolder(n) {
		return 3
	}
	return 1
}
