package lang

import (
	"errors"
	"fmt"
	"strings"

	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/register"
	"github.com/forkcast/forkcast/tree"
)

// Risk registers in the text (docs/language.md, "Risk registers"):
//
//	register NAME ["Title"]
//	  threat|opportunity ID "Title"        ID: a name or a "label"
//	    probability EXPR
//	    impact EXPR                        a figure or a distribution
//	    delay EXPR days
//	    owner "text"
//	    category "text"
//	    response ["text"] [cost EXPR]
//	      residual probability EXPR
//	      residual impact EXPR
//	    column "Heading" "value"
//
// and, in a let, a register's figure as an input of the tree:
//
//	let NAME = register REGISTER total [with responses]
//	let NAME = register REGISTER risk ID [with responses]
//
// The lines under a register are read here by hand, token by token: they
// are few, and their messages name the register's parts. Expressions are
// read by the language's expression parser, so a figure is written as
// anywhere else. Whether the figures make sense (a probability within
// 0 .. 1, a distribution's arguments in order) is checked when the model
// is compiled, by package register.

// Frames of a register's lines (frameKind values of their own).
const (
	fRegister frameKind = 200 + iota // a register: its risks
	fRisk                            // a risk: its attributes
	fResponse                        // a response: its residual lines
	fRegLeaf                         // an attribute line: takes nothing
)

// regFrame is what a register's frame holds.
type regFrame struct {
	reg  *tree.Register
	risk *tree.Risk
	// seen is the line each attribute of the risk (or of its response)
	// was first given on (attrIndex), to report one given twice.
	seen [attrCount]int32
}

// registerState is what the builder keeps about registers while reading.
type registerState struct {
	byName map[string]int // register name → its line
	refs   []registerRef
	broken map[*tree.Risk]bool                    // risks with a line that could not be read
	ids    map[*tree.Register]map[string]tree.Pos // each register's risk ids, where first written
}

// registerRef is a let's `register NAME ...`, checked once every register
// is read.
type registerRef struct {
	ref   *tree.RegisterRef
	width int // of the register's name
	riskW int // of the risk's id
}

// Forms of the register's lines, for hints.
const (
	registerForm    = "a register reads `register NAME \"Title\"`, with its risks indented beneath it"
	riskForm2       = "a risk reads `threat ID \"Title\"` or `opportunity ID \"Title\"`, with its probability and impact indented beneath it"
	responseForm    = "a response reads `response \"What is done\" cost AMOUNT`, with `residual probability P` and `residual impact AMOUNT` indented beneath it"
	registerLetForm = "a let that takes a register's figure reads `let NAME = register REGISTER total` or `let NAME = register REGISTER risk ID`, optionally followed by `with responses`"
)

// riskWords are the lines that go under a risk, for suggestions.
var riskWords = []string{"probability", "impact", "delay", "owner", "category", "response", "column"}

// registerPlace reads a line that belongs to a register: a `register`
// line, a line under one, or a let that takes a register's figure. ok is
// false for every other line.
func (b *builder) registerPlace(l *srcLine, parent *frame) (f *frame, ok bool) {
	switch {
	case parent != nil && parent.reg != nil:
		if parent.silent {
			return &frame{kind: fBroken, silent: true, what: "this line"}, true
		}
		return b.registerChild(l, parent), true
	case l.kind == kRegister:
		if parent != nil && parent.silent {
			return &frame{kind: fBroken, silent: true, what: "this line"}, true
		}
		return b.registerLine(l, parent), true
	case l.kind == kLet && isRegisterLet(l.lx.toks):
		b.declare(l)
		if parent != nil && parent.silent {
			return &frame{kind: fBroken, silent: true, what: "this line"}, true
		}
		return b.registerLet(l, parent), true
	}
	return nil, false
}

func (b *builder) regs() *registerState {
	if b.registers == nil {
		b.registers = &registerState{byName: map[string]int{}, broken: map[*tree.Risk]bool{}, ids: map[*tree.Register]map[string]tree.Pos{}}
	}
	return b.registers
}

