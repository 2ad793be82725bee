package lang

import (
	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
)

// The fast path. Large models are almost all branch lines and plain node
// lines; participle's reflective parsing costs microseconds a line, so
// these common shapes are recognised here directly, giving exactly the
// values participle would. Any line the fast path does not accept in full,
// including every line with a mistake, goes to participle, which remains
// the grammar of record and the source of syntax errors.
// TestFastPathAgrees checks that both give the same result.

// cursor is a tokenStream over a line's tokens.
type cursor struct {
	toks []lexer.Token
	i    int
	eof  lexer.Token
}

func (c *cursor) Peek() *lexer.Token {
	if c.i < len(c.toks) {
		return &c.toks[c.i]
	}
	return &c.eof
}

func (c *cursor) Next() *lexer.Token {
	t := c.Peek()
	if c.i < len(c.toks) {
		c.i++
	}
	return t
}

// fastParse returns the parsed line, or nil when participle must read it.
func fastParse(k lineKind, toks []lexer.Token) any {
	is := func(i int, t lexer.TokenType) bool { return len(toks) > i && toks[i].Type == t }
	switch k {
	case kItem:
		c := &cursor{toks: toks[1:], eof: lexer.EOFToken(lexer.Position{})}
		tail, err := itemTailOn(c)
		if err == participle.NextMatch {
			tail, err = nil, nil
		}
		if err != nil || c.i != len(c.toks) {
			return nil
		}
		return &gItem{Label: toks[0], Tail: tail}
	case kDecision:
		if len(toks) == 2 && is(1, tokString) {
			return &gDecision{Kw: toks[0], Label: &gLabel{Str: &toks[1]}}
		}
	case kChance:
		switch {
		case len(toks) == 2 && is(1, tokString):
			return &gChance{Kw: toks[0], Label: &toks[1]}
		case len(toks) == 2 && is(1, tokIdent):
			return &gChance{Kw: toks[0], Name: &toks[1]}
		case len(toks) == 3 && is(1, tokIdent) && is(2, tokString):
			return &gChance{Kw: toks[0], Name: &toks[1], Label: &toks[2]}
		}
	case kSubtree:
		if len(toks) == 2 && is(1, tokIdent) {
			return &gSubtree{Kw: toks[0], Name: toks[1]}
		}
	case kLet:
		// let NAME = Expr [in Expr .. Expr]
		if len(toks) < 4 || !is(1, tokIdent) || !isPunct(&toks[2], "=") {
			return nil
		}
		c := &cursor{toks: toks[3:], eof: lexer.EOFToken(lexer.Position{})}
		v, err := exprOn(c)
		if err != nil {
			return nil
		}
		g := &gLet{Kw: toks[0], Name: toks[1], Value: v}
		if t := c.Peek(); t.Type == tokKeyword && t.Value == "in" {
			in := *c.Next()
			lo, err := exprOn(c)
			if err != nil || !isPunct(c.Peek(), "..") {
				return nil
			}
			c.Next()
			hi, err := exprOn(c)
			if err != nil {
				return nil
			}
			g.In, g.Low, g.High = &in, lo, hi
		}
		if c.i != len(c.toks) {
			return nil
		}
		return g
	case kUse:
		if len(toks) == 2 && is(1, tokIdent) {
			return &gUse{Kw: toks[0], Name: toks[1]}
		}
	}
	return nil
}
