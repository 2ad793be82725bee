package lang

import (
	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
)

// exprValue is a parsed expression; primaryValue is one that may stand as a
// probability without parentheses (a number, a name, a call, a
// parenthesised expression). Both are read by the functions below, which
// participle calls where the grammar has an exprValue or primaryValue field.
type (
	exprValue    interface{ exprNode() }
	primaryValue interface{ exprNode() }
)

type (
	eNum  struct{ Tok lexer.Token }
	eRest struct{ Tok lexer.Token } // `rest` where an expression stands: reported when lowered
	eName struct{ Tok lexer.Token }
	eCall struct {
		Name lexer.Token
		Args []exprValue
	}
	eParen struct {
		Open lexer.Token
		X    exprValue
	}
	eNeg struct {
		Tok lexer.Token
		X   exprValue
	}
	eBin struct {
		Op   lexer.Token
		X, Y exprValue
	}
)

func (*eNum) exprNode()   {}
func (*eRest) exprNode()  {}
func (*eName) exprNode()  {}
func (*eCall) exprNode()  {}
func (*eParen) exprNode() {}
func (*eNeg) exprNode()   {}
func (*eBin) exprNode()   {}

// Expectations, in the words of participle's messages; expectedPhrase
// turns them into English.
const (
	expectExpr  = "GExpr"
	expectClose = `")"`
	expectGiven = "GGiven"
)

// tokenStream is what the hand-written parsers read from: participle's
// PeekingLexer when participle calls them, or a plain cursor on the fast
// path (fast.go).
type tokenStream interface {
	Peek() *lexer.Token
	Next() *lexer.Token
}

func isPunct(t *lexer.Token, v string) bool { return t.Type == tokPunct && t.Value == v }

// startsPrimary reports whether t can begin a primary.
func startsPrimary(t *lexer.Token) bool {
	switch t.Type {
	case tokNumber, tokIdent:
		return true
	case tokKeyword:
		return t.Value == "rest"
	case tokPunct:
		return t.Value == "("
	}
	return false
}

func unexpected(t *lexer.Token, expect string) error {
	return &participle.UnexpectedTokenError{Unexpected: *t, Expect: expect}
}

// parseExprValue reads a whole expression: terms joined by + and -.
func parseExprValue(pl *lexer.PeekingLexer) (exprValue, error) { return exprOn(pl) }

func exprOn(pl tokenStream) (exprValue, error) {
	if t := pl.Peek(); !startsPrimary(t) && !isPunct(t, "-") {
		return nil, participle.NextMatch
	}
	return parseSum(pl)
}

// parseItemTail reads what follows an item's label (see gItem). Anything
// left over is reported by participle as unexpected.
func parseItemTail(pl *lexer.PeekingLexer) (itemTail, error) { return itemTailOn(pl) }

func itemTailOn(pl tokenStream) (itemTail, error) {
	if pl.Peek().EOF() {
		return nil, participle.NextMatch
	}
	t := &gTail{}
	if startsPrimary(pl.Peek()) {
		g, err := parseGiven(pl)
		if err != nil {
			return nil, err
		}
		t.Amount = &gAmount{First: g}
		for isPunct(pl.Peek(), ",") {
			pl.Next()
			if !startsPrimary(pl.Peek()) {
				return nil, unexpected(pl.Peek(), expectGiven)
			}
			g, err := parseGiven(pl)
			if err != nil {
				return nil, err
			}
			t.Amount.More = append(t.Amount.More, g)
		}
	}
	for {
		k := pl.Peek()
		if k.Type != tokKeyword || k.Value != "gain" && k.Value != "cost" {
			return t, nil
		}
		kind := *pl.Next()
		e, err := parseArg(pl)
		if err != nil {
			return nil, err
		}
		t.Cash = append(t.Cash, &gCash{Kind: kind, Amount: e})
	}
}

// parseGiven reads `rest` or a primary, then an optional `if "State"`.
func parseGiven(pl tokenStream) (*gGiven, error) {
	g := &gGiven{}
	if t := pl.Peek(); t.Type == tokKeyword && t.Value == "rest" {
		r := *pl.Next()
		g.Rest = &r
	} else {
		p, err := parsePrimary(pl)
		if err != nil {
			return nil, err
		}
		g.Prob = p
	}
	if t := pl.Peek(); t.Type == tokKeyword && t.Value == "if" {
		k := *pl.Next()
		g.If = &k
		s := pl.Peek()
		if s.Type != tokString {
			return nil, unexpected(s, "<string>")
		}
		st := *pl.Next()
		g.State = &st
	}
	return g, nil
}

func parseSum(pl tokenStream) (exprValue, error) {
	x, err := parseTerm(pl)
	if err != nil {
		return nil, err
	}
	for {
		t := pl.Peek()
		if !isPunct(t, "+") && !isPunct(t, "-") {
			return x, nil
		}
		op := *pl.Next()
		y, err := parseTerm(pl)
		if err != nil {
			return nil, err
		}
		x = &eBin{Op: op, X: x, Y: y}
	}
}

func parseTerm(pl tokenStream) (exprValue, error) {
	x, err := parseUnary(pl)
	if err != nil {
		return nil, err
	}
	for {
		t := pl.Peek()
		if !isPunct(t, "*") && !isPunct(t, "/") {
			return x, nil
		}
		op := *pl.Next()
		y, err := parseUnary(pl)
		if err != nil {
			return nil, err
		}
		x = &eBin{Op: op, X: x, Y: y}
	}
}

// parseUnary reads a run of minus signs iteratively, then a primary.
func parseUnary(pl tokenStream) (exprValue, error) {
	var negs []lexer.Token
	for isPunct(pl.Peek(), "-") {
		negs = append(negs, *pl.Next())
	}
	x, err := parsePrimary(pl)
	if err != nil {
		return nil, err
	}
	for i := len(negs) - 1; i >= 0; i-- {
		x = &eNeg{Tok: negs[i], X: x}
	}
	return x, nil
}

func parsePrimary(pl tokenStream) (exprValue, error) {
	t := pl.Peek()
	switch {
	case t.Type == tokNumber:
		return &eNum{Tok: *pl.Next()}, nil
	case t.Type == tokKeyword && t.Value == "rest":
		return &eRest{Tok: *pl.Next()}, nil
	case t.Type == tokIdent:
		name := *pl.Next()
		if !isPunct(pl.Peek(), "(") {
			return &eName{Tok: name}, nil
		}
		pl.Next()
		c := &eCall{Name: name}
		if isPunct(pl.Peek(), ")") {
			pl.Next()
			return c, nil
		}
		for {
			a, err := parseArg(pl)
			if err != nil {
				return nil, err
			}
			c.Args = append(c.Args, a)
			switch t := pl.Peek(); {
			case isPunct(t, ","):
				pl.Next()
			case isPunct(t, ")"):
				pl.Next()
				return c, nil
			default:
				return nil, unexpected(t, expectClose)
			}
		}
	case isPunct(t, "("):
		open := *pl.Next()
		x, err := parseArg(pl)
		if err != nil {
			return nil, err
		}
		if t := pl.Peek(); !isPunct(t, ")") {
			return nil, unexpected(t, expectClose)
		}
		pl.Next()
		return &eParen{Open: open, X: x}, nil
	}
	return nil, unexpected(t, expectExpr)
}

// parseArg reads an expression that must be there (inside parentheses).
func parseArg(pl tokenStream) (exprValue, error) {
	if t := pl.Peek(); !startsPrimary(t) && !isPunct(t, "-") {
		return nil, unexpected(t, expectExpr)
	}
	return parseSum(pl)
}
