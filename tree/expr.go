package tree

import (
	"bytes"
	"strconv"
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

// Number is a literal: a value, and the text it was written as, if any
// ("55%", "1_150_000"). Percent literals are held already divided by 100.
//
// A large model holds a number or two on every branch, so a Number is
// kept small: the value as a coefficient and a power of ten in machine
// words, and the text only when it cannot be told from them (the usual
// forms, such as 55%, 0.50 and 1_150_000, can). A coefficient too large
// for 64 bits is kept as a decimal on the side.
type Number struct {
	At   Pos
	c    int64      // the value is c × 10^e, unless ext holds a big one
	ext  *numberExt // nil for most numbers
	e    int32
	form numberForm
}

// numberExt is what few numbers need: a value too large for Number.c, or
// text that the value does not give back.
type numberExt struct {
	big  *decimal.Decimal
	text string
}

// numberForm says how a number was written, so that its text can be given
// back from its value.
type numberForm uint8

const (
	formWritten numberForm = 1 << iota // read from text: String gives it back
	formPercent                        // written with %: the digits are c × 10^(e+2)
	formGrouped                        // written with _ between groups of three digits
)

// NumberOf makes a number of value v, with no text (String gives the value
// itself).
func NumberOf(at Pos, v decimal.Decimal) *Number {
	n := &Number{At: at}
	n.set(v)
	return n
}

func (n *Number) set(v decimal.Decimal) {
	if v.NumDigits() <= 18 {
		n.c, n.e = v.CoefficientInt64(), v.Exponent()
		return
	}
	n.ext = &numberExt{big: &v}
}

// WrittenNumber makes the number written as text at at, whose value is
// c × 10^e (a percent already divided by 100). The text is copied only
// when the value and its form do not give it back.
func WrittenNumber(at Pos, c int64, e int32, text []byte) Number {
	if c <= -maxSmall || c >= maxSmall {
		return WrittenDecimal(at, decimal.New(c, e), string(text))
	}
	n := Number{At: at, c: c, e: e, form: formWritten}
	n.keepText(text)
	return n
}

// maxSmall bounds the coefficients held in machine words: 18 digits, so
// that sums of two never overflow (the compiled form counts on it).
const maxSmall = 1_000_000_000_000_000_000

// WrittenDecimal is WrittenNumber for a value of any size.
func WrittenDecimal(at Pos, v decimal.Decimal, text string) Number {
	n := Number{At: at, form: formWritten}
	n.set(v)
	n.keepText([]byte(text))
	return n
}

// keepText records how text writes the value: as flags when the text can
// be made again from them, as the text itself otherwise.
func (n *Number) keepText(text []byte) {
	if bytes.HasSuffix(text, []byte("%")) {
		n.form |= formPercent
	}
	if bytes.IndexByte(text, '_') >= 0 {
		n.form |= formGrouped
	}
	var buf [64]byte
	if n.ext == nil && len(text) < len(buf)-8 && bytes.Equal(n.appendWritten(buf[:0]), text) {
		return
	}
	if n.ext == nil {
		n.ext = &numberExt{}
	}
	n.ext.text = string(text)
}

// appendWritten writes the number as its flags say it was written: digits
// with a decimal point, _ between groups of three in the whole part when
// grouped, % when a percent.
func (n *Number) appendWritten(b []byte) []byte {
	e := n.e
	if n.form&formPercent != 0 {
		e += 2
	}
	if n.c < 0 || e > 0 {
		return append(b, '?') // never written so: keepText keeps the text
	}
	var dbuf [20]byte
	digits := strconv.AppendInt(dbuf[:0], n.c, 10)
	places := int(-e)
	if places >= len(digits) {
		// 0.05: a zero before the point, zeros after it.
		b = append(b, '0', '.')
		for range places - len(digits) {
			b = append(b, '0')
		}
		b = append(b, digits...)
	} else {
		whole := digits[:len(digits)-places]
		for i, d := range whole {
			if i > 0 && n.form&formGrouped != 0 && (len(whole)-i)%3 == 0 {
				b = append(b, '_')
			}
			b = append(b, d)
		}
		if places > 0 {
			b = append(b, '.')
			b = append(b, digits[len(digits)-places:]...)
		}
	}
	if n.form&formPercent != 0 {
		b = append(b, '%')
	}
	return b
}

// Value is the number's value.
func (n *Number) Value() decimal.Decimal {
	if n.ext != nil && n.ext.big != nil {
		return *n.ext.big
	}
	return decimal.New(n.c, n.e)
}

// Small returns the value as c × 10^e, without making a decimal, when the
// coefficient has at most 18 digits (ok false otherwise: Value has it).
func (n *Number) Small() (c int64, e int32, ok bool) {
	if n.ext != nil && n.ext.big != nil {
		return 0, 0, false
	}
	return n.c, n.e, true
}

// Text is the number as written ("55%", "1_150_000"), or "" for a number
// that was not read from text.
func (n *Number) Text() string {
	switch {
	case n.form&formWritten == 0:
		return ""
	case n.ext != nil && n.ext.text != "":
		return n.ext.text
	}
	return string(n.appendWritten(nil))
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
	if t := e.Text(); t != "" {
		return t
	}
	return e.Value().String()
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

// Negate is −x as simply as it can be written: a number negated, a
// negation undone, anything else wrapped.
func Negate(x Expr) Expr {
	switch e := x.(type) {
	case *Number:
		return NumberOf(e.At, e.Value().Neg())
	case *Unary:
		if e.Op == '-' {
			return e.X
		}
	}
	return &Unary{At: x.Pos(), Op: '-', X: x}
}
