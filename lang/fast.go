package lang

import (
	"bytes"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// The fast path. Large models are almost all branch lines and node lines;
// participle's reflective parsing costs microseconds a line, and a parsed
// line as participle gives it (tokens with strings, a tree of structs) costs
// more memory than the model part it becomes. So the common shapes are
// read here, from the fast lexer's tokens (fastlex.go) straight into the
// model's parts:
//
//	"Label" [PROBABILITY | rest] [gain EXPR] [cost EXPR]   a branch, or a state
//	decision "Label"
//	chance "Label" | chance NAME | chance NAME "Label"
//	use NAME
//	let NAME = EXPR [in EXPR .. EXPR]
//
// with EXPR numbers, names, + - * /, a minus sign and parentheses. A line
// is read in two steps: first checked in full without touching the model
// (fastLine.check), then placed (commit), which cannot fail. Any line the
// check does not accept — every line with a mistake, and any line that
// could draw a warning or needs a rarer part of the grammar — goes to
// participle, which remains the grammar of record and the source of every
// message. The fast path makes exactly the model parts participle's
// reading makes (TestFastPathAgrees and FuzzLoad check it).

// fastLine is a line read by the fast lexer, and what its check found.
type fastLine struct {
	lineHead
	s    []byte // the line's content, indentation removed
	toks []ftok
	ex   []fexpr // the expressions, operands before what uses them
	// An item line: its probability and money, each an expression index
	// or -1, and whether it says rest.
	prob, gain, cost int32
	rest             bool
	gainFirst        bool // gain is written before cost
	// A let line: its value and range.
	val, lo, hi int32
	// pct and sum note a number written with % and a + or - in the
	// expression being read: together they might draw a warning.
	pct, sum bool
}

// fexpr is an expression found by the check: a number, a name, a minus
// sign or an operation, with the token it stands on.
type fexpr struct {
	kind  byte  // 'n' number, 'v' name, 'u' minus sign, 'b' operation
	op    byte  // of an operation: + - * /
	tok   int32 // the number, name or sign; an operation's operator
	x, y  int32 // operands
	paren int32 // the outermost ( around it, or -1
	c     int64 // a number's value is c × 10^e
	e     int32
}

// text is token i as written.
func (fl *fastLine) text(i int32) []byte { t := fl.toks[i]; return fl.s[t.from:t.to] }

// at is where token i is.
func (fl *fastLine) at(i int32) tree.Pos { return tree.At(fl.num, int(fl.toks[i].col)) }

// is reports whether token i has type t and text v.
func (fl *fastLine) is(i int32, t lexer.TokenType, v string) bool {
	return int(i) < len(fl.toks) && fl.toks[i].typ == t && string(fl.text(i)) == v
}

// label is the text of label token i, without its quotes.
func (fl *fastLine) label(i int32) []byte { t := fl.text(i); return t[1 : len(t)-1] }

// fast reads one line by the fast path and places it; it returns false,
// having changed nothing, when the line must be read the slow way.
func (b *builder) fast(fl *fastLine, content []byte, num, indent int) bool {
	toks, endCol, ok := fastLex(content, indent+1, fl.toks)
	fl.toks = toks
	if !ok || len(toks) == 0 {
		return false
	}
	fl.s = content
	fl.lineHead = lineHead{num: num, indent: indent, at: tree.At(num, int(toks[0].col)), width: int(toks[0].width), endCol: endCol}
	parent := b.under(indent)
	if parent != nil && parent.silent {
		return false // read for its mistakes only: the slow way
	}
	n := int32(len(toks))
	switch {
	case toks[0].typ == tokString:
		if parent == nil || parent.kind != fNode && parent.kind != fUnc || !fl.checkItem() {
			return false
		}
		if parent.kind == fUnc && (fl.prob < 0 && !fl.rest || fl.gain >= 0 || fl.cost >= 0) {
			return false // a state has a probability and no money
		}
		b.commitItem(fl)
	case fl.is(0, tokIdent, "decision"):
		if n != 2 || toks[1].typ != tokString || blank(fl.label(1)) {
			return false
		}
		b.commitNode(fl, tree.KindDecision, -1, 1)
	case fl.is(0, tokIdent, "chance"):
		switch {
		case n == 2 && toks[1].typ == tokString && !blank(fl.label(1)):
			b.commitNode(fl, tree.KindChance, -1, 1)
		case n == 2 && toks[1].typ == tokIdent && !fl.is(1, tokIdent, "by"):
			b.commitNode(fl, tree.KindChance, 1, -1)
		case n == 3 && toks[1].typ == tokIdent && !fl.is(1, tokIdent, "by") && toks[2].typ == tokString && !blank(fl.label(2)):
			b.commitNode(fl, tree.KindChance, 1, 2)
		default:
			return false
		}
	case fl.is(0, tokIdent, "use"):
		if n != 2 || toks[1].typ != tokIdent {
			return false
		}
		b.commitNode(fl, kindUse, 1, -1)
	case fl.is(0, tokIdent, "let"):
		if parent != nil || !fl.checkLet() {
			return false
		}
		b.commitLet(fl)
	default:
		return false
	}
	return true
}

// blank reports whether a label is empty or only spaces (reported).
func blank(label []byte) bool { return len(bytes.TrimSpace(label)) == 0 }

// checkItem checks an item line: label, then optionally a probability or
// rest, then gain and cost at most once each.
func (fl *fastLine) checkItem() bool {
	fl.ex = fl.ex[:0]
	fl.prob, fl.gain, fl.cost, fl.rest, fl.gainFirst = -1, -1, -1, false, false
	if blank(fl.label(0)) {
		return false
	}
	i := int32(1)
	n := int32(len(fl.toks))
	if i < n {
		switch t := fl.toks[i]; {
		case t.typ == tokKeyword && string(fl.text(i)) == "rest":
			fl.rest = true
			i++
		case t.typ == tokNumber || t.typ == tokIdent || fl.is(i, tokPunct, "("):
			fl.pct, fl.sum = false, false
			x, ok := fl.primary(&i)
			if !ok || fl.pct && fl.sum {
				return false
			}
			fl.prob = x
		}
	}
	for i < n {
		kw := fl.toks[i]
		if kw.typ != tokKeyword {
			return false
		}
		slot := &fl.gain
		switch string(fl.text(i)) {
		case "gain":
			fl.gainFirst = fl.cost < 0
		case "cost":
			slot = &fl.cost
		default:
			return false // if, in, on, rest: the slow way
		}
		if *slot >= 0 {
			return false // given twice: reported
		}
		i++
		fl.pct, fl.sum = false, false
		x, ok := fl.arg(&i)
		if !ok || fl.pct && fl.sum {
			return false // a percent added to money draws a warning
		}
		*slot = x
	}
	return true
}

// checkLet checks `let NAME = EXPR [in EXPR .. EXPR]`.
func (fl *fastLine) checkLet() bool {
	fl.ex = fl.ex[:0]
	n := int32(len(fl.toks))
	if n < 4 || fl.toks[1].typ != tokIdent || !fl.is(2, tokPunct, "=") {
		return false
	}
	i := int32(3)
	fl.pct, fl.sum = false, false
	v, ok := fl.arg(&i)
	if !ok || fl.pct && fl.sum {
		return false
	}
	fl.val, fl.lo, fl.hi = v, -1, -1
	if i == n {
		return true
	}
	if !fl.is(i, tokKeyword, "in") {
		return false
	}
	i++
	fl.pct, fl.sum = false, false
	lo, ok := fl.arg(&i)
	if !ok || !fl.is(i, tokPunct, "..") {
		return false
	}
	i++
	hi, ok := fl.arg(&i)
	if !ok || i != n {
		return false
	}
	// A range of a plain number and a percent may be missing a %
	// (reported); leave any such range to the slow way.
	if bare := func(x int32) bool { return fl.ex[x].kind == 'n' && fl.ex[x].paren < 0 }; bare(lo) && bare(hi) {
		lp := bytes.HasSuffix(fl.text(fl.ex[lo].tok), []byte("%"))
		hp := bytes.HasSuffix(fl.text(fl.ex[hi].tok), []byte("%"))
		if lp != hp {
			return false
		}
	}
	fl.lo, fl.hi = lo, hi
	return true
}

// arg reads an expression that must be there: terms joined by + and -.
func (fl *fastLine) arg(i *int32) (int32, bool) {
	x, ok := fl.term(i)
	for ok && (fl.is(*i, tokPunct, "+") || fl.is(*i, tokPunct, "-")) {
		op := *i
		*i++
		var y int32
		if y, ok = fl.term(i); ok {
			x = fl.add(fexpr{kind: 'b', op: fl.text(op)[0], tok: op, x: x, y: y, paren: -1})
			fl.sum = true
		}
	}
	return x, ok
}

// term reads factors joined by * and /.
func (fl *fastLine) term(i *int32) (int32, bool) {
	x, ok := fl.unary(i)
	for ok && (fl.is(*i, tokPunct, "*") || fl.is(*i, tokPunct, "/")) {
		op := *i
		*i++
		var y int32
		if y, ok = fl.unary(i); ok {
			x = fl.add(fexpr{kind: 'b', op: fl.text(op)[0], tok: op, x: x, y: y, paren: -1})
		}
	}
	return x, ok
}

// unary reads an optional minus sign, then a primary (the fast lexer
// refuses two minus signs in a row).
func (fl *fastLine) unary(i *int32) (int32, bool) {
	if !fl.is(*i, tokPunct, "-") {
		return fl.primary(i)
	}
	sign := *i
	*i++
	x, ok := fl.primary(i)
	if !ok {
		return 0, false
	}
	return fl.add(fexpr{kind: 'u', tok: sign, x: x, paren: -1}), true
}

// primary reads a number, a name or a parenthesised expression. Calls and
// `rest` inside a calculation go the slow way.
func (fl *fastLine) primary(i *int32) (int32, bool) {
	if int(*i) >= len(fl.toks) {
		return 0, false
	}
	t := *i
	switch fl.toks[t].typ {
	case tokNumber:
		c, e, ok := fastNumber(fl.text(t))
		if !ok {
			return 0, false
		}
		fl.pct = fl.pct || fl.text(t)[len(fl.text(t))-1] == '%'
		*i++
		return fl.add(fexpr{kind: 'n', tok: t, c: c, e: e, paren: -1}), true
	case tokIdent:
		if fl.is(t+1, tokPunct, "(") {
			return 0, false
		}
		*i++
		return fl.add(fexpr{kind: 'v', tok: t, paren: -1}), true
	}
	if !fl.is(t, tokPunct, "(") {
		return 0, false
	}
	*i++
	x, ok := fl.arg(i)
	if !ok || !fl.is(*i, tokPunct, ")") {
		return 0, false
	}
	*i++
	fl.ex[x].paren = t // the outer parentheses are read last
	return x, true
}

// add records an expression found by the check and returns its index.
func (fl *fastLine) add(e fexpr) int32 {
	fl.ex = append(fl.ex, e)
	return int32(len(fl.ex) - 1)
}

// fastNumber reads a number as the language writes it (digits, _ between
// two digits, at most one decimal point between digits, an optional % at
// the end) with at most 18 digits, as c × 10^e exactly as readNumber
// gives it. ok is false for anything else, which readNumber reports or
// reads.
func fastNumber(t []byte) (c int64, e int32, ok bool) {
	if t[len(t)-1] == '%' {
		t = t[:len(t)-1]
		e = -2
	}
	digits, places := 0, -1
	for j, ch := range t {
		switch {
		case ch >= '0' && ch <= '9':
			c = c*10 + int64(ch-'0')
			digits++
			if places >= 0 {
				places++
			}
		case (ch == '_' || ch == '.' && places < 0) && j > 0 && j+1 < len(t) && isDigit(t[j-1]) && isDigit(t[j+1]):
			if ch == '.' {
				places = 0
			}
		default:
			return 0, 0, false
		}
		if digits > 18 {
			return 0, 0, false
		}
	}
	if digits == 0 {
		return 0, 0, false
	}
	return c, e - int32(max(places, 0)), true
}

func isDigit(ch byte) bool { return ch >= '0' && ch <= '9' }

// fastExpr makes the model's expression of the checked expression x, as
// lowerExpr makes it from participle's, and records its names as useName
// does. top says that x is a whole term of the line's sum.
func (b *builder) fastExpr(fl *fastLine, x int32, c exprCtx, top bool) tree.Expr {
	e := &fl.ex[x]
	switch e.kind {
	case 'n':
		n := b.alloc.numbers.New()
		*n = tree.WrittenNumber(fl.at(e.tok), e.c, e.e, fl.text(e.tok))
		return n
	case 'v':
		name := b.alloc.str(fl.text(e.tok))
		if !b.knownLet(name, c, top) {
			b.pendingNames = append(b.pendingNames, nameRef{name: name, pos: fl.at(e.tok), width: int(fl.toks[e.tok].width), ctx: c, top: top})
		}
		v := b.alloc.names.New()
		v.At, v.Name = fl.at(e.tok), name
		return v
	case 'u':
		u := b.alloc.unaries.New()
		u.At, u.Op = fl.at(e.tok), '-'
		u.X = b.fastExpr(fl, e.x, c, false)
		return u
	}
	sum := top && (e.op == '+' || e.op == '-')
	x1 := b.fastExpr(fl, e.x, c, sum)
	y1 := b.fastExpr(fl, e.y, c, sum)
	bin := b.alloc.binaries.New()
	*bin = tree.Binary{At: fl.start(x), Op: e.op, X: x1, Y: y1}
	return bin
}

// start is where expression x begins: its outer parenthesis, or its first
// token.
func (fl *fastLine) start(x int32) tree.Pos {
	for {
		e := &fl.ex[x]
		switch {
		case e.paren >= 0:
			return fl.at(e.paren)
		case e.kind == 'b':
			x = e.x
		default:
			return fl.at(e.tok)
		}
	}
}

// commitItem places a checked item line: a branch under a node, a state
// under an uncertainty.
func (b *builder) commitItem(fl *fastLine) {
	parent := b.enter(&fl.lineHead)
	label := b.alloc.str(fl.label(0))
	at := fl.at(0)
	if parent.kind == fUnc {
		s := &tree.State{Label: label, Pos: at}
		if !fl.rest {
			s.Prob = b.fastExpr(fl, fl.prob, ctxProb, true)
		}
		parent.unc.States = append(parent.unc.States, s)
		b.push(&fl.lineHead, parent, b.newFrame(frame{kind: fLeaf, noun: "state", label: label, hasLabel: true}))
		return
	}
	br := b.alloc.branches.New()
	br.Label, br.Pos, br.Rest = label, at, fl.rest
	if fl.prob >= 0 {
		br.Prob = b.fastExpr(fl, fl.prob, ctxProb, true)
	}
	// The names are recorded in the order they are written.
	if fl.gainFirst {
		br.Gain = b.fastExpr(fl, fl.gain, ctxCash, true)
	}
	if fl.cost >= 0 {
		br.Cost = b.fastExpr(fl, fl.cost, ctxCash, true)
	}
	if fl.gain >= 0 && !fl.gainFirst {
		br.Gain = b.fastExpr(fl, fl.gain, ctxCash, true)
	}
	b.noteCash(br)
	parent.kids = append(parent.kids, br)
	b.countBranch(parent, at, int(fl.toks[0].width))
	b.push(&fl.lineHead, parent, b.newFrame(frame{kind: fBranch, noun: "branch", label: label, hasLabel: true, branch: br, owner: parent.owner}))
}

// commitNode places a checked node line of kind k, with its name (an
// uncertainty, or a subtree for `use`) and label at those tokens (-1:
// none).
func (b *builder) commitNode(fl *fastLine, k tree.Kind, name, label int32) {
	parent := b.enter(&fl.lineHead)
	if parent == nil {
		b.sawNodeTop = true
	}
	n := b.alloc.nodes.New()
	n.Kind, n.Pos = k, fl.at(0)
	var nameText string
	if name >= 0 {
		nameText = b.alloc.str(fl.text(name))
	}
	noun := "decision"
	switch k {
	case tree.KindChance:
		noun = "chance"
		if name >= 0 {
			n.Uncertainty = nameText
			b.refs = append(b.refs, declRef{name: nameText, pos: fl.at(name), width: int(fl.toks[name].width), kind: refChance})
		}
	case kindUse:
		noun = "use"
		n.Label = nameText
	}
	if label >= 0 {
		n.Label = b.alloc.str(fl.label(label))
	}
	f := b.placeNode(&fl.lineHead, parent, n, noun, nameText, label >= 0 || k == tree.KindDecision, false)
	if k == kindUse {
		if f.kind != fBroken {
			f.kind = fLeaf
		}
		u := &useRef{name: nameText, pos: fl.at(name), width: int(fl.toks[name].width), owner: f.owner, detached: f.detached}
		b.uses = append(b.uses, u)
		b.useAt[n] = u
	}
	b.push(&fl.lineHead, parent, f)
}

// commitLet places a checked let line.
func (b *builder) commitLet(fl *fastLine) {
	b.enter(&fl.lineHead)
	name := b.alloc.str(fl.text(1))
	b.lets.add(name, fl.num)
	p := &tree.Param{Name: name, Pos: fl.at(1)}
	p.Expr = b.fastExpr(fl, fl.val, ctxLet, true)
	if fl.lo >= 0 {
		p.Low = b.fastExpr(fl, fl.lo, ctxLet, true)
		p.High = b.fastExpr(fl, fl.hi, ctxLet, true)
	}
	b.m.Params = append(b.m.Params, p)
	b.push(&fl.lineHead, nil, b.newFrame(frame{kind: fLeaf, what: "let " + p.Name}))
}

// cursor is a tokenStream over a line's tokens, for reading an expression
// with the hand-written parsers outside participle (ParseExpr).
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
