package compiled

import (
	"fmt"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
)

// DivisionScale is the number of decimal places a division is carried to.
// Rollback adds and compares only, so a division (a fraction literal such
// as 1/3) is the one place a figure is rounded, at this scale; a model with
// a rounded figure says so (Model.Exact).
const DivisionScale = 50

// MaxDigits is the most significant digits a figure may have, and the
// largest power of ten it may reach (10^MaxDigits; decimal places are
// limited to twice as many). Figures in practice have a few dozen digits at
// most; a model that squares a number again and again would otherwise grow
// without bound, so a figure past the limit is an error at the expression
// that made it.
const MaxDigits = 200

// An expression is compiled to a program over input slots: postfix
// operations on a small stack. A program is evaluated again only when an
// input it reads changes.
type opcode uint8

const (
	opConst opcode = iota // push consts[arg]
	opSlot                // push the value of input slot arg
	opNeg
	opAdd
	opSub
	opMul
	opDiv
)

type op struct {
	code opcode
	arg  int32
	at   tree.Pos // where the operation is written (the divisor for opDiv)
	expr tree.Expr
}

type program struct {
	ops    []op
	consts []exact.Num
	slots  []int32 // the input slots the program reads, each once
}

// EvalError is an expression that cannot be evaluated: an unknown name, a
// division by zero, a figure with too many digits.
type EvalError struct {
	Pos  tree.Pos
	Msg  string
	Hint string
	Name string // the unknown name, when that is the problem
}

func (e *EvalError) Error() string { return e.Pos.String() + ": " + e.Msg }

// scope resolves names while compiling: the slot of a name, or an error.
type scope func(n *tree.Name) (int32, *EvalError)

// compileExpr compiles e. A program that reads no input is evaluated at
// once: constant is then true and value holds it.
func compileExpr(pool *exact.Pool, e tree.Expr, look scope) (p *program, err *EvalError) {
	p = &program{}
	seen := map[int32]bool{}
	var walk func(e tree.Expr) *EvalError
	walk = func(e tree.Expr) *EvalError {
		switch e := e.(type) {
		case nil:
			p.ops = append(p.ops, op{code: opConst, arg: int32(len(p.consts))})
			p.consts = append(p.consts, exact.Zero)
		case *tree.Number:
			p.ops = append(p.ops, op{code: opConst, arg: int32(len(p.consts)), at: e.At})
			p.consts = append(p.consts, pool.Of(e.Value))
		case *tree.Name:
			slot, err := look(e)
			if err != nil {
				return err
			}
			p.ops = append(p.ops, op{code: opSlot, arg: slot, at: e.At})
			if !seen[slot] {
				seen[slot] = true
				p.slots = append(p.slots, slot)
			}
		case *tree.Unary:
			if err := walk(e.X); err != nil {
				return err
			}
			p.ops = append(p.ops, op{code: opNeg, at: e.At})
		case *tree.Binary:
			if err := walk(e.X); err != nil {
				return err
			}
			if err := walk(e.Y); err != nil {
				return err
			}
			o := op{at: e.At, expr: e}
			switch e.Op {
			case '+':
				o.code = opAdd
			case '-':
				o.code = opSub
			case '*':
				o.code = opMul
			case '/':
				o.code = opDiv
				o.at = e.Y.Pos()
			default:
				return &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown operator %q", e.Op)}
			}
			p.ops = append(p.ops, o)
		case *tree.Call:
			return &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown function %q", e.Func)}
		default:
			return &EvalError{Pos: e.Pos(), Msg: fmt.Sprintf("unknown expression %T", e)}
		}
		return nil
	}
	if err := walk(e); err != nil {
		return nil, err
	}
	return p, nil
}

// isConst reports whether the program reads no input.
func (p *program) isConst() bool { return len(p.slots) == 0 }

// eval runs the program on the input values in. exact is false when a
// division was rounded on the way (or an input was inexact: inexact lists
// the inexact slots, nil when none are).
func (p *program) eval(pool *exact.Pool, in []exact.Num, inexact []bool) (v exact.Num, isExact bool, err *EvalError) {
	var buf [16]exact.Num
	st := buf[:0]
	isExact = true
	for _, o := range p.ops {
		switch o.code {
		case opConst:
			st = append(st, p.consts[o.arg])
			continue
		case opSlot:
			st = append(st, in[o.arg])
			if inexact != nil && inexact[o.arg] {
				isExact = false
			}
			continue
		case opNeg:
			st[len(st)-1] = pool.Neg(st[len(st)-1])
			continue
		}
		x, y := st[len(st)-2], st[len(st)-1]
		st = st[:len(st)-1]
		var r exact.Num
		switch o.code {
		case opAdd:
			r = pool.Add(x, y)
		case opSub:
			r = pool.Sub(x, y)
		case opMul:
			r = pool.Mul(x, y)
		case opDiv:
			if y.IsZero() {
				hint := "check the figures that make up the divisor"
				if b, ok := o.expr.(*tree.Binary); ok {
					if _, literal := b.Y.(*tree.Number); !literal {
						hint = "the divisor " + b.Y.String() + " is 0"
					}
				}
				return exact.Zero, false, &EvalError{Pos: o.at, Msg: "division by zero", Hint: hint}
			}
			var ok bool
			r, ok = pool.Div(x, y, DivisionScale)
			isExact = isExact && ok
		}
		if !pool.Bounded(r, MaxDigits) {
			return exact.Zero, false, &EvalError{Pos: o.at, Msg: fmt.Sprintf("this figure has more than %d significant digits", MaxDigits),
				Hint: "a figure this long is almost always a mistake (a number multiplied by itself again and again); forkcast keeps figures to " + fmt.Sprint(MaxDigits) + " digits"}
		}
		st[len(st)-1] = r
	}
	return st[0], isExact, nil
}

// evalFloat runs the program in float64 on the input values in (for
// simulation).
func (p *program) evalFloat(consts []float64, in []float64) float64 {
	var buf [16]float64
	st := buf[:0]
	for _, o := range p.ops {
		switch o.code {
		case opConst:
			st = append(st, consts[o.arg])
			continue
		case opSlot:
			st = append(st, in[o.arg])
			continue
		case opNeg:
			st[len(st)-1] = -st[len(st)-1]
			continue
		}
		y := st[len(st)-1]
		st = st[:len(st)-1]
		switch o.code {
		case opAdd:
			st[len(st)-1] += y
		case opSub:
			st[len(st)-1] -= y
		case opMul:
			st[len(st)-1] *= y
		case opDiv:
			st[len(st)-1] /= y
		}
	}
	return st[0]
}
