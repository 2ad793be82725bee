package lang

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/tree"
)

// expand checks every `use`, finds subtrees that use themselves, weighs the
// expanded tree against the node limit before building anything, and then
// copies each used subtree into place. Everything here is iterative: a chain
// of 100 000 subtrees, each using the next, is fine.
func (b *builder) expand() {
	var names []string
	for _, d := range b.subOrder {
		if b.subs[d.name] == d {
			names = append(names, d.name)
		}
	}
	for _, u := range b.uses {
		d := b.subs[u.name]
		if d == nil {
			hint := "define it at the top level with `subtree " + u.name + "`, with one node indented beneath it"
			if s := suggestWithin(u.name, names, &b.suggestBudget); s != "" {
				hint = fmt.Sprintf("did you mean %q (defined on line %d)?", s, b.subs[s].line)
			} else if len(names) > 0 && len(names) <= 10 {
				hint = "the subtrees defined are " + quoteList(names) + "; or " + hint
			}
			b.errAt(u.pos, u.width, hint, "unknown subtree %q", u.name)
			continue
		}
		u.target = d
		d.used = true
		if u.owner != nil && !u.detached && b.subs[u.owner.name] == u.owner {
			u.owner.deps = append(u.owner.deps, u)
		}
	}
	post := b.cycles()
	for _, d := range post {
		if !d.broken {
			d.size = b.weigh(d.root)
		}
	}
	for _, d := range b.subOrder {
		if b.subs[d.name] == d && !d.used {
			b.ds.Warn(d.pos, "remove it, or put `use "+d.name+"` where it belongs in the tree", "subtree %q is defined but never used", d.name)
			b.ds[len(b.ds)-1].Len = len([]rune(d.name))
		}
	}
	if b.m.Root == nil {
		return
	}
	if len(b.uses) == 0 && b.splits == 0 {
		// The tree is as written, and every node of it was counted as it
		// was read (countBranch): nothing to weigh or expand.
		return
	}
	if !b.checkLimit() {
		b.dropUses()
		return
	}
	b.m.Root = b.resolveUse(b.m.Root)
	stack := []*tree.Node{}
	if b.m.Root != nil {
		stack = append(stack, b.m.Root)
	}
	for len(stack) > 0 {
		n := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		for _, br := range n.Branches {
			if br.Node == nil {
				continue
			}
			if br.Node.Kind == kindUse {
				br.Node = b.resolveUse(br.Node)
			}
			if br.Node != nil {
				stack = append(stack, br.Node)
			}
		}
	}
}

// resolveUse returns a fresh copy of what a placeholder stands for, or nil
// when the subtree is unknown or broken (already reported).
func (b *builder) resolveUse(n *tree.Node) *tree.Node {
	for n != nil && n.Kind == kindUse {
		d := b.subs[n.Label]
		if d == nil || d.broken || d.root == nil {
			return nil
		}
		n = tree.Clone(d.root)
	}
	return n
}

// dropUses removes the placeholders from the main tree (after an error).
func (b *builder) dropUses() {
	if b.m.Root.Kind == kindUse {
		b.m.Root = nil
		return
	}
	tree.Walk(b.m.Root, func(n *tree.Node, _ int) bool {
		for _, br := range n.Branches {
			if br.Node != nil && br.Node.Kind == kindUse {
				br.Node = nil
			}
		}
		return true
	})
}