// registerLine reads `register NAME ["Title"]`.
func (b *builder) registerLine(l *srcLine, parent *frame) *frame {
	toks := l.lx.toks
	broken := &frame{kind: fBroken, silent: true, what: "this register"}
	if parent != nil {
		b.errAt(l.pos(), l.firstWidth(), "remove the indentation: a register stands at the left edge, outside the tree",
			"a register goes at the top level, not indented under %s", parent.desc())
		return broken
	}
	if l.lx.lexErr {
		return broken
	}
	if len(toks) < 2 {
		b.errAt(l.pos(), l.firstWidth(), registerForm, "the register has no name")
		return broken
	}
	name := toks[1]
	if name.Type != tokIdent {
		hint := registerForm
		if name.Type == tokKeyword {
			hint = "the reserved words are gain, cost, rest, if, in and on; pick another name"
		}
		b.errAt(tokPos(name), tokWidth(l.lx, name), hint, "expected the register's name after `register`, found %s", the(describe(name)))
		return broken
	}
	r := &tree.Register{Name: name.Value, Pos: tokPos(name)}
	rest := toks[2:]
	if len(rest) > 0 && rest[0].Type == tokString {
		r.Label = b.labelTok(l, rest[0])
		rest = rest[1:]
	}
	if len(rest) > 0 {
		b.errAt(tokPos(rest[0]), tokWidth(l.lx, rest[0]), registerForm, "unexpected %s after the register's title", describe(rest[0]))
	}
	rs := b.regs()
	if first, dup := rs.byName[r.Name]; dup {
		b.errAt(r.Pos, tokWidth(l.lx, name), fmt.Sprintf("it was first defined on line %d; give this one another name", first),
			"register %q is defined twice", r.Name)
		return &frame{kind: fRegister, what: "register " + r.Name, reg: &regFrame{reg: r}}
	}
	rs.byName[r.Name] = l.num
	b.m.Registers = append(b.m.Registers, r)
	return &frame{kind: fRegister, what: "register " + r.Name, reg: &regFrame{reg: r}}
}

// registerChild reads a line under a register, a risk or a response.
func (b *builder) registerChild(l *srcLine, parent *frame) *frame {
	broken := func() *frame {
		return b.newFrame(frame{kind: fBroken, silent: true, what: "this line", reg: parent.reg})
	}
	leaf := func(what string) *frame { return b.newFrame(frame{kind: fRegLeaf, what: what, reg: parent.reg}) }
	first := l.first()
	word := ""
	if first.Type == tokIdent || first.Type == tokKeyword {
		word = first.Value
	}
	if l.lx.lexErr {
		return broken()
	}
	switch parent.kind {
	case fRegister:
		if word == "threat" || word == "opportunity" {
			return b.riskLine2(l, parent)
		}
		hint := riskForm2
		msg := fmt.Sprintf("a register holds risks, not %s", the(describe(first)))
		switch {
		case word == "risk" || word == "Risk":
			msg = "a register's risks are written `threat` (it would add cost) or `opportunity` (it would save money)"
			hint = riskForm2
			if len(l.lx.toks) > 2 {
				hint = fmt.Sprintf("write `threat %s` or `opportunity %s`", shorten(l.lx.toks[1].Value), shorten(l.lx.toks[1].Value))
			}
		case word != "" && suggest(word, []string{"threat", "opportunity"}) != "":
			msg = fmt.Sprintf("unknown word %q under %s (did you mean `%s`?)", shorten(word), parent.desc(), suggest(word, []string{"threat", "opportunity"}))
		case containsWord(riskWords, word):
			hint = fmt.Sprintf("indent `%s` under the risk it belongs to, below its `threat` or `opportunity` line", word)
			msg = fmt.Sprintf("`%s` goes under a risk, not directly under %s", word, parent.desc())
		}
		b.errAt(l.pos(), l.firstWidth(), hint, "%s", msg)
		return broken()
	case fRisk:
		f := b.riskAttr(l, parent, word, leaf, broken)
		if f.kind == fBroken {
			// A line of the risk could not be read: that it then lacks
			// its probability or impact says nothing new.
			b.regs().broken[parent.reg.risk] = true
		}
		return f
	case fResponse:
		if word != "residual" {
			hint := "under a response go `residual probability P` and `residual impact AMOUNT`; the risk's other lines go under the risk, lined up with `response`"
			if word == "cost" {
				hint = "a response's cost goes on the response's own line: `response \"What is done\" cost 5_000`"
			}
			b.errAt(l.pos(), l.firstWidth(), hint, "%s cannot go under the response", the(describe(first)))
			return broken()
		}
		return b.residual(l, parent, leaf, broken)
	}
	// Under an attribute line.
	b.errAt(l.pos(), l.firstWidth(), fmt.Sprintf("line it up with %s on line %d", parent.desc(), parent.line),
		"%s takes no lines under it", parent.desc())
	return broken()
}

