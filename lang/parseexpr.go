package lang

import (
	"errors"
	"fmt"
	"strings"

	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// ParseExpr reads one calculation written as in a model: numbers (with _
// between digit groups and an optional %), names of inputs, + - * /,
// parentheses, a minus sign and calls, such as `12 * 61_000 - discount`.
// It is the reader the text language uses for every figure, for programs
// and formats that carry figures as text (the JSON interchange does).
//
// The text is one line; at is the position of its first character, and
// every position in the result and in the diagnostics counts columns (in
// characters) from there. Names are not looked up: whether an input of
// that name exists is checked when the model is compiled. `rest` is not a
// calculation: a reader that allows it where a probability stands must
// recognise it first.
//
// The expression is nil when there are errors; the diagnostics then say
// what is wrong and where, as for a model's text.
func ParseExpr(text string, at tree.Pos) (tree.Expr, tree.Diagnostics) {
	var ds tree.Diagnostics
	lx := lexLine(text, int(at.Line), int(at.Col), &ds)
	if lx.lexErr || lx.noParse {
		for i, d := range ds {
			if strings.HasPrefix(d.Summary, "the line is too long") {
				ds[i].Summary = strings.Replace(d.Summary, "the line", "the calculation", 1)
				ds[i].Hint = "split it into parts, each an input of its own"
			}
		}
		return nil, ds.Sort()
	}
	if len(lx.toks) == 0 {
		ds.Add(at, "write a number, the name of an input or a calculation", "the calculation is empty")
		return nil, ds
	}
	c := &cursor{toks: lx.toks, eof: lexer.EOFToken(lexer.Position{Line: int(at.Line), Column: lx.endCol})}
	e, err := exprOn(c)
	if err == nil && c.i != len(c.toks) {
		err = unexpected(c.Peek(), "")
	}
	if errors.Is(err, participle.NextMatch) {
		err = unexpected(c.Peek(), expectExpr)
	}
	if err != nil {
		ds = append(ds, exprSyntaxError(err, lx))
		return nil, ds
	}
	b := &builder{}
	x := b.expr(e, ctxExpr, lx)
	if b.ds.HasErrors() {
		return nil, b.ds.Sort()
	}
	return x, nil
}

// exprSyntaxError describes a syntax error in a calculation read on its
// own (ParseExpr): the words of a line's messages, said of a calculation.
func exprSyntaxError(err error, lx lexed) tree.Diagnostic {
	d := syntaxError(err, kNone, roleBranch, lx)
	var ute *participle.UnexpectedTokenError
	if !errors.As(err, &ute) {
		return d
	}
	t := ute.Unexpected
	exp := expectedPhrase(ute.Message())
	switch {
	case t.EOF() && exp != "":
		d.Summary = fmt.Sprintf("the calculation ends where %s was expected", exp)
	case t.EOF():
		d.Summary = "the calculation ends too early"
	case exp == "" && d.Summary == "unexpected "+describe(t):
		d.Summary = fmt.Sprintf("unexpected %s after the calculation", describe(t))
		d.Hint = "a calculation joins numbers and names with + - * / and parentheses, such as (base + extra) * 110%"
	}
	return d
}
