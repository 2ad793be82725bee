package interchange

import (
	"fmt"

	"github.com/forkcast/forkcast/tree"
)

// A frame of the tree being read: a node or a branch, whose members are
// being read. The tree is read with a stack of frames, not by recursion,
// so its depth costs memory in proportion to the model and never stack.
// A frame is small: one is live for every level of the tree being read.
type frame struct {
	n    *tree.Node // a node's frame
	b    *tree.Branch
	seen uint32
	// first: no member read yet; inBranches: reading the elements of the
	// node's "branches" (firstElem: none read yet); typed: the node's
	// "type" has been read (its Kind set).
	first, inBranches, firstElem, typed bool
	// value is a node's "value", kept until its type is known: an end
	// node's payoff when it has no "payoff", else what `solve --json`
	// adds, not read.
	value *token
}

// count counts one more node, stopping at the limit.
func (r *reader) count(at tree.Pos) bool {
	r.nodes++
	if r.nodes > r.limit {
		r.err(at, "if the model really is this big, raise the node limit (Options.NodeLimit in Go; --max-nodes on the command line)",
			"the tree has more than %s nodes", grouped(r.limit))
		r.stopped = true
		return false
	}
	return true
}

// tree reads the root node; t is its first token.
func (r *reader) tree(t tokKind) {
	if t != tObject {
		r.wrongType(t, fmt.Sprintf("\"root\" of the model must be an object, not %s", kindName(t)), "")
		return
	}
	if !r.count(r.s.pos) {
		return
	}
	r.m.Root = &tree.Node{Pos: r.s.pos}
	stack := make([]frame, 1, 64)
	stack[0] = frame{n: r.m.Root, first: true}
	for len(stack) > 0 && !r.stopped {
		f := &stack[len(stack)-1]
		if f.n != nil && f.inBranches {
			t, done, ok := r.element(f.firstElem)
			f.firstElem = false
			if !ok {
				return
			}
			if done {
				f.inBranches = false
				continue
			}
			if t != tObject {
				r.wrongType(t, fmt.Sprintf("a branch must be an object, not %s", kindName(t)), "")
				continue
			}
			if !r.count(r.s.pos) {
				return
			}
			b := &tree.Branch{Pos: r.s.pos}
			f.n.Branches = append(f.n.Branches, b)
			stack = append(stack, frame{b: b, first: true})
			continue
		}
		keys, what := nodeKeys, "a node"
		if f.b != nil {
			keys, what = branchKeys, "a branch"
		}
		k, done, ok := r.member(f.first, keys)
		f.first = false
		if !ok {
			return
		}
		if done {
			if f.n != nil {
				r.endNode(f)
			} else {
				r.endBranch(f)
			}
			stack = stack[:len(stack)-1]
			continue
		}
		if !r.keyCheck(k, &f.seen, what, keys) {
			continue
		}
		if f.n != nil {
			n := f.n
			switch k {
			case nType:
				t := r.s.next()
				if t != tString {
					r.wrongType(t, fmt.Sprintf("\"type\" of a node must be a string, not %s", kindName(t)), "")
					continue
				}
				switch string(r.s.text) {
				case "decision":
					n.Kind, f.typed = tree.KindDecision, true
				case "chance":
					n.Kind, f.typed = tree.KindChance, true
				case "end":
					n.Kind, f.typed = tree.KindEnd, true
				default:
					r.err(r.s.pos, "use \"decision\", \"chance\" or \"end\"", "unknown node type %q", shorten(string(r.s.text)))
				}
			case nLabel:
				n.Label = r.label("label", "a node")
			case nUncertainty:
				n.Uncertainty, _, _ = r.str("uncertainty", "a node")
			case nTest:
				n.Test, _, _ = r.str("test", "a node")
			case nPayoff:
				n.Payoff, _ = r.figure("payoff", "an end node", false)
			case nValue:
				// On an end node without "payoff", its payoff; elsewhere
				// what `solve --json` adds, recomputed and not read (it
				// may have any number of digits).
				t := r.s.next()
				if t != tNumber && t != tString {
					r.notFigure(t, "value", "a node", false)
					continue
				}
				if !f.typed || n.Kind == tree.KindEnd {
					v := r.s.tok().saved()
					f.value = &v
				}
			case nBest:
				r.skip(r.nextDiscard()) // what `solve --json` adds: recomputed
			case nSplit:
				if t := r.s.next(); t != tObject {
					r.wrongType(t, fmt.Sprintf("\"split\" of a node must be an object, not %s", kindName(t)), "")
					continue
				}
				r.split(n)
			case nBranches:
				t := r.s.next()
				if t != tArray {
					r.wrongType(t, fmt.Sprintf("\"branches\" of node %q must be an array, not %s", n.Display(), kindName(t)), "")
					continue
				}
				f.inBranches, f.firstElem = true, true
			}
			continue
		}
		b := f.b
		switch k {
		case bLabel:
			b.Label = r.label("label", "a branch")
		case bProbability:
			b.Prob, b.Rest = r.figure("probability", "a branch", true)
		case bGain:
			b.Gain, _ = r.figure("gain", "a branch", false)
		case bCost:
			b.Cost, _ = r.figure("cost", "a branch", false)
		case bCash:
			// In the objective's terms, which may come after the tree.
			if x, _ := r.figure("cash", "a branch", false); x != nil {
				r.cash = append(r.cash, pendingCash{b, x})
			}
		case bNode:
			t := r.s.next()
			if t != tObject {
				r.wrongType(t, fmt.Sprintf("\"node\" of branch %q must be an object, not %s", b.Label, kindName(t)), "")
				continue
			}
			b.Node = &tree.Node{Pos: r.s.pos}
			stack = append(stack, frame{n: b.Node, first: true})
		}
	}
}

// endNode checks a node whose members have all been read.
func (r *reader) endNode(f *frame) {
	n := f.n
	if f.seen&(1<<nType) == 0 {
		r.err(n.Pos, "give it a \"type\": \"decision\", \"chance\" or \"end\"", "a node has no \"type\"")
	}
	if n.Kind != tree.KindChance && (n.Uncertainty != "" || n.Test != "") {
		r.err(n.Pos, "only a chance node can name an uncertainty or a test", "%s node has \"uncertainty\" or \"test\"", n.Kind)
	}
	if n.Uncertainty != "" && n.Test != "" {
		r.err(n.Pos, "a node either samples an uncertainty or runs a test", "node has both \"uncertainty\" and \"test\"")
	}
	// An end node's own value is "payoff"; "value" stands for it when
	// there is no "payoff" (on other nodes it is what `solve --json`
	// adds, recomputed). Both are in the objective's terms.
	switch {
	case n.Payoff != nil && n.Kind != tree.KindEnd:
		if f.typed {
			r.err(n.Payoff.Pos(), "put the amount on the branch that leads here, as \"gain\" or \"cost\"", "%s node has a \"payoff\"; only an end node has one", n.Kind)
		}
		n.Payoff = nil
	case n.Payoff == nil && n.Kind == tree.KindEnd && f.value != nil:
		n.Payoff, _ = r.figureOf(*f.value, false)
		if num, ok := n.Payoff.(*tree.Number); ok && num.Value().IsZero() {
			n.Payoff = nil // the same as none: the end of a path in solved output
		}
	}
	if n.Payoff != nil {
		r.payoffs = append(r.payoffs, n)
	}
}

// endBranch checks a branch whose members have all been read.
func (r *reader) endBranch(f *frame) {
	if f.seen&(1<<bLabel) == 0 {
		r.err(f.b.Pos, "give it a \"label\"", "a branch has no \"label\"")
	}
}
