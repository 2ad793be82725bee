package lang

import (
	"fmt"
	"strconv"

	"github.com/forkcast/forkcast/tree"
)

// strayItem is a branch line indented directly under a branch, where a node
// should be. Whether it is indented too far, not far enough, or missing a
// node line above it is decided when the branch is closed, once every line
// under it is known.
type strayItem struct {
	pos       tree.Pos
	width     int
	indent    int
	label     string
	prob      bool // it has a probability
	afterNode bool // the branch already had its node when it came
	up        *frame
}

// addStray records a branch line under branch f, which is on top of the
// stack (so the node f belongs to is just below it).
func (b *builder) addStray(f *frame, s strayItem) {
	if len(b.stack) >= 2 && b.stack[len(b.stack)-1] == f {
		s.up = b.stack[len(b.stack)-2]
	}
	if b.strays == nil {
		b.strays = map[*frame][]strayItem{}
	}
	b.strays[f] = append(b.strays[f], s)
}

// closeFrame runs the checks that wait until no more lines can come under
// a frame.
func (b *builder) closeFrame(f *frame) {
	if f.kind == fNode && len(f.kids) > 0 {
		f.node.Branches = b.alloc.branchList(f.kids)
	}
	if ss := b.strays[f]; len(ss) > 0 {
		b.reportStrays(f, ss)
		delete(b.strays, f) // the frame is reused
	}
}

// reportStrays reports the branch lines indented directly under branch f.
// A branch leads to a node, never to branches, so each is misplaced; the
// message says how, by what fits:
//
//   - one line under a branch that has no node, shaped like the branch's
//     siblings (a probability under a plain chance node, none elsewhere):
//     it is indented too far, and lines up with f;
//   - a line after the branch's node, shaped like that node's branches:
//     it is not indented far enough, and lines up with them;
//   - otherwise (several lines, as when a node line was left out): a node
//     is missing between f and them.
func (b *builder) reportStrays(f *frame, ss []strayItem) {
	before := 0
	for _, s := range ss {
		if !s.afterNode {
			before++
		}
	}
	child := f.branch.Node // the node the branch leads to, if any
	for _, s := range ss {
		sibling := s.up != nil && s.up.kind == fNode && takes(s.up.node, s.prob) && (s.afterNode || before == 1 && !f.hasNode)
		nephew := s.afterNode && child != nil && child.Kind != kindUse && takes(child, s.prob) &&
			len(child.Branches) > 0 && int(child.Branches[0].Pos.Col) > s.indent+1
		what := fmt.Sprintf("branch %q", s.label)
		switch {
		case sibling && nephew:
			first := child.Branches[0]
			b.errAt(s.pos, s.width,
				fmt.Sprintf("to be a branch of %s, line it up with %q at column %d; to be a branch of %s, line it up with %q at column %d",
					nodeDesc(child), first.Label, first.Pos.Col, s.up.desc(), f.label, f.indent+1),
				"%s is indented like a node, not like a branch", what)
		case sibling:
			b.errAt(s.pos, s.width,
				fmt.Sprintf("to be a branch of %s, line it up with %q at column %d; to put it under %q, add a decision or chance line between them", s.up.desc(), f.label, f.indent+1, f.label),
				"%s is indented %s too far", what, spacesCount(s.indent-f.indent))
		case nephew:
			first := child.Branches[0]
			b.errAt(s.pos, s.width,
				fmt.Sprintf("to be a branch of %s, line it up with %q at column %d", nodeDesc(child), first.Label, first.Pos.Col),
				"%s is not indented far enough", what)
		default:
			b.errAt(s.pos, s.width, fmt.Sprintf("a branch leads to a node; put a decision or chance line under %s and indent the branches under it", f.desc()),
				"a branch where a node is expected")
		}
	}
}

// nodeDesc names a node the way frame.desc does.
func nodeDesc(n *tree.Node) string {
	s := "decision"
	switch {
	case n.Test != "":
		s = "test " + n.Test
	case n.Uncertainty != "":
		s = "chance " + n.Uncertainty
	case n.Kind == tree.KindChance:
		s = "chance"
	}
	if n.Label != "" {
		s += " " + strconv.Quote(n.Label)
	}
	return s
}

// takes reports whether a branch with (or without) a probability has the
// shape of a branch of n: only a plain chance node's branches have one.
func takes(n *tree.Node, prob bool) bool {
	if n == nil {
		return false
	}
	plain := n.Kind == tree.KindChance && n.Uncertainty == "" && n.Test == ""
	return plain == prob
}

// spacesCount is "1 space" or "N spaces".
func spacesCount(n int) string {
	if n == 1 {
		return "1 space"
	}
	return fmt.Sprintf("%d spaces", n)
}
