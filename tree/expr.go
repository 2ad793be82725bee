package tree

import (
	"strings"

	"github.com/shopspring/decimal"
)

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

// Call is a function applied to arguments.
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
