package compiled

import (
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/internal/exact"
)

// Most figures that read an input are a·x + b of that one input: the input
// itself, `cost amount * 3`, `gain benefit - 90_000`. With evaluates those
// as a·x + b instead of running their programs: the same exact value, but
// from one table read in order rather than a program, its operations and
// its constants each somewhere else in memory (a sweep over an input that
// thousands of branches read spent a fifth of its time in the
// interpreter).

// linFig is a figure as a·in[slot] + b, or slot −1 when it is not one.
type linFig struct {
	a, b exact.Num
	slot int32
}

// linLimit bounds the powers of ten of a, b, every step on the way to them
// and the input, so that no step of the program can have grown past
// MaxDigits where a·x + b does not (the program would then have stopped
// with an error): with every coefficient and the input in machine words
// and within 10^±linLimit, each step is under 10^(40+2·linLimit).
const linLimit = 40

// linearFigures finds, for every dynamic figure, whether its program is
// a·x + b of its one input: constants, that input, +, −, unary − and
// multiplication by something that does not read it; no division (it may
// round), no distribution.
func (k *compiler) linearFigures() {
	sh := k.c.sh
	sh.lin = bulk.Make[linFig](len(sh.dyn))
	for fi, f := range sh.dyn {
		sh.lin[fi] = linearOf(k.c.pool, f.prog)
	}
}

func linearOf(pool *exact.Pool, p *program) linFig {
	no := linFig{slot: -1}
	if len(p.slots) != 1 {
		return no
	}
	type lin struct{ a, b exact.Num }
	var buf [16]lin
	st := buf[:0]
	for _, o := range p.ops {
		var r lin
		switch o.code {
		case opConst:
			st = append(st, lin{exact.Zero, p.consts[o.arg]})
		case opSlot:
			st = append(st, lin{exact.One, exact.Zero})
		case opNeg:
			if len(st) < 1 {
				return no
			}
			t := st[len(st)-1]
			st[len(st)-1] = lin{pool.Neg(t.a), pool.Neg(t.b)}
		case opAdd, opSub, opMul:
			if len(st) < 2 {
				return no
			}
			x, y := st[len(st)-2], st[len(st)-1]
			st = st[:len(st)-1]
			switch o.code {
			case opAdd:
				r = lin{pool.Add(x.a, y.a), pool.Add(x.b, y.b)}
			case opSub:
				r = lin{pool.Sub(x.a, y.a), pool.Sub(x.b, y.b)}
			case opMul:
				switch {
				case x.a.IsZero():
					r = lin{pool.Mul(x.b, y.a), pool.Mul(x.b, y.b)}
				case y.a.IsZero():
					r = lin{pool.Mul(x.a, y.b), pool.Mul(x.b, y.b)}
				default:
					return no
				}
			}
			st[len(st)-1] = r
		default:
			return no
		}
		if t := st[len(st)-1]; !t.a.Within(linLimit) || !t.b.Within(linLimit) {
			return no
		}
	}
	if len(st) != 1 {
		return no
	}
	return linFig{a: st[0].a, b: st[0].b, slot: p.slots[0]}
}

// evalLinear is figure fi's value when it is a·x + b and its input is
// within bounds; ok is false when the program must run instead.
func (c *Model) evalLinear(fi int32, pool *exact.Pool, in []exact.Num, inexact []bool) (v exact.Num, isExact, ok bool) {
	if int(fi) >= len(c.sh.lin) {
		return v, false, false
	}
	l := c.sh.lin[fi]
	if l.slot < 0 || !in[l.slot].Within(linLimit) {
		return v, false, false
	}
	v = pool.Add(pool.Mul(l.a, in[l.slot]), l.b)
	return v, inexact == nil || !inexact[l.slot], true
}
