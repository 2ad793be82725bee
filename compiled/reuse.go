package compiled

// A sweep makes one model per point from the same model c, each changing
// the same few inputs, and drops it after one rollback. When those inputs
// move money only, each new model would copy c's money (cash, payoffs)
// and its weights E = mass × value, a few megabytes for a large tree, to
// change a few thousand entries. WithInto lets the new model take over the
// arrays of the one before instead: the entries that one changed are put
// back to c's, and the new changes written over them.

// reuse records what a model made by With changed of the model it came
// from, when those were money only.
type reuse struct {
	from    *Model
	nodes   []int32 // the nodes whose cash, payoff and E it changed
	cashOwn bool    // cash is its own copy, not from's
	payOwn  bool    // payoff likewise
	eOwn    bool    // d.e likewise, at from's scale
}

// reusable is what a model made from c by the writer w, with derived
// figures d, lets a later WithInto reuse; nil when it changed anything but
// money at known nodes.
func reusable(c *Model, w *writer, d *derived) *reuse {
	if w.probsChanged || w.allMoney || w.tests != nil || !w.moneyChanged {
		return nil
	}
	return &reuse{from: c, nodes: w.moneyNodes, cashOwn: w.cashCopied, payOwn: w.payCopied,
		eOwn: d != c.d && d.e != nil && c.d.e != nil && d.scale == c.d.scale && len(d.e) == len(c.d.e)}
}

// adopt lets the writer w of a change of c write into dst's arrays when dst
// is reusable (see reuse) and the change sets inputs that move money only
// (the figures in order). It puts dst's changed entries back to c's first,
// and reports whether dst.d.e is to be reweighed in place.
func (c *Model) adopt(dst *Model, w *writer, settings []Setting, order []int32) bool {
	if dst == nil || dst.reuse == nil || dst.reuse.from != c {
		return false
	}
	for _, s := range settings {
		if s.Target.kind != figInput {
			return false
		}
	}
	for _, fi := range order {
		switch c.sh.dyn[fi].kind {
		case figInput, figCash, figPayoff:
		default:
			return false
		}
	}
	r := dst.reuse
	dst.reuse = nil // its arrays are the new model's from here on
	n := w.c
	if r.cashOwn {
		for _, i := range r.nodes {
			dst.cash[i] = c.cash[i]
		}
		n.cash, w.cashCopied = dst.cash, true
	}
	if r.payOwn {
		for _, i := range r.nodes {
			dst.payoff[i] = c.payoff[i]
		}
		n.payoff, w.payCopied = dst.payoff, true
	}
	if !r.eOwn {
		return false
	}
	for _, i := range r.nodes {
		dst.d.e[i] = c.d.e[i]
	}
	return true
}
