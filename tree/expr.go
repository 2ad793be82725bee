package tree

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"
)

// DivisionScale is the number of decimal places a division is carried to.
// Rollback itself only adds and multiplies, so its results are exact; a
// division (a fraction literal, Bayes' rule, a breakeven) is the one place
// a figure is rounded, at this scale, and results that went through one are
// marked inexact.
const DivisionScale = 50

// Expr is a numeric expression as written in a model: a number, a name of a
// parameter, or an operation on those. Expressions are kept in the model so
// an analysis can change a parameter and resolve again.
type Expr interface {
	// Pos is where the expression starts in the source.
	Pos() Pos
	// String renders the expression in the text language's syntax.
	String() string
}

// Number is a literal. Percent literals are stored already divided by 100.
type Number struct {
	At    Pos
	Value decimal.Decimal
	Text  string // as written, e.g. "55%" or "1_150_000"; may be empty
}

// Name refers to a parameter (`let`).
type Name struct {
	At   Pos
	Name string
}

// Unary is a negation: -X.
type Unary struct {
	At Pos
	Op byte // '-'
	X  Expr
}

// Binary is X op Y with op one of + - * /.
type Binary struct {
	At   Pos
	Op   byte
	X, Y Expr
}

// Call is a function applied to arguments. No functions are defined yet;
// the form is here so the language can grow without a new node type.
type Call struct {
	At   Pos
	Func string
	Args []Expr
}

func (e *Number) Pos() Pos { return e.At }
func (e *Name) Pos() Pos   { return e.At }
func (e *Unary) Pos() Pos  { return e.At }
func (e *Binary) Pos() Pos { return e.At }
func (e *Call) Pos() Pos   { return e.At }

func (e *Number) String() string {
	if e.Text != "" {
		return e.Text
	}
	return e.Value.String()
}
func (e *Name) String() string  { return e.Name }
func (e *Unary) String() string { return string(e.Op) + e.X.String() }
func (e *Binary) String() string {
	return "(" + e.X.String() + " " + string(e.Op) + " " + e.Y.String() + ")"
}
func (e *Call) String() string {
	args := make([]string, len(e.Args))
	for i, a := range e.Args {
		args[i] = a.String()
	}
	return e.Func + "(" + strings.Join(args, ", ") + ")"
}

// Num wraps a decimal as an expression (for models built in Go).
func Num(d decimal.Decimal) Expr { return &Number{Value: d} }

// Value is a resolved number and whether it is exact (no division rounded
// it on the way).
type Value struct {
	D     decimal.Decimal
	Exact bool
}

// EvalError is an expression that cannot be evaluated.
type EvalError struct {
	Pos  Pos
	Msg  string
	Hint string
	Name string // the unknown name, when that is the problem
}

func (e *EvalError) Error() string { return e.Pos.String() + ": " + e.Msg }

// Eval evaluates e, looking names up with lookup.
func Eval(e Expr, lookup func(name string) (Value, bool)) (Value, error) {
	switch e := e.(type) {
	case *Number:
		return Value{e.Value, true}, nil
	case *Name:
		v, ok := lookup(e.Name)
		if !ok {
			return Value{}, &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown name %q", e.Name), Name: e.Name,
				Hint: "define it with `let " + e.Name + " = ...` above this line"}
		}
		return v, nil
	case *Unary:
		x, err := Eval(e.X, lookup)
		if err != nil {
			return x, err
		}
		return Value{x.D.Neg(), x.Exact}, nil
	case *Binary:
		x, err := Eval(e.X, lookup)
		if err != nil {
			return x, err
		}
		y, err := Eval(e.Y, lookup)
		if err != nil {
			return y, err
		}
		exact := x.Exact && y.Exact
		switch e.Op {
		case '+':
			return Value{x.D.Add(y.D), exact}, nil
		case '-':
			return Value{x.D.Sub(y.D), exact}, nil
		case '*':
			return Value{x.D.Mul(y.D), exact}, nil
		case '/':
			if y.D.IsZero() {
				hint := "check the figures that make up the divisor"
				if _, literal := e.Y.(*Number); !literal {
					hint = "the divisor " + e.Y.String() + " is 0"
				}
				return Value{}, &EvalError{Pos: e.Y.Pos(), Msg: "division by zero", Hint: hint}
			}
			return Div(x.D, y.D, exact), nil
		}
		return Value{}, &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown operator %q", e.Op)}
	case *Call:
		return Value{}, &EvalError{Pos: e.At, Msg: fmt.Sprintf("unknown function %q", e.Func)}
	case nil:
		return Value{decimal.Zero, true}, nil
	}
	return Value{}, &EvalError{Msg: fmt.Sprintf("unknown expression %T", e)}
}

// Div divides x by y at DivisionScale, reporting whether the result is
// exact. y must not be zero.
func Div(x, y decimal.Decimal, exact bool) Value {
	q := x.DivRound(y, DivisionScale)
	if exact && !q.Mul(y).Equal(x) {
		exact = false
	}
	return Value{q, exact}
}

// Names calls f for every name referred to in e.
func Names(e Expr, f func(*Name)) {
	switch e := e.(type) {
	case *Name:
		f(e)
	case *Unary:
		Names(e.X, f)
	case *Binary:
		Names(e.X, f)
		Names(e.Y, f)
	case *Call:
		for _, a := range e.Args {
			Names(a, f)
		}
	}
}