func containsWord(list []string, w string) bool {
	for _, x := range list {
		if x == w {
			return true
		}
	}
	return false
}

// riskLine2 reads `threat ID "Title"` or `opportunity ID "Title"`.
func (b *builder) riskLine2(l *srcLine, parent *frame) *frame {
	toks := l.lx.toks
	broken := &frame{kind: fBroken, silent: true, what: "this risk", reg: parent.reg}
	kind := toks[0].Value
	if len(toks) < 2 {
		b.errAt(l.pos(), l.firstWidth(), riskForm2, "the %s has no id", kind)
		return broken
	}
	id := toks[1]
	k := &tree.Risk{Opportunity: kind == "opportunity", Pos: l.pos(), IDPos: tokPos(id)}
	switch id.Type {
	case tokIdent:
		k.ID = id.Value
	case tokString:
		k.ID = unquote(id.Value)
		if strings.TrimSpace(k.ID) == "" {
			b.errAt(tokPos(id), tokWidth(l.lx, id), "write the risk's id between the quotes, such as R1", "the risk's id is empty")
		}
	default:
		hint := riskForm2 + "; an id that is not a name goes in double quotes, such as \"1.4\""
		b.errAt(tokPos(id), tokWidth(l.lx, id), hint, "expected the %s's id, found %s", kind, the(describe(id)))
		return broken
	}
	if len(toks) < 3 || toks[2].Type != tokString {
		at, n := tokPos(id), tokWidth(l.lx, id)
		found := "nothing"
		if len(toks) >= 3 {
			at, n = tokPos(toks[2]), tokWidth(l.lx, toks[2])
			found = the(describe(toks[2]))
		}
		hint := fmt.Sprintf("write what the risk is in double quotes after its id: %s %s \"Ground conditions worse than surveyed\"", kind, shorten(k.ID))
		if found == "nothing" {
			b.errAt(at, n, hint, "the %s %s has no title", kind, shorten(k.ID))
		} else {
			b.errAt(at, n, hint, "expected the %s's title in double quotes, found %s", kind, found)
		}
		return broken
	}
	k.Title = b.labelTok(l, toks[2])
	if len(toks) > 3 {
		b.errAt(tokPos(toks[3]), tokWidth(l.lx, toks[3]), riskForm2+"; its figures go on the lines beneath it",
			"unexpected %s after the %s's title", describe(toks[3]), kind)
	}
	reg := parent.reg.reg
	rs := b.regs()
	ids := rs.ids[reg]
	if ids == nil {
		ids = map[string]tree.Pos{}
		rs.ids[reg] = ids
	}
	if first, dup := ids[k.ID]; dup {
		b.errAt(k.IDPos, tokWidth(l.lx, id), fmt.Sprintf("it was first used on line %d; give each risk of a register its own id", first.Line),
			"the id %s is used twice in register %s", shorten(k.ID), reg.Name)
		return &frame{kind: fRisk, what: kind + " " + shorten(k.ID), reg: &regFrame{reg: reg, risk: k}}
	}
	ids[k.ID] = k.IDPos
	reg.Risks = append(reg.Risks, k)
	return &frame{kind: fRisk, what: kind + " " + shorten(k.ID), reg: &regFrame{reg: reg, risk: k}}
}

