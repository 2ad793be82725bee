package compiled

import (
	"encoding/binary"
	"fmt"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// DivisionScale is the number of decimal places a division is carried to.
// Rollback adds and compares only, so a division (a fraction literal such
// as 1/3) is the one place a figure is rounded, at this scale; a model with
// a rounded figure says so (Model.Exact).
const DivisionScale = 50

// MaxMassPlaces is the most decimal places a node's mass may have before
// its subtree is rolled back in a frame of its own (see derive.go): a tree
// as deep as 150 levels of probabilities in hundredths stays exact; deeper
// ones are rounded, and say so.
const MaxMassPlaces = 300

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
	opCall // a distribution of arg arguments (its *tree.Call in exprs): its mean
	// opQuantile is a distribution of arg arguments and, above them on the
	// stack, a level: its quantile there (split.go).
	opQuantile
	// opOutside is an outside value (outside.go), its *outsideExpr in
	// exprs: its mean.
	opOutside
)

// op is one operation: 16 bytes, as a large model has hundreds of
// thousands of programs.
type op struct {
	code opcode
	arg  int32
	at   tree.Pos // where the operation is written (the divisor for opDiv)
}

type program struct {
	ops     []op
	consts  []exact.Num
	fconsts []float64 // consts in float64, for simulation
	slots   []int32   // the input slots the program reads, each once
	// exprs are the expressions of the operations that need theirs (for
	// a message or a distribution's arguments), in the order of the ops:
	// opDiv's *tree.Binary, opCall's and opQuantile's *tree.Call,
	// opOutside's *outsideExpr.
	exprs []tree.Expr
}

// needsExpr reports whether an operation has its expression in exprs.
func (c opcode) needsExpr() bool {
	return c == opDiv || c == opCall || c == opQuantile || c == opOutside
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

// sourceOf turns a distribution written in an expression into the input
// slot that stands for it (see funcs.go), or an error.
type sourceOf func(c *tree.Call) (int32, *EvalError)

// compileExpr compiles e. A distribution in e becomes the input slot
// source gives it; with a nil source, the distribution itself is compiled
// (opCall: its mean).
func compileExpr(pool *exact.Pool, e tree.Expr, look scope, source sourceOf) (*program, *EvalError) {
	return compileInto(&program{}, pool, e, look, source)
}

// compileInto compiles e into p, reusing the storage of p's slices.
func compileInto(p *program, pool *exact.Pool, e tree.Expr, look scope, source sourceOf) (*program, *EvalError) {
	*p = program{ops: p.ops[:0], consts: p.consts[:0], fconsts: p.fconsts[:0], slots: p.slots[:0], exprs: p.exprs[:0]}
	pc := progCompiler{pool: pool, look: look, source: source, p: p}
	if err := pc.walk(e); err != nil {
		return nil, err
	}
	for _, c := range p.consts {
		p.fconsts = append(p.fconsts, pool.Float64(c))
	}
	return p, nil
}

// progCompiler compiles one expression into p. It is a plain struct with a
// recursive method, not a closure, and keeps no set of the slots seen: a
// program reads a handful of slots at most, so a scan is cheaper than a map
// for the hundreds of thousands of figures of a large model.
type progCompiler struct {
	pool   *exact.Pool
	look   scope
	source sourceOf
	p      *program
}

// slot records that the program reads input slot s.
func (pc *progCompiler) slot(s int32, at tree.Pos) {
	p := pc.p
	p.ops = append(p.ops, op{code: opSlot, arg: s, at: at})
	for _, r := range p.slots {
		if r == s {
			return
		}
	}
	p.slots = append(p.slots, s)
}

func (pc *progCompiler) walk(e tree.Expr) *EvalError {
	p := pc.p
	switch e := e.(type) {
	case nil:
		p.ops = append(p.ops, op{code: opConst, arg: int32(len(p.consts))})
		p.consts = append(p.consts, exact.Zero)
	case *tree.Number:
		p.ops = append(p.ops, op{code: opConst, arg: int32(len(p.consts)), at: e.At})
		p.consts = append(p.consts, numOf(pc.pool, e))
	case *tree.Name:
		slot, err := pc.look(e)
		if err != nil {
			return err
		}
		pc.slot(slot, e.At)
	case *tree.Unary:
		if err := pc.walk(e.X); err != nil {
			return err
		}
		p.ops = append(p.ops, op{code: opNeg, at: e.At})
	case *tree.Binary:
		if err := pc.walk(e.X); err != nil {
			return err
		}
		if err := pc.walk(e.Y); err != nil {
			return err
		}
		o := op{at: e.At}
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
			p.exprs = append(p.exprs, e)
		default:
			return &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown operator %q", e.Op)}
		}
		p.ops = append(p.ops, o)
	case *tree.Call:
		fn, ok := functions[e.Func]
		if !ok {
			return &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown function %q", e.Func),
				Hint: "the functions are the distributions " + functionNames()}
		}
		if n := len(e.Args); n < fn.min || (fn.max >= 0 && n > fn.max) {
			return &EvalError{Pos: e.At, Msg: argError(e.Func, fn, n)}
		}
		if pc.source != nil {
			slot, err := pc.source(e)
			if err != nil {
				return err
			}
			pc.slot(slot, e.At)
			return nil
		}
		for _, a := range e.Args {
			if err := pc.walk(a); err != nil {
				return err
			}
		}
		p.ops = append(p.ops, op{code: opCall, arg: int32(len(e.Args)), at: e.At})
		p.exprs = append(p.exprs, e)
	default:
		return &EvalError{Pos: e.Pos(), Msg: fmt.Sprintf("unknown expression %T", e)}
	}
	return nil
}

