package compiled

import (
	"fmt"
	"sort"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Outside values. A `let` may take its value from a part of the model
// outside the tree's own figures — a risk register's total, written
// `let build_risks = register site_works total` (tree.Outside). The
// compiler does not know what such a part is: it asks the Resolver it is
// given for the value's distribution, with a Scope through which the
// resolver reads the model's inputs (those above the `let`). From then on
// the value is a random input like a distribution written in the model:
// exact analyses take its mean (exact where the distribution's mean is
// rational), simulation draws it (it is one of Uncertain's inputs), and
// With asks the resolver again when an input it read changes.

// Options change how CompileWith compiles.
type Options struct {
	// Resolve gives the distribution of an outside value (tree.Outside);
	// nil makes a model with one an error.
	Resolve Resolver
	// Uses are other expressions of the model that read its inputs (a
	// register's figures, say): the names in them count as used, so that
	// an input used only there is not reported as unused.
	Uses []tree.Expr
}

// Resolver gives the distribution an outside value stands for, reading
// the model's inputs through s. An error it returns is reported at the
// value (an *EvalError at its own position).
type Resolver func(e tree.Outside, s *Scope) (dist.Distribution, error)

// CompileWith is Compile with options.
func CompileWith(m *tree.Model, opts Options) (*Model, tree.Diagnostics) {
	return compile(m, opts)
}

// Scope evaluates figures written outside the tree at a model's inputs:
// during compiling, the inputs above the `let` being compiled; on a
// compiled model (Model.Scope), every input. A figure is a number, or a
// distribution written whole (pert(40_000, 60_000, 150_000)); it may not
// read an input that is itself drawn from a distribution.
type Scope struct {
	pool    *exact.Pool
	look    func(n *tree.Name) (int32, *EvalError)
	in      []exact.Num
	inexact []bool
	random  []bool
	read    map[int32]bool
}

// Value is a figure a Scope evaluated: a number (Dist nil) or a
// distribution with its arguments evaluated (Func and Args as written).
type Value struct {
	Num   decimal.Decimal
	Exact bool // Num went through no rounded division
	Dist  dist.Distribution
	Func  string
	Args  []decimal.Decimal
}

// Scope returns a scope over every input of c at its current value.
func (c *Model) Scope() *Scope {
	sh := c.sh
	visible := int32(len(sh.params))
	return &Scope{pool: c.pool, in: c.in, inexact: c.inInexact, random: sh.random, read: map[int32]bool{},
		look: func(n *tree.Name) (int32, *EvalError) {
			if s, ok := sh.slotOf[n.Name]; ok && s < visible {
				return s, nil
			}
			return 0, &EvalError{Pos: n.At, Msg: fmt.Sprintf("unknown name %q", n.Name), Name: n.Name,
				Hint: "define it with `let " + n.Name + " = ...`"}
		}}
}

// Value evaluates e: a distribution when e is one written whole, a number
// otherwise.
func (s *Scope) Value(e tree.Expr) (Value, *EvalError) {
	if call, ok := e.(*tree.Call); ok {
		d, args, err := s.Distribution(call)
		return Value{Dist: d, Func: call.Func, Args: args}, err
	}
	v, isExact, err := s.Number(e)
	return Value{Num: v, Exact: isExact}, err
}

// Number evaluates e, which must hold no distribution.
func (s *Scope) Number(e tree.Expr) (decimal.Decimal, bool, *EvalError) {
	p, err := compileExpr(s.pool, e, s.look, func(c *tree.Call) (int32, *EvalError) {
		return 0, &EvalError{Pos: c.At, Msg: fmt.Sprintf("a distribution inside a calculation: %s(...)", c.Func),
			Hint: "a figure here is a number, a calculation, or one distribution written whole, such as pert(10_000, 15_000, 40_000)"}
	})
	if err != nil {
		return decimal.Zero, false, err
	}
	var bad *tree.Name
	tree.Names(e, func(n *tree.Name) {
		if slot, err := s.look(n); err == nil && bad == nil && int(slot) < len(s.random) && s.random[slot] {
			bad = n
		}
	})
	if bad != nil {
		return decimal.Zero, false, &EvalError{Pos: bad.At, Name: bad.Name,
			Msg:  fmt.Sprintf("%q is drawn from a distribution; it cannot be used here", bad.Name),
			Hint: "a register's figures are fixed figures or distributions written in place, so that its risks stay independent; write the distribution here instead"}
	}
	for _, slot := range p.slots {
		s.read[slot] = true
	}
	v, isExact, err := p.eval(s.pool, s.in, s.inexact)
	if err != nil {
		return decimal.Zero, false, err
	}
	return s.pool.Dec(v), isExact, nil
}

// Distribution evaluates a distribution written whole: its arguments,
// each a number, and the distribution they make, checked as a model's
// (an error points at the argument at fault).
func (s *Scope) Distribution(call *tree.Call) (dist.Distribution, []decimal.Decimal, *EvalError) {
	fn, ok := functions[call.Func]
	if !ok {
		return nil, nil, &EvalError{Pos: call.At, Msg: fmt.Sprintf("unknown function %q", call.Func),
			Hint: "the functions are the distributions " + functionNames()}
	}
	if n := len(call.Args); n < fn.min || (fn.max >= 0 && n > fn.max) {
		return nil, nil, &EvalError{Pos: call.At, Msg: argError(call.Func, fn, n)}
	}
	args := make([]decimal.Decimal, len(call.Args))
	for i, a := range call.Args {
		v, _, err := s.Number(a)
		if err != nil {
			return nil, nil, err
		}
		args[i] = v
	}
	d, err := fn.make(args)
	if err != nil {
		at, msg := call.At, err.Error()
		if ae, isArg := err.(*dist.ArgError); isArg {
			msg = ae.Msg
			if ae.Arg >= 0 && ae.Arg < len(call.Args) {
				at = call.Args[ae.Arg].Pos()
			}
		}
		return nil, nil, &EvalError{Pos: at, Msg: msg, Hint: "write it as " + fn.usage}
	}
	return d, args, nil
}

// Reads returns the input slots the scope's figures read so far.
func (s *Scope) reads() []int32 {
	out := make([]int32, 0, len(s.read))
	for slot := range s.read {
		out = append(out, slot)
	}
	sort.Slice(out, func(i, j int) bool { return out[i] < out[j] })
	return out
}

// outside is an outside value of a compiled model: what it is, and how to
// ask for its distribution again at other input values.
type outside struct {
	expr    tree.Outside
	resolve Resolver
	look    func(n *tree.Name) (int32, *EvalError)
	sh      *shape // its random flags, once compiling is done
}

// outsideExpr is the expression an outside value's program carries
// (opOutside): the value as written, and its outside.
type outsideExpr struct {
	tree.Outside
	o *outside
}

// dist asks the resolver for the distribution at the inputs in.
func (o *outside) dist(pool *exact.Pool, in []exact.Num, inexact []bool, random []bool) (dist.Distribution, *Scope, *EvalError) {
	if random == nil {
		random = o.sh.random
	}
	s := &Scope{pool: pool, look: o.look, in: in, inexact: inexact, random: random, read: map[int32]bool{}}
	d, err := o.resolve(o.expr, s)
	if err != nil {
		if ee, ok := err.(*EvalError); ok {
			return nil, s, ee
		}
		return nil, s, &EvalError{Pos: o.expr.Pos(), Msg: err.Error()}
	}
	if d == nil {
		return nil, s, &EvalError{Pos: o.expr.Pos(), Msg: "no distribution for " + o.expr.String()}
	}
	return d, s, nil
}

// meanOfDist is d's mean as meanOf gives a distribution's.
func meanOfDist(d dist.Distribution) (decimal.Decimal, bool) {
	if r, ok := d.MeanExact(); ok {
		m := decimal.NewFromBigRat(r, DivisionScale)
		return m, m.Rat().Cmp(r) == 0
	}
	return decimal.NewFromFloat(d.Mean()), false
}

// program compiles a figure: an outside value written as a `let`'s whole
// value becomes a random input of its own, which the figure reads;
// anything else compiles as usual, into the compiler's scratch program
// (figure keeps a packed copy).
func (k *compiler) program(e tree.Expr) (*program, *EvalError) {
	if o, ok := e.(tree.Outside); ok && k.current != nil && k.current.Expr == e {
		slot, err := k.outside(o)
		if err != nil {
			return nil, err
		}
		return &program{ops: []op{{code: opSlot, arg: slot, at: o.Pos()}}, slots: []int32{slot}, fconsts: []float64{}}, nil
	}
	return compileInto(&k.scratchProg, k.pool, e, k.look, k.source)
}

// outside compiles the outside value o (the whole value of the `let`
// being compiled) into a random input slot.
func (k *compiler) outside(o tree.Outside) (int32, *EvalError) {
	if k.opts.Resolve == nil {
		return 0, &EvalError{Pos: o.Pos(), Msg: fmt.Sprintf("%s cannot be read here", o),
			Hint: "a model that takes inputs from a register is read with lang.Load, which knows registers"}
	}
	visible, self := k.visible, k.current
	sh := k.c.sh
	out := &outside{expr: o, resolve: k.opts.Resolve, sh: sh,
		look: func(n *tree.Name) (int32, *EvalError) {
			if s, ok := sh.slotOf[n.Name]; ok && s < visible {
				return s, nil
			}
			if self != nil && n.Name == self.Name {
				return 0, &EvalError{Pos: n.At, Name: n.Name, Msg: fmt.Sprintf("%q reads itself: it is %s, whose figures use it", n.Name, o),
					Hint: "give the register a figure of its own here, not the input taken from it"}
			}
			return 0, &EvalError{Pos: n.At, Name: n.Name, Msg: fmt.Sprintf("unknown name %q", n.Name),
				Hint: fmt.Sprintf("%s is read where `let %s` stands: the inputs its figures use must be defined above that line", o, self.Name)}
		}}
	d, s, err := out.dist(k.pool, k.c.in, k.c.inInexact, k.random)
	if s != nil {
		// Names the resolver met count as used, found or not.
		for slot := range s.read {
			k.used[sh.params[slot].Name] = true
		}
	}
	if err != nil {
		return 0, err
	}
	mean, isExact := meanOfDist(d)
	slot := int32(len(k.c.in))
	k.c.in = append(k.c.in, k.pool.Of(mean))
	if k.c.inInexact != nil {
		k.c.inInexact = append(k.c.inInexact, false)
	}
	k.random = append(k.random, true)
	if !isExact {
		k.c.rounded = true
		k.inexactSlot(slot)
	}
	p := &program{ops: []op{{code: opOutside, at: o.Pos()}}, exprs: []tree.Expr{&outsideExpr{Outside: o, o: out}}, slots: s.reads(), fconsts: []float64{}}
	sh.sources = append(sh.sources, source{out: out, slot: slot, prog: p, let: visible})
	if !p.isConst() {
		sh.dyn = append(sh.dyn, dynFig{kind: figInput, i: slot, prog: p})
	}
	return slot, nil
}

// evalOutside is opOutside: the mean of the outside value at the inputs
// in.
func evalOutside(e tree.Expr, pool *exact.Pool, in []exact.Num, inexact []bool) (exact.Num, bool, *EvalError) {
	o := e.(*outsideExpr).o
	d, _, err := o.dist(pool, in, inexact, nil)
	if err != nil {
		return exact.Zero, false, err
	}
	mean, isExact := meanOfDist(d)
	return pool.Of(mean), isExact, nil
}

// usedElsewhere marks the names in opts.Uses as used.
func (k *compiler) usedElsewhere() {
	for _, e := range k.opts.Uses {
		tree.Names(e, func(n *tree.Name) { k.used[n.Name] = true })
	}
}

// HasTree reports whether the model has a tree. A model may hold only
// inputs and risk registers (tree.Model.Registers), which package
// register analyses; it has no nodes then, and eval refuses to solve it.
func (c *Model) HasTree() bool { return c.src.Root != nil }

// SharedDraws is an outside value's distribution whose draws are tied to
// those of the other values with the same DrawKey in the same run: a
// register's total and one of its risks, or its total with and without
// the responses, see the same risks occur. Simulation gives each run one
// seed per key (eval.Simulate); a plain Rand draws on its own.
type SharedDraws interface {
	dist.Distribution
	// DrawKey names the source of the shared draws, such as "register
	// works".
	DrawKey() string
	// DrawShared returns the value drawn from the run's seed for its key.
	DrawShared(seed uint64) float64
}