// riskAttr reads a line under a risk.
func (b *builder) riskAttr(l *srcLine, parent *frame, word string, leaf func(string) *frame, broken func() *frame) *frame {
	toks := l.lx.toks
	rf := parent.reg
	k := rf.risk
	if !containsWord(riskWords, word) {
		first := l.first()
		hint := "under a risk go its lines: " + strings.Join(riskWords, ", ")
		switch {
		case word == "residual":
			hint = "indent `residual` lines under the risk's `response` line"
			b.errAt(l.pos(), l.firstWidth(), hint, "a residual figure belongs to a response")
		case word == "threat" || word == "opportunity":
			b.errAt(l.pos(), l.firstWidth(), fmt.Sprintf("line it up with %s on line %d: risks stand side by side under their register", parent.desc(), parent.line),
				"a risk cannot go under another risk")
		case word == "cost":
			b.errAt(l.pos(), l.firstWidth(), "what the risk costs if it happens is its `impact`, such as `impact 25_000`; a response's cost goes on its line: `response \"What is done\" cost 5_000`",
				"a risk has no `cost` line")
		case word != "":
			msg := fmt.Sprintf("unknown word %q under %s", shorten(word), parent.desc())
			if s := suggest(strings.ToLower(word), riskWords); s != "" {
				msg += fmt.Sprintf(" (did you mean `%s`?)", s)
			}
			b.errAt(l.pos(), l.firstWidth(), hint, "%s", msg)
		default:
			b.errAt(l.pos(), l.firstWidth(), hint, "a line under a risk cannot start with %s", the(describe(first)))
		}
		return broken()
	}
	if prev := rf.seen[attrIndex(word)]; prev != 0 && word != "column" {
		b.errAt(l.pos(), l.firstWidth(), fmt.Sprintf("it was first given on line %d; keep one", prev),
			"the %s of %s is given twice", attrNoun(word), parent.desc())
		return broken()
	}
	rf.seen[attrIndex(word)] = int32(l.num)
	what := attrLine(word)
	switch word {
	case "probability", "impact":
		e, ok := b.regFigure(l, 1, word, "")
		if !ok {
			return broken()
		}
		if word == "probability" {
			k.Prob, k.ProbPos = e, l.pos()
		} else {
			k.Impact, k.ImpactPos = e, l.pos()
		}
		return leaf(what)
	case "delay":
		e, ok := b.regFigure(l, 1, word, "days")
		if !ok {
			return broken()
		}
		k.Delay = e
		return leaf(what)
	case "owner", "category":
		s, ok := b.regText(l, 1, word, fmt.Sprintf("%s %q", word, map[string]string{"owner": "Site manager", "category": "Ground works"}[word]))
		if !ok {
			return broken()
		}
		if word == "owner" {
			k.Owner = s
		} else {
			k.Category = s
		}
		return leaf(what)
	case "column":
		if len(toks) < 3 || toks[1].Type != tokString || toks[2].Type != tokString {
			at, n := l.pos(), l.firstWidth()
			if len(toks) > 1 {
				i := 1
				if toks[1].Type == tokString {
					i = 2
				}
				if i < len(toks) {
					at, n = tokPos(toks[i]), tokWidth(l.lx, toks[i])
				}
			}
			b.errAt(at, n, "a column reads `column \"Heading\" \"value\"`, both in double quotes: a column of the spreadsheet kept with the risk",
				"a column needs a heading and a value, each in double quotes")
			return broken()
		}
		if len(toks) > 3 {
			b.errAt(tokPos(toks[3]), tokWidth(l.lx, toks[3]), "a column reads `column \"Heading\" \"value\"`",
				"unexpected %s after the column's value", describe(toks[3]))
		}
		// Any heading, as the sheet had it: empty, or twice.
		name := unquote(toks[1].Value)
		k.Columns = append(k.Columns, tree.RiskColumn{Name: name, Value: unquote(toks[2].Value)})
		return leaf(attrLine("column"))
	}
	// response ["What is done"] [cost EXPR]: a sheet may give a
	// response's figures without saying what it is.
	resp := &tree.RiskResponse{Pos: l.pos()}
	next := 1
	if len(toks) > 1 && toks[1].Type == tokString {
		resp.Action = b.labelTok(l, toks[1])
		next = 2
	}
	if len(toks) > next {
		t := toks[next]
		if t.Type != tokKeyword || t.Value != "cost" {
			msg := fmt.Sprintf("expected `cost` after the response, found %s", the(describe(t)))
			if next == 1 {
				msg = fmt.Sprintf("expected what the response does in double quotes, found %s", the(describe(t)))
			}
			b.errAt(tokPos(t), tokWidth(l.lx, t), responseForm, "%s", msg)
			return broken()
		}
		e, ok := b.regFigure(l, next+1, "cost", "")
		if !ok {
			return broken()
		}
		resp.Cost = e
	}
	k.Response = resp
	return &frame{kind: fResponse, what: "the response of " + parent.desc(), reg: &regFrame{reg: rf.reg, risk: k}}
}