// isConst reports whether the program reads no input.
func (p *program) isConst() bool { return len(p.slots) == 0 }

// eval runs the program on the input values in. exact is false when a
// division was rounded on the way (or an input was inexact: inexact lists
// the inexact slots, nil when none are).
func (p *program) eval(pool *exact.Pool, in []exact.Num, inexact []bool) (v exact.Num, isExact bool, err *EvalError) {
	var buf [16]exact.Num
	st, isExact, err := p.run(pool, in, inexact, buf[:0])
	if err != nil {
		return exact.Zero, false, err
	}
	return st[0], isExact, nil
}

// run runs the program's operations on the stack st and returns it: one
// value for a whole program, a call's arguments for its body (args).
func (p *program) run(pool *exact.Pool, in []exact.Num, inexact []bool, st []exact.Num) (_ []exact.Num, isExact bool, err *EvalError) {
	isExact = true
	xi := 0 // the next expression in p.exprs
	for _, o := range p.ops {
		var expr tree.Expr
		if o.code.needsExpr() {
			expr = p.exprs[xi]
			xi++
		}
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
		case opCall:
			call := expr.(*tree.Call)
			n := int(o.arg)
			args := make([]decimal.Decimal, n)
			for i := range args {
				args[i] = pool.Dec(st[len(st)-n+i])
			}
			st = st[:len(st)-n]
			_, mean, ok, err := meanOf(functions[call.Func], args)
			if err != nil {
				at, msg := call.At, err.Error()
				if ae, isArg := err.(*dist.ArgError); isArg {
					msg = ae.Msg
					if ae.Arg >= 0 && ae.Arg < n {
						at = call.Args[ae.Arg].Pos()
					}
				}
				return nil, false, &EvalError{Pos: at, Msg: msg, Hint: "write it as " + functions[call.Func].usage}
			}
			isExact = isExact && ok
			st = append(st, pool.Of(mean))
			continue
		case opOutside:
			v, ok, err := evalOutside(expr, pool, in, inexact)
			if err != nil {
				return nil, false, err
			}
			isExact = isExact && ok
			st = append(st, v)
			continue
		case opQuantile:
			call := expr.(*tree.Call)
			n := int(o.arg)
			level := pool.Float64(st[len(st)-1])
			st = st[:len(st)-1]
			args := make([]decimal.Decimal, n)
			for i := range args {
				args[i] = pool.Dec(st[len(st)-n+i])
			}
			st = st[:len(st)-n]
			q, err := quantileOf(call, args, level)
			if err != nil {
				return nil, false, &EvalError{Pos: call.At, Msg: err.Error(), Hint: "write it as " + functions[call.Func].usage}
			}
			st = append(st, pool.Of(q))
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
				if b, ok := expr.(*tree.Binary); ok {
					if _, literal := b.Y.(*tree.Number); !literal {
						hint = "the divisor " + b.Y.String() + " is 0"
					}
				}
				return nil, false, &EvalError{Pos: o.at, Msg: "division by zero", Hint: hint}
			}
			var ok bool
			r, ok = pool.Div(x, y, DivisionScale)
			isExact = isExact && ok
		}
		if !pool.Bounded(r, MaxDigits) {
			return nil, false, &EvalError{Pos: o.at, Msg: fmt.Sprintf("this figure has more than %d significant digits", MaxDigits),
				Hint: "a figure this long is almost always a mistake (a number multiplied by itself again and again); forkcast keeps figures to " + fmt.Sprint(MaxDigits) + " digits"}
		}
		st[len(st)-1] = r
	}
	return st, isExact, nil
}

