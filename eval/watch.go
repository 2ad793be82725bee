package eval

import (
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/tree"
)

// WatchedDecision finds the decision an analysis of one decision looks at
// (breakeven, risk profiles), on the solution sol.
//
// at is the decision's label, or BRANCH/DECISION to tell apart decisions
// that share a label (the one reached through a branch with that label);
// when several match, the first the optimal policy reaches is taken. An
// empty at is the root when it is a decision, else the first decision on
// the optimal path. The notes say what was chosen when that was not
// plain. The decision is nil (and err nil) when at is empty and the tree
// has no decision at all; an at that matches nothing is a *RequestError.
func WatchedDecision(sol *Solution, at string) (d *Solved, notes []string, err error) {
	nodes := sol.Nodes()
	pick := -1
	switch {
	case at != "":
		var all []int
		for i := range nodes {
			if n := nodes[i].Node; n.Kind == tree.KindDecision && n.Label == at {
				all = append(all, i)
			}
		}
		if len(all) == 0 {
			// BRANCH/DECISION: the decision with that label reached
			// through a branch with that label, to tell apart decisions
			// that share a label (a subtree used in several places).
			if i := strings.LastIndex(at, "/"); i > 0 {
				via, errV := unquotePart(at[:i])
				label, errL := unquotePart(at[i+1:])
				if errV == nil && errL == nil {
					for j := range nodes {
						if n := nodes[j].Node; n.Kind == tree.KindDecision && n.Label == label && pathHas(&nodes[j], via) {
							all = append(all, j)
						}
					}
				}
			}
		}
		if len(all) == 0 {
			var labels []string
			seen := map[string]bool{}
			for i := range nodes {
				if n := nodes[i].Node; n.Kind == tree.KindDecision && !seen[n.Label] {
					seen[n.Label] = true
					labels = append(labels, n.Label)
				}
			}
			if len(labels) == 0 {
				return nil, nil, reqErr("no decision labelled %q: the model has no decision", at)
			}
			return nil, nil, reqErr("no decision labelled %q; the decisions are %s", at, quoteAll(labels))
		}
		reach := sol.Reachable()
		pick = all[0]
		for _, i := range all {
			if reach[i] {
				pick = i
				break
			}
		}
		if len(all) > 1 {
			notes = append(notes, fmt.Sprintf("%d decisions are labelled %q; watching the first one the optimal policy reaches (after %s)", len(all), at, pathText(&nodes[pick])))
		}
	case nodes[0].Node.Kind == tree.KindDecision:
		pick = 0
	default:
		reach := sol.Reachable()
		for i := range nodes {
			if nodes[i].Node.Kind == tree.KindDecision && reach[i] {
				pick = i
				break
			}
		}
		if pick < 0 {
			return nil, nil, nil
		}
		notes = append(notes, fmt.Sprintf("the root is not a decision; watching the first decision on the optimal path, %q (after %s)", nodes[pick].Node.Label, pathText(&nodes[pick])))
	}
	return &nodes[pick], notes, nil
}

// pathHas reports whether a branch labelled via lies on the path from the
// root to s.
func pathHas(s *Solved, via string) bool {
	for c := s; c.Parent() != nil; c = c.Parent() {
		if c.Parent().Node.Branches[c.Via()].Label == via {
			return true
		}
	}
	return false
}