// attrNoun names an attribute in messages.
func attrNoun(word string) string {
	switch word {
	case "delay":
		return "delay (schedule impact)"
	case "residual probability", "residual impact":
		return word
	}
	return word
}

// residual reads `residual probability EXPR` or `residual impact EXPR`.
func (b *builder) residual(l *srcLine, parent *frame, leaf func(string) *frame, broken func() *frame) *frame {
	toks := l.lx.toks
	rf := parent.reg
	hint := "under a response go `residual probability P` (the chance that remains once it is done) and `residual impact AMOUNT` (the impact that remains)"
	if len(toks) < 2 || toks[1].Type != tokIdent || (toks[1].Value != "probability" && toks[1].Value != "impact") {
		at, n := l.pos(), l.firstWidth()
		msg := "`residual` is followed by `probability` or `impact`"
		if len(toks) > 1 {
			at, n = tokPos(toks[1]), tokWidth(l.lx, toks[1])
			msg = fmt.Sprintf("expected `probability` or `impact` after `residual`, found %s", the(describe(toks[1])))
			if toks[1].Type == tokIdent {
				if s := suggest(strings.ToLower(toks[1].Value), []string{"probability", "impact"}); s != "" {
					msg += fmt.Sprintf(" (did you mean `%s`?)", s)
				}
			}
		}
		b.errAt(at, n, hint, "%s", msg)
		return broken()
	}
	word := "residual " + toks[1].Value
	if prev := rf.seen[attrIndex(word)]; prev != 0 {
		b.errAt(l.pos(), l.firstWidth(), fmt.Sprintf("it was first given on line %d; keep one", prev),
			"the %s of %s is given twice", word, strings.TrimPrefix(parent.desc(), "the response of "))
		return broken()
	}
	rf.seen[attrIndex(word)] = int32(l.num)
	e, ok := b.regFigure(l, 2, word, "")
	if !ok {
		return broken()
	}
	if toks[1].Value == "probability" {
		rf.risk.Response.Prob = e
	} else {
		rf.risk.Response.Impact = e
	}
	return leaf(attrLine(word))
}

// regText reads a label at token i that ends the line.
func (b *builder) regText(l *srcLine, i int, word, example string) (string, bool) {
	toks := l.lx.toks
	hint := fmt.Sprintf("write it in double quotes: %s", example)
	if i >= len(toks) {
		b.errAt(l.pos(), l.firstWidth(), hint, "the %s line gives no %s", word, word)
		return "", false
	}
	if toks[i].Type != tokString {
		b.errAt(tokPos(toks[i]), l.lx.endCol-toks[i].Pos.Column, hint, "the %s must be in double quotes", word)
		return "", false
	}
	if i+1 < len(toks) {
		b.errAt(tokPos(toks[i+1]), tokWidth(l.lx, toks[i+1]), hint, "unexpected %s after the %s", describe(toks[i+1]), word)
		return "", false
	}
	return unquote(toks[i].Value), true
}