// evalFloat runs the program in float64 on the input values in (for
// simulation). A program with a distribution in it is never run in float64:
// simulation draws the distribution's slot instead.
func (p *program) evalFloat(in []float64) float64 {
	consts := p.fconsts
	var buf [16]float64
	st := buf[:0]
	xi := 0 // the next expression in p.exprs
	for _, o := range p.ops {
		var expr tree.Expr
		if o.code.needsExpr() {
			expr = p.exprs[xi]
			xi++
		}
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
		case opQuantile:
			// Its arguments never read a random input, so simulation
			// never needs it again; done the exact way for completeness.
			n := int(o.arg)
			args := make([]decimal.Decimal, n)
			for i := range args {
				args[i] = decimal.NewFromFloat(st[len(st)-1-n+i])
			}
			q, _ := quantileOf(expr.(*tree.Call), args, st[len(st)-1])
			st = append(st[:len(st)-1-n], q.InexactFloat64())
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

// progSlab holds the programs of a model's figures and their parts in
// slabs allocated whole: a large model has a program for most of its
// branches, and one allocation for each part would cost more memory (in
// rounding and spare capacity) than the parts themselves. Slabs live as
// long as the compiled model.
type progSlab struct {
	shared map[string]*program // programs that cannot fail, by what they compute (pack)
	progs  bulk.Slab[program]
	ops    bulk.Slab[op]
	consts bulk.Slab[exact.Num]
	floats bulk.Slab[float64]
	slots  bulk.Slab[int32]
}

// pack returns a copy of p made of slab parts, each exactly its size (p
// itself may be scratch space, used again). A program that cannot fail
// (it only reads inputs and negates them, as `cost fee` does) needs none
// of its positions, and one copy serves every figure written the same
// way.
func (s *progSlab) pack(p *program) *program {
	key, share := shareKey(p)
	if share {
		if q, ok := s.shared[key]; ok {
			return q
		}
	}
	q := s.copyOf(p)
	if share {
		if s.shared == nil {
			s.shared = map[string]*program{}
		}
		s.shared[key] = q
	}
	return q
}

// shareKey says what a program that cannot fail computes (its inputs and
// signs, not where they are written); share is false for any other.
func shareKey(p *program) (key string, share bool) {
	if len(p.ops) > 4 || len(p.consts) > 0 || len(p.exprs) > 0 {
		return "", false
	}
	var buf [4 * 5]byte
	k := buf[:0]
	for _, o := range p.ops {
		if o.code != opSlot && o.code != opNeg {
			return "", false
		}
		k = append(k, byte(o.code))
		k = binary.LittleEndian.AppendUint32(k, uint32(o.arg))
	}
	return string(k), true
}

// copyOf is p made of slab parts.
func (s *progSlab) copyOf(p *program) *program {
	q := s.progs.New()
	q.ops = s.ops.Cut(len(p.ops))
	copy(q.ops, p.ops)
	q.consts = s.consts.Cut(len(p.consts))
	copy(q.consts, p.consts)
	q.fconsts = s.floats.Cut(len(p.fconsts))
	copy(q.fconsts, p.fconsts)
	q.slots = s.slots.Cut(len(p.slots))
	copy(q.slots, p.slots)
	if len(p.exprs) > 0 {
		q.exprs = append([]tree.Expr(nil), p.exprs...)
	}
	return q
}
