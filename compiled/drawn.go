package compiled

// DrawnNodes reports, per node by number, whether a figure of the node —
// the cash or the probability of the branch into it, or its payoff —
// reads a random input (a distribution, or a register's figure), directly
// or through other inputs. Exact analyses take such a figure at its mean,
// so a check that reasons about a node's possible outcomes (dominance)
// cannot rely on it there. When a prior, a likelihood or a test's cost is
// random, every node is marked: a named uncertainty's probabilities reach
// the whole tree.
func (c *Model) DrawnNodes() []bool {
	out := make([]bool, c.Len())
	sh := c.sh
	reached := map[int32]bool{}
	var queue []int32
	for _, s := range sh.sources {
		if c.fixed == nil || !c.fixed[s.slot] {
			queue = append(queue, s.slot)
		}
	}
	for len(queue) > 0 {
		s := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		for _, fi := range sh.readers[s] {
			d := sh.dyn[fi]
			if reached[fi] || (d.kind == figInput && (c.fixed != nil && c.fixed[d.i] || c.isSource(d.i))) {
				continue
			}
			reached[fi] = true
			switch d.kind {
			case figInput:
				queue = append(queue, d.i)
			case figCash, figProb, figPayoff:
				if int(d.i) < len(out) {
					out[d.i] = true
				}
			case figPrior, figLikelihood, figTestCost:
				for i := range out {
					out[i] = true
				}
				return out
			}
		}
	}
	return out
}