// regFigure reads the expression that starts at token i and ends the
// line, or is followed by the word unit (days) and the line's end.
func (b *builder) regFigure(l *srcLine, i int, word, unit string) (tree.Expr, bool) {
	toks := l.lx.toks
	form := figureForm(word)
	if i >= len(toks) {
		end := toks[len(toks)-1]
		b.errAt(tokPos(end), tokWidth(l.lx, end), form, "the %s line gives no figure", word)
		return nil, false
	}
	if t := toks[i]; t.Type == tokKeyword && t.Value == "rest" {
		b.errAt(tokPos(t), tokWidth(l.lx, t), form, "`rest` is only a chance branch's probability; a register's figures are given in full")
		return nil, false
	}
	c := &cursor{toks: toks[i:], eof: lexer.EOFToken(lexer.Position{Line: l.num, Column: l.lx.endCol})}
	v, err := exprOn(c)
	if errors.Is(err, participle.NextMatch) {
		err = unexpected(c.Peek(), expectExpr)
	}
	if err == nil && c.i < len(c.toks) {
		t := c.Peek()
		switch {
		case unit != "" && t.Type == tokIdent && (t.Value == unit || t.Value == strings.TrimSuffix(unit, "s")) && c.i == len(c.toks)-1:
			unit = ""
		case unit != "" && t.Type == tokIdent && c.i == len(c.toks)-1:
			b.errAt(tokPos(*t), tokWidth(l.lx, *t), "a delay is given in days, such as `delay pert(5, 10, 30) days`; convert other units to days",
				"a delay in %s: the unit is days", shorten(t.Value))
			return nil, false
		default:
			err = unexpected(t, "")
		}
	}
	if err != nil {
		d := syntaxError(err, kNone, roleBranch, l.lx)
		if d.Summary == "unexpected "+describeErr(err) {
			d.Summary = fmt.Sprintf("unexpected %s after the %s", describeErr(err), word)
		}
		if d.Hint == "" {
			d.Hint = form
		}
		b.ds = append(b.ds, d)
		return nil, false
	}
	if unit != "" {
		end := toks[len(toks)-1]
		b.errAt(tree.At(l.num, l.lx.endCol), 1, "write the unit after the figure: `delay 10 days`, or `delay pert(5, 10, 30) days`",
			"the delay has no unit after %s", describe(end))
		return nil, false
	}
	ctx := ctxLet
	if word == "cost" || strings.HasSuffix(word, "impact") {
		ctx = ctxCash
	}
	e := b.expr(v, ctx, l.lx)
	if word == "cost" || strings.HasSuffix(word, "impact") {
		if pa := findPercentAdded(v, l.lx); pa != nil {
			b.warnPercentAdded(pa, word+" ")
		}
	}
	return e, true
}

// describeErr describes the token an unexpected-token error is about.
func describeErr(err error) string {
	var ute *participle.UnexpectedTokenError
	if errors.As(err, &ute) {
		return describe(ute.Unexpected)
	}
	return ""
}

// figureForm is how a figure's line is written, for hints.
func figureForm(word string) string {
	switch word {
	case "probability", "residual probability":
		return "a probability is a number or a percentage, such as `" + word + " 30%`, or a calculation of inputs"
	case "impact", "residual impact":
		return "an impact is an amount, such as `" + word + " 25_000`, or a distribution, such as `" + word + " pert(40_000, 60_000, 150_000)`"
	case "delay":
		return "a delay reads `delay 10 days` or `delay pert(5, 10, 30) days`"
	case "cost":
		return responseForm
	}
	return ""
}

// isRegisterLet reports whether a let line takes a register's figure:
// `let NAME = register WORD ...`.
func isRegisterLet(toks []lexer.Token) bool {
	return len(toks) >= 5 && toks[3].Type == tokIdent && toks[3].Value == "register" && toks[4].Type == tokIdent &&
		toks[2].Type == tokPunct && toks[2].Value == "="
}

