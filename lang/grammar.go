package lang

import (
	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
)

// The grammar of one logical line. Which production applies is decided by
// the line's first word (see lineKinds), so each kind of line has its own
// small parser and its own error messages. A new kind of line is a new
// struct here, a parser in newParsers and an entry in lineKinds.

// gLabel is a quoted label, or words that should have been quoted (reported,
// then read as if they were).
type gLabel struct {
	Str  *lexer.Token `parser:"  @String"`
	Bare []*gWord     `parser:"| @@+"`
}

type gWord struct {
	Tok lexer.Token `parser:"@( Ident | Keyword | Number )"`
}

type gTitle struct {
	Kw    lexer.Token `parser:"@\"title\""`
	Label *gLabel     `parser:"@@?"`
}

type gCurrency struct {
	Kw   lexer.Token  `parser:"@\"currency\""`
	Code *lexer.Token `parser:"( @Ident | @String )?"`
}

type gObjective struct {
	Kw   lexer.Token  `parser:"@\"objective\""`
	Word *lexer.Token `parser:"( @Ident | @Keyword | @String )?"`
}

type gLet struct {
	Kw    lexer.Token  `parser:"@\"let\""`
	Name  lexer.Token  `parser:"@Ident"`
	Value exprValue    `parser:"\"=\" @@"`
	In    *lexer.Token `parser:"( @\"in\""`
	Low   exprValue    `parser:"  @@"`
	High  exprValue    `parser:"  \"..\" @@ )?"`
}

type gUncertainty struct {
	Kw    lexer.Token  `parser:"@\"uncertainty\""`
	Name  lexer.Token  `parser:"@Ident"`
	Label *lexer.Token `parser:"@String?"`
}

// gTest is both a test declaration (with `on`) and a node that runs a test
// (without).
type gTest struct {
	Kw     lexer.Token  `parser:"@\"test\""`
	Name   lexer.Token  `parser:"@Ident"`
	Label  *lexer.Token `parser:"@String?"`
	On     *lexer.Token `parser:"( @\"on\""`
	Unc    *lexer.Token `parser:"  @Ident"`
	CostKw *lexer.Token `parser:"  ( @\"cost\""`
	Cost   exprValue    `parser:"    @@ )? )?"`
}

type gSubtree struct {
	Kw   lexer.Token `parser:"@\"subtree\""`
	Name lexer.Token `parser:"@Ident"`
}

type gDecision struct {
	Kw    lexer.Token `parser:"@\"decision\""`
	Label *gLabel     `parser:"@@?"`
}

// gChance is a chance node; with `by RULE` it is a split: the input NAME
// at three points (split.go).
type gChance struct {
	Kw    lexer.Token  `parser:"@\"chance\""`
	Name  *lexer.Token `parser:"@Ident?"`
	Label *lexer.Token `parser:"@String?"`
	By    *lexer.Token `parser:"( @\"by\""`
	Rule  *lexer.Token `parser:"  @Ident )?"`
}

// gCorrelate is `correlate A B RHO`: the rank correlation of two inputs
// written as distributions.
type gCorrelate struct {
	Kw  lexer.Token `parser:"@\"correlate\""`
	A   lexer.Token `parser:"@Ident"`
	B   lexer.Token `parser:"@Ident"`
	Rho exprValue   `parser:"@@"`
}

type gUse struct {
	Kw   lexer.Token `parser:"@\"use\""`
	Name lexer.Token `parser:"@Ident"`
}

// gItem is a line that starts with a quoted label: a branch, a state of an
// uncertainty or a reading of a test, depending on what it is under. What
// follows the label is read by parseItemTail (expr.go):
//
//	Tail   = [ Amount ] { Cash }
//	Amount = Given { "," Given }
//	Given  = ( "rest" | Primary ) [ "if" String ]
//	Cash   = ( "gain" | "cost" ) Expr
//
// It is hand-written because large models are mostly such lines, and
// participle's backtracking over their optional parts costs several times
// more than the rest of reading.
type gItem struct {
	Label lexer.Token `parser:"@String"`
	Tail  itemTail    `parser:"@@?"`
}

// itemTail is what follows an item's label.
type itemTail interface{ parts() *gTail }

type gTail struct {
	Amount *gAmount
	Cash   []*gCash
}

func (t *gTail) parts() *gTail { return t }

// tail returns the parts after the label (never nil).
func (g *gItem) tail() *gTail {
	if g.Tail == nil {
		return &gTail{}
	}
	return g.Tail.parts()
}

// gAmount is a probability (or rest), or a test reading's list of
// likelihoods: 90% if "Defective", 8% if "Sound".
type gAmount struct {
	First *gGiven
	More  []*gGiven
}

type gGiven struct {
	Rest  *lexer.Token
	Prob  primaryValue
	If    *lexer.Token
	State *lexer.Token
}

type gCash struct {
	Kind   lexer.Token
	Amount exprValue
}

// Expressions are read by a small hand-written precedence parser plugged
// into participle (ParseTypeWith): operator chains are loops, and only
// parentheses and unary minus recurse, which the lexer bounds. This keeps
// reading fast on large models; see expr.go.

// parsers holds one participle parser per kind of line. It is built once
// and only read afterwards, so it is safe for concurrent use.
type parsers struct {
	title       *participle.Parser[gTitle]
	currency    *participle.Parser[gCurrency]
	objective   *participle.Parser[gObjective]
	let         *participle.Parser[gLet]
	uncertainty *participle.Parser[gUncertainty]
	test        *participle.Parser[gTest]
	subtree     *participle.Parser[gSubtree]
	decision    *participle.Parser[gDecision]
	chance      *participle.Parser[gChance]
	use         *participle.Parser[gUse]
	correlate   *participle.Parser[gCorrelate]
	item        *participle.Parser[gItem]
}

func newParsers() *parsers {
	opts := []participle.Option{participle.Lexer(lineDef{}), participle.UseLookahead(1),
		participle.ParseTypeWith(parseExprValue), participle.ParseTypeWith(parseItemTail)}
	return &parsers{
		title:       participle.MustBuild[gTitle](opts...),
		currency:    participle.MustBuild[gCurrency](opts...),
		objective:   participle.MustBuild[gObjective](opts...),
		let:         participle.MustBuild[gLet](opts...),
		uncertainty: participle.MustBuild[gUncertainty](opts...),
		test:        participle.MustBuild[gTest](opts...),
		subtree:     participle.MustBuild[gSubtree](opts...),
		decision:    participle.MustBuild[gDecision](opts...),
		chance:      participle.MustBuild[gChance](opts...),
		use:         participle.MustBuild[gUse](opts...),
		correlate:   participle.MustBuild[gCorrelate](opts...),
		item:        participle.MustBuild[gItem](opts...),
	}
}

// parseWith runs one parser on a line's tokens.
func parseWith[G any](p *participle.Parser[G], toks []lexer.Token, eof lexer.Position) (*G, error) {
	pl, err := lexer.Upgrade(&sliceLexer{toks: toks, eof: lexer.EOFToken(eof)})
	if err != nil {
		return nil, err
	}
	return p.ParseFromLexer(pl)
}