// cycles reports every subtree that uses itself, directly or through
// others, marks the ones on a cycle broken, and returns the subtrees in an
// order where each comes after the ones it uses.
func (b *builder) cycles() []*subtreeDef {
	const (
		white = iota
		grey
		black
	)
	color := map[*subtreeDef]int{}
	var post []*subtreeDef
	type item struct {
		d *subtreeDef
		i int
		u *useRef // the use that led here
	}
	for _, start := range b.subOrder {
		if b.subs[start.name] != start || color[start] != white {
			continue
		}
		color[start] = grey
		stack := []item{{d: start}}
		for len(stack) > 0 {
			top := &stack[len(stack)-1]
			if top.i == len(top.d.deps) {
				color[top.d] = black
				post = append(post, top.d)
				stack = stack[:len(stack)-1]
				continue
			}
			u := top.d.deps[top.i]
			top.i++
			switch color[u.target] {
			case white:
				color[u.target] = grey
				stack = append(stack, item{d: u.target, u: u})
			case grey:
				// A cycle: from u.target on the stack up to here, then back.
				k := len(stack) - 1
				for stack[k].d != u.target {
					k--
				}
				chain := []string{}
				for _, it := range stack[k:] {
					chain = append(chain, it.d.name)
					it.d.broken = true
				}
				chain = append(chain, u.target.name)
				msg := fmt.Sprintf("subtree %q uses itself", u.target.name)
				if len(chain) > 2 {
					msg += ": " + strings.Join(chain, " → ")
				}
				b.errAt(u.pos, u.width, "a subtree cannot contain itself: the tree would never end; break the chain with a subtree that does not use the others", "%s", msg)
			}
		}
	}
	return post
}

// sat adds with saturation at the limit + 1: sizes are only compared with
// the limit, and a doubling chain must not overflow.
func (b *builder) sat(x, y int) int {
	if s := x + y; s <= b.limit {
		return s
	}
	return b.limit + 1
}

// useSize is the number of nodes a `use` of the named subtree becomes.
func (b *builder) useSize(name string) int {
	d := b.subs[name]
	if d == nil || d.broken || d.root == nil {
		return 1
	}
	return d.size
}

// weigh counts the nodes a template expands to: every node, plus an end
// node for every branch with nothing under it (as the solved tree has
// them). It stops early once past the limit.
func (b *builder) weigh(root *tree.Node) int {
	total := 0
	stack := []*tree.Node{root}
	for len(stack) > 0 && total <= b.limit {
		n := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if n.Kind == kindUse {
			total = b.sat(total, b.useSize(n.Label))
			continue
		}
		total = b.sat(total, 1)
		for range copies(n) {
			for _, br := range n.Branches {
				if br.Node == nil {
					total = b.sat(total, 1)
				} else {
					stack = append(stack, br.Node)
				}
			}
		}
	}
	return total
}

// checkLimit weighs the main tree and reports where it passes the node
// limit, if it does.
func (b *builder) checkLimit() bool {
	raise := "if the model really is this big, raise the node limit (--max-nodes on the command line; Options.NodeLimit in Go)"
	total := 0
	stack := []*tree.Node{b.m.Root}
	for len(stack) > 0 {
		n := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if n.Kind == kindUse {
			s := b.useSize(n.Label)
			if total+s > b.limit {
				u := b.useAt[n]
				hint := fmt.Sprintf("each use copies the whole subtree; this one expands to more than %s nodes on its own; %s", grouped(b.limit), raise)
				if s <= b.limit {
					hint = fmt.Sprintf("each use copies the whole subtree; this one expands to %s nodes and the tree already has %s; %s", grouped(s), grouped(total), raise)
				}
				b.errAt(u.pos, u.width, hint, "using subtree %q here takes the tree past the limit of %s nodes", n.Label, grouped(b.limit))
				return false
			}
			total += s
			continue
		}
		total++
		for range copies(n) {
			for _, br := range n.Branches {
				if br.Node == nil {
					total++
				} else {
					stack = append(stack, br.Node)
				}
			}
		}
		if total > b.limit {
			b.errAt(n.Pos, 0, raise, "the tree has more than %s nodes", grouped(b.limit))
			return false
		}
	}
	return true
}

// grouped writes n with thousands separators.
func grouped(n int) string {
	s := strconv.Itoa(n)
	var parts []string
	for len(s) > 3 {
		parts = append(parts, s[len(s)-3:])
		s = s[:len(s)-3]
	}
	parts = append(parts, s)
	slices.Reverse(parts)
	return strings.Join(parts, ",")
}

func quoteList(xs []string) string {
	q := make([]string, len(xs))
	for i, x := range xs {
		q[i] = strconv.Quote(x)
	}
	return strings.Join(q, ", ")
}