// registerLet reads `let NAME = register REGISTER total|risk ID [with
// responses]`.
func (b *builder) registerLet(l *srcLine, parent *frame) *frame {
	toks := l.lx.toks
	broken := &frame{kind: fBroken, silent: true, what: "this line"}
	if !b.topOnly(&l.lineHead, parent, "a let") {
		return broken
	}
	if l.lx.lexErr {
		return broken
	}
	if toks[1].Type != tokIdent {
		b.errAt(tokPos(toks[1]), tokWidth(l.lx, toks[1]), registerLetForm, "expected the input's name after `let`, found %s", the(describe(toks[1])))
		return broken
	}
	ref := &tree.RegisterRef{At: tokPos(toks[3]), Register: toks[4].Value, RegisterAt: tokPos(toks[4])}
	rr := registerRef{ref: ref, width: tokWidth(l.lx, toks[4])}
	rest := toks[5:]
	fail := func(t *lexer.Token, format string, a ...any) *frame {
		at, n := tree.At(l.num, l.lx.endCol), 1
		if t != nil {
			at, n = tokPos(*t), tokWidth(l.lx, *t)
		}
		b.errAt(at, n, registerLetForm, format, a...)
		return broken
	}
	switch {
	case len(rest) == 0:
		return fail(nil, "the line ends where `total` or `risk ID` was expected")
	case rest[0].Type == tokIdent && rest[0].Value == "total":
		rest = rest[1:]
	case rest[0].Type == tokIdent && rest[0].Value == "risk":
		if len(rest) < 2 {
			return fail(nil, "the line ends where the risk's id was expected")
		}
		switch rest[1].Type {
		case tokIdent:
			ref.Risk = rest[1].Value
		case tokString:
			ref.Risk = unquote(rest[1].Value)
		default:
			return fail(&rest[1], "expected the risk's id after `risk`, found %s", the(describe(rest[1])))
		}
		ref.RiskAt, rr.riskW = tokPos(rest[1]), tokWidth(l.lx, rest[1])
		rest = rest[2:]
	default:
		msg := fmt.Sprintf("expected `total` or `risk ID` after the register's name, found %s", the(describe(rest[0])))
		if rest[0].Type == tokIdent {
			if s := suggest(strings.ToLower(rest[0].Value), []string{"total", "risk"}); s != "" {
				msg += fmt.Sprintf(" (did you mean `%s`?)", s)
			}
		}
		return fail(&rest[0], "%s", msg)
	}
	if len(rest) > 0 {
		if rest[0].Type == tokIdent && rest[0].Value == "with" {
			if len(rest) < 2 || rest[1].Type != tokIdent || rest[1].Value != "responses" {
				var t *lexer.Token
				if len(rest) > 1 {
					t = &rest[1]
				}
				return fail(t, "`with` is followed by `responses`")
			}
			ref.Responses = true
			rest = rest[2:]
		}
		if len(rest) > 0 {
			if rest[0].Type == tokKeyword && rest[0].Value == "in" {
				b.errAt(tokPos(rest[0]), tokWidth(l.lx, rest[0]), "a register's figure is drawn in simulation and worth its expected value elsewhere; vary the register's own figures instead (give them inputs with ranges)",
					"a range cannot be given to an input taken from a register")
				return broken
			}
			return fail(&rest[0], "unexpected %s after %s", describe(rest[0]), ref)
		}
	}
	p := &tree.Param{Name: toks[1].Value, Pos: tokPos(toks[1]), Expr: ref}
	b.m.Params = append(b.m.Params, p)
	rs := b.regs()
	rs.refs = append(rs.refs, rr)
	return &frame{kind: fLeaf, what: "let " + p.Name}
}

