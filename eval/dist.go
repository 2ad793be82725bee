package eval

import (
	"sort"

	"github.com/shopspring/decimal"
)

var one = decimal.NewFromInt(1)

// dist is an exact discrete distribution of goodness values: a point when
// xs is nil, else support xs (ascending, distinct) with probabilities ps.
type dist struct {
	v      decimal.Decimal
	xs, ps []decimal.Decimal
}

func point(v decimal.Decimal) dist { return dist{v: v} }

func (d dist) isPoint() bool { return d.xs == nil }

func (d dist) size() int {
	if d.xs == nil {
		return 1
	}
	return len(d.xs)
}

func (d dist) mean() decimal.Decimal {
	if d.xs == nil {
		return d.v
	}
	m := decimal.Zero
	for i, x := range d.xs {
		m = m.Add(x.Mul(d.ps[i]))
	}
	return m
}

func (d dist) shift(c decimal.Decimal) dist {
	if c.IsZero() {
		return d
	}
	if d.xs == nil {
		return point(d.v.Add(c))
	}
	xs := make([]decimal.Decimal, len(d.xs))
	for i, x := range d.xs {
		xs[i] = x.Add(c)
	}
	return dist{xs: xs, ps: d.ps}
}

// at returns the i-th support point and its probability.
func (d dist) at(i int) (decimal.Decimal, decimal.Decimal) {
	if d.xs == nil {
		return d.v, one
	}
	return d.xs[i], d.ps[i]
}

// build makes a distribution from (value, probability) pairs in any order,
// merging equal values and dropping zero probabilities.
func build(xs, ps []decimal.Decimal) dist {
	idx := make([]int, len(xs))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return xs[idx[a]].LessThan(xs[idx[b]]) })
	var ox, op []decimal.Decimal
	for _, i := range idx {
		if ps[i].IsZero() {
			continue
		}
		if n := len(ox); n > 0 && ox[n-1].Equal(xs[i]) {
			op[n-1] = op[n-1].Add(ps[i])
			continue
		}
		ox, op = append(ox, xs[i]), append(op, ps[i])
	}
	if len(ox) == 1 {
		return point(ox[0])
	}
	if len(ox) == 0 {
		return point(decimal.Zero)
	}
	return dist{xs: ox, ps: op}
}

// mixture is the distribution of a value that is ks[i] with probability
// ws[i].
func mixture(ws []decimal.Decimal, ks []dist) dist {
	var xs, ps []decimal.Decimal
	for i, k := range ks {
		for j := 0; j < k.size(); j++ {
			x, p := k.at(j)
			xs, ps = append(xs, x), append(ps, ws[i].Mul(p))
		}
	}
	return build(xs, ps)
}

// weightedSum is the distribution of Σ ws[i]·Xi for independent Xi ~ ks[i].
func weightedSum(ws []decimal.Decimal, ks []dist) dist {
	acc := point(decimal.Zero)
	for i, k := range ks {
		var xs, ps []decimal.Decimal
		for a := 0; a < acc.size(); a++ {
			x, p := acc.at(a)
			for b := 0; b < k.size(); b++ {
				y, q := k.at(b)
				xs, ps = append(xs, x.Add(ws[i].Mul(y))), append(ps, p.Mul(q))
			}
		}
		acc = build(xs, ps)
	}
	return acc
}

// maxIndependent is the distribution of the largest of independent values:
// P(max ≤ x) = Π P(Xi ≤ x).
func maxIndependent(ks []dist) dist {
	floor := decimal.Zero // the largest point value: nothing below it matters
	hasPoint, allPoint := false, true
	for _, k := range ks {
		if k.isPoint() {
			if !hasPoint || k.v.GreaterThan(floor) {
				floor = k.v
			}
			hasPoint = true
		} else {
			allPoint = false
		}
	}
	if allPoint {
		return point(floor)
	}
	var spread []dist
	for _, k := range ks {
		if !k.isPoint() {
			if hasPoint && !k.xs[len(k.xs)-1].GreaterThan(floor) {
				continue // never above the best certain value
			}
			spread = append(spread, k)
		}
	}
	if len(spread) == 0 {
		return point(floor)
	}
	// The candidate support: every point of every spread value above the
	// floor, and the floor itself.
	var support []decimal.Decimal
	if hasPoint {
		support = append(support, floor)
	}
	for _, k := range spread {
		for _, x := range k.xs {
			if !hasPoint || x.GreaterThan(floor) {
				support = append(support, x)
			}
		}
	}
	sort.Slice(support, func(a, b int) bool { return support[a].LessThan(support[b]) })
	uniq := support[:0]
	for i, x := range support {
		if i == 0 || !x.Equal(uniq[len(uniq)-1]) {
			uniq = append(uniq, x)
		}
	}
	support = uniq
	cur := make([]int, len(spread))
	cdf := make([]decimal.Decimal, len(spread))
	for i := range cdf {
		cdf[i] = decimal.Zero
	}
	xs := make([]decimal.Decimal, 0, len(support))
	ps := make([]decimal.Decimal, 0, len(support))
	prev := decimal.Zero
	for _, x := range support {
		f := one
		for i, k := range spread {
			for cur[i] < len(k.xs) && !k.xs[cur[i]].GreaterThan(x) {
				cdf[i] = cdf[i].Add(k.ps[cur[i]])
				cur[i]++
			}
			f = f.Mul(cdf[i])
		}
		if p := f.Sub(prev); !p.IsZero() {
			xs, ps = append(xs, x), append(ps, p)
		}
		prev = f
	}
	if len(xs) == 1 {
		return point(xs[0])
	}
	return dist{xs: xs, ps: ps}
}
