package compiled

import (
	"math/big"
)

// The rollback kernel: one algorithm over the node arrays, run on 128-bit
// integers (the usual case), on big integers when the figures outgrow 128
// bits, and on float64 for simulation. Its one source is the template in
// internal/kernelgen; kernel_gen.go holds a copy per number type (see
// kernelgen for why), and TestKernelGenerated checks it is current.
//
//go:generate go run ./internal/kernelgen/write

// bigOps compares exactly when tol is nil; in a model with rounded figures
// two values closer than the rounding could move them (tol, in T's units,
// or 10^-(DivisionScale-10) of their size) are equal: a tie, never a
// choice made by rounding noise.
type bigOps struct{ tol *big.Int }

func (bigOps) add(a, b *big.Int) (*big.Int, bool) { return new(big.Int).Add(a, b), true }
func (o bigOps) less(a, b *big.Int) bool {
	if o.tol == nil {
		return a.Cmp(b) < 0
	}
	return new(big.Int).Sub(b, a).Cmp(o.slack(a, b)) > 0
}
func (o bigOps) equal(a, b *big.Int) bool {
	if o.tol == nil {
		return a.Cmp(b) == 0
	}
	d := new(big.Int).Sub(a, b)
	return d.CmpAbs(o.slack(a, b)) <= 0
}

// slack is how far apart a and b may be and still count as equal.
func (o bigOps) slack(a, b *big.Int) *big.Int {
	s := new(big.Int).Abs(a)
	if b.CmpAbs(s) > 0 {
		s.Abs(b)
	}
	s.Quo(s, relTol)
	if s.Cmp(o.tol) < 0 {
		return o.tol
	}
	return s
}

// relTol is the relative part of a tolerant comparison: 10^(DivisionScale-10).
var relTol = new(big.Int).Exp(big.NewInt(10), big.NewInt(DivisionScale-10), nil)

// rhoScale is the scale of a rho as a big integer: rho × 10^rhoScale.
const rhoScale = MaxMassPlaces + 2*DivisionScale

var rhoUnit = new(big.Int).Exp(big.NewInt(10), big.NewInt(rhoScale), nil)

// addScaled is a + t × r / 10^rhoScale, rounded half away from zero.
func (bigOps) addScaled(a, t, r *big.Int) *big.Int {
	p := new(big.Int).Mul(t, r)
	q, m := new(big.Int).QuoRem(p, rhoUnit, new(big.Int))
	if m.CmpAbs(new(big.Int).Rsh(rhoUnit, 1)) >= 0 {
		if p.Sign() < 0 {
			q.Sub(q, big.NewInt(1))
		} else {
			q.Add(q, big.NewInt(1))
		}
	}
	return q.Add(q, a)
}

// tiedBit marks, in best, a decision with more than one optimal branch.
const tiedBit = 1 << 30