// finishRegisters runs the checks that need every register: each risk
// has its probability and impact, each register a risk, and every
// `register NAME` in a let names one (and its risk, one of that
// register's).
func (b *builder) finishRegisters() {
	if b.registers == nil {
		return
	}
	for _, r := range b.m.Registers {
		if len(r.Risks) == 0 {
			b.errAt(r.Pos, len([]rune(r.Name)), "indent its risks beneath it: `threat ID \"Title\"` or `opportunity ID \"Title\"`, each with its probability and impact",
				"register %s has no risks", r.Name)
		}
		for _, k := range r.Risks {
			kind := "threat"
			if k.Opportunity {
				kind = "opportunity"
			}
			switch {
			case b.registers.broken[k]:
			case k.Prob == nil && k.Impact == nil:
				b.errAt(k.IDPos, len([]rune(k.ID)), "indent beneath it `probability 30%` and `impact AMOUNT` (a figure or a distribution such as pert(10_000, 20_000, 50_000))",
					"%s %s has no probability and no impact", kind, shorten(k.ID))
			case k.Prob == nil:
				b.errAt(k.IDPos, len([]rune(k.ID)), "indent beneath it the chance that it happens, such as `probability 30%`",
					"%s %s has no probability", kind, shorten(k.ID))
			case k.Impact == nil:
				b.errAt(k.IDPos, len([]rune(k.ID)), "indent beneath it what it costs if it happens, such as `impact 25_000` or `impact pert(10_000, 20_000, 50_000)`",
					"%s %s has no impact", kind, shorten(k.ID))
			}
		}
	}
	var names []string
	for _, r := range b.m.Registers {
		names = append(names, r.Name)
	}
	for _, rr := range b.registers.refs {
		ref := rr.ref
		r := b.m.Register(ref.Register)
		if r == nil {
			msg := fmt.Sprintf("no register named %q", shorten(ref.Register))
			hint := "define it with `register " + shorten(ref.Register) + " \"Title\"` and its risks beneath it"
			if s := suggest(ref.Register, names); s != "" {
				msg += fmt.Sprintf(" (did you mean `%s`?)", s)
				hint = fmt.Sprintf("`%s` is the register defined on line %d", s, b.registers.byName[s])
			} else if len(names) > 0 {
				hint = "the registers are " + strings.Join(names, ", ")
			}
			b.errAt(ref.RegisterAt, rr.width, hint, "%s", msg)
			continue
		}
		if ref.Risk == "" {
			continue
		}
		var ids []string
		found := false
		for _, k := range r.Risks {
			ids = append(ids, k.ID)
			found = found || k.ID == ref.Risk
		}
		if !found {
			msg := fmt.Sprintf("register %s has no risk %q", r.Name, shorten(ref.Risk))
			hint := "its risks are " + shortList(ids)
			if s := suggest(ref.Risk, ids); s != "" {
				msg += fmt.Sprintf(" (did you mean `%s`?)", s)
			}
			b.errAt(ref.RiskAt, rr.riskW, hint, "%s", msg)
		}
	}
}

// shortList lists names, the first ten.
func shortList(xs []string) string {
	if len(xs) > 10 {
		return strings.Join(xs[:10], ", ") + fmt.Sprintf(" and %d more", len(xs)-10)
	}
	return strings.Join(xs, ", ")
}

// compile compiles m, its registers with it: the lets that take a
// register's figure get it from package register, and every register's
// figures are checked (register.Check) once the inputs are known.
func compile(m *tree.Model) (*compiled.Model, tree.Diagnostics) {
	if len(m.Registers) == 0 {
		return compiled.Compile(m)
	}
	c, cs := compiled.CompileWith(m, compiled.Options{Resolve: register.Resolver(m), Uses: register.Uses(m)})
	if c == nil {
		return nil, cs
	}
	// A figure that a let's register already reported is not reported
	// twice.
	seen := map[string]bool{}
	for _, d := range cs {
		seen[d.Pos.String()+d.Summary] = true
	}
	for _, d := range register.Check(c) {
		if !seen[d.Pos.String()+d.Summary] {
			cs = append(cs, d)
		}
	}
	if cs.HasErrors() {
		return nil, cs
	}
	return c, cs
}

// Attributes of a risk, by their place in regFrame.seen.
const (
	attrOther = iota
	attrProbability
	attrImpact
	attrDelay
	attrOwner
	attrCategory
	attrResponse
	attrResidualProbability
	attrResidualImpact
	attrCount
)

// attrIndex is word's place in regFrame.seen.
func attrIndex(word string) int {
	switch word {
	case "probability":
		return attrProbability
	case "impact":
		return attrImpact
	case "delay":
		return attrDelay
	case "owner":
		return attrOwner
	case "category":
		return attrCategory
	case "response":
		return attrResponse
	case "residual probability":
		return attrResidualProbability
	case "residual impact":
		return attrResidualImpact
	}
	return attrOther
}

// attrLine is how messages name an attribute's line.
func attrLine(word string) string {
	switch word {
	case "probability":
		return "the probability line"
	case "impact":
		return "the impact line"
	case "delay":
		return "the delay line"
	case "owner":
		return "the owner line"
	case "category":
		return "the category line"
	case "column":
		return "the column line"
	}
	return "the " + word + " line"
}
