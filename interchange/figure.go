package interchange

import (
	"bytes"
	"fmt"
	"strconv"
	"unicode"
	"unicode/utf8"

	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// figure reads a figure: a JSON number, a decimal string, a calculation
// in the text language's syntax, or, where rest is allowed, "rest". It
// returns nil (reported) when the value is none of these.
func (r *reader) figure(key, what string, restOK bool) (x tree.Expr, rest bool) {
	t := r.s.next()
	if t != tNumber && t != tString {
		r.notFigure(t, key, what, restOK)
		return nil, false
	}
	return r.figureOf(r.s.tok(), restOK)
}

// notFigure reports (and skips) a value that cannot be a figure.
func (r *reader) notFigure(t tokKind, key, what string, restOK bool) {
	hint := "write a number such as 0.25, or a string: a decimal such as \"0.25\" or a calculation such as \"licence * 12\""
	if restOK {
		hint += ", or \"rest\""
	}
	r.wrongType(t, fmt.Sprintf("%q of %s must be a number, not %s", key, what, kindName(t)), hint)
}

// figureOf reads a figure from a number or string token.
func (r *reader) figureOf(t token, restOK bool) (x tree.Expr, rest bool) {
	switch {
	case t.kind == tNumber:
		d, ok := r.number(t, true)
		if !ok {
			return nil, false
		}
		return tree.NumberOf(t.pos, d), false
	case restOK && string(t.text) == "rest":
		return nil, true
	case isNameBytes(t.text):
		// The common calculation: an input's name.
		nm := &tree.Name{At: t.at(0), Name: string(t.text)}
		r.names = append(r.names, nm)
		return nm, false
	case plainDecimal(t.text):
		d, ok := r.number(t, false)
		if !ok {
			return nil, false
		}
		return tree.NumberOf(t.pos, d), false
	}
	return r.calculation(t), false
}

// plainDecimal reports whether b is a decimal as JSON writes numbers,
// without an exponent: -?[0-9]+(.[0-9]+)?. Any other string is read as a
// calculation, so the two cannot be confused: a plain decimal read as a
// calculation has the same value.
func plainDecimal(b []byte) bool {
	if len(b) > 0 && b[0] == '-' {
		b = b[1:]
	}
	dot, digits := -1, 0
	for i, c := range b {
		switch {
		case c >= '0' && c <= '9':
			digits++
		case c == '.' && dot < 0 && i > 0:
			dot = i
		default:
			return false
		}
	}
	return digits > 0 && dot != len(b)-1
}

// number converts a number token (a JSON number, or a plain decimal
// string) exactly. A number may have at most lang.MaxDigits digits written
// out in full, as in the text language.
func (r *reader) number(t token, isJSON bool) (decimal.Decimal, bool) {
	text, pos := t.text, t.pos
	digits := t.digits
	if !isJSON {
		digits = 0
		for _, c := range text {
			if c >= '0' && c <= '9' {
				digits++
			}
		}
	}
	tooMany := func(n int, full string) (decimal.Decimal, bool) {
		r.err(pos, "round it; for very large amounts, count in a larger unit (thousands or millions) throughout the model",
			"the number %s has %s digits%s; a number may have at most %d", shorten(string(text)), grouped(n), full, lang.MaxDigits)
		return decimal.Decimal{}, false
	}
	if t.long || digits > lang.MaxDigits {
		return tooMany(digits, "")
	}
	mant, exp := text, 0
	if i := bytes.IndexAny(text, "eE"); i >= 0 {
		mant = text[:i]
		e := text[i+1:]
		neg := len(e) > 0 && e[0] == '-'
		e = bytes.TrimLeft(e, "+-")
		e = bytes.TrimLeft(e, "0")
		if len(e) > 6 {
			r.err(pos, "write the number out in full, or as a decimal string", "the number %s has more than a million digits written out in full; a number may have at most %d", shorten(string(text)), lang.MaxDigits)
			return decimal.Decimal{}, false
		}
		exp, _ = strconv.Atoi(string(e))
		if neg {
			exp = -exp
		}
	}
	unsigned := bytes.TrimPrefix(mant, []byte("-"))
	if len(bytes.Trim(unsigned, "0.")) == 0 {
		return decimal.Zero, true
	}
	// The digits the number has written out in full, from where the point
	// falls: integer digits intDigits+exp (at least 1), fraction digits
	// fracDigits-exp (at least 0).
	intDigits := bytes.IndexByte(unsigned, '.')
	if intDigits < 0 {
		intDigits = len(unsigned)
	}
	fracDigits := digits - intDigits
	if full := max(intDigits+exp, 1) + max(fracDigits-exp, 0); full > lang.MaxDigits {
		return tooMany(full, " written out in full")
	}
	if exp == 0 && len(mant) == len(text) && digits <= 18 {
		// The common case, without a big number on the way.
		var m int64
		frac, point := int32(0), false
		for _, c := range unsigned {
			switch {
			case c == '.':
				point = true
			default:
				m = m*10 + int64(c-'0')
				if point {
					frac++
				}
			}
		}
		if len(unsigned) < len(mant) {
			m = -m
		}
		return decimal.New(m, -frac), true
	}
	d, err := decimal.NewFromString(string(text))
	if err != nil {
		r.err(pos, "", "%s is not a decimal number", shorten(string(text)))
		return decimal.Decimal{}, false
	}
	return d, true
}

// calculation reads a string token as a calculation in the text language's
// syntax, with positions in the JSON text.
func (r *reader) calculation(t token) tree.Expr {
	if bytes.HasPrefix(t.text, []byte("register ")) {
		text := string(t.text)
		// What the solved output writes for an input taken from a
		// register: the registers themselves are only in the text.
		r.errLen(t.pos, len([]rune(text))+2, "registers are read from .fork text only: solve the .fork file, or give the input a number here",
			"%s: the interchange JSON holds no risk registers", shorten(text))
		return nil
	}
	x, ds := lang.ParseExpr(string(t.text), tree.Pos{Line: 1, Col: 1})
	place := func(p tree.Pos) tree.Pos {
		if !p.IsValid() {
			return t.pos
		}
		return t.at(int(p.Col) - 1)
	}
	for _, d := range ds {
		if r.stopped {
			break
		}
		r.errLen(place(d.Pos), d.Len, d.Hint, "%s", d.Summary)
	}
	if x == nil {
		return nil
	}
	relocate(x, place, &r.names)
	return x
}

// relocate moves the positions of a calculation read on its own into the
// JSON text, and collects the names it uses.
func relocate(x tree.Expr, place func(tree.Pos) tree.Pos, names *[]*tree.Name) {
	switch e := x.(type) {
	case *tree.Number:
		e.At = place(e.At)
	case *tree.Name:
		e.At = place(e.At)
		*names = append(*names, e)
	case *tree.Unary:
		e.At = place(e.At)
		relocate(e.X, place, names)
	case *tree.Binary:
		e.At = place(e.At)
		relocate(e.X, place, names)
		relocate(e.Y, place, names)
	case *tree.Call:
		e.At = place(e.At)
		for _, a := range e.Args {
			relocate(a, place, names)
		}
	}
}

// shortLen is the most of a long number a message repeats.
const shortLen = 40

func shorten(s string) string {
	if utf8.RuneCountInString(s) <= shortLen {
		return s
	}
	n := 0
	for i := range s {
		if n == shortLen-1 {
			return s[:i] + "…"
		}
		n++
	}
	return s
}

// isName reports whether s is a name in the text language: a letter or _
// followed by letters, digits and _, and not a reserved word.
func isName(s string) bool { return isNameBytes([]byte(s)) }

// isNameBytes is isName on the bytes of a string.
func isNameBytes(b []byte) bool {
	if len(b) == 0 {
		return false
	}
	for i := 0; i < len(b); {
		c, size := utf8.DecodeRune(b[i:])
		if c != '_' && !unicode.IsLetter(c) && (i == 0 || !unicode.IsDigit(c)) {
			return false
		}
		i += size
	}
	switch string(b) {
	case "gain", "cost", "rest", "if", "in", "on":
		return false
	}
	return true
}

// plus adds two amounts, either of which may be absent.
func plus(x, y tree.Expr) tree.Expr {
	switch {
	case x == nil:
		return y
	case y == nil:
		return x
	}
	return &tree.Binary{At: x.Pos(), Op: '+', X: x, Y: y}
}
