package lang

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// frameKind says what an open line takes under it.
type frameKind uint8

const (
	fLeaf     frameKind = iota // takes nothing
	fUnc                       // an uncertainty: its states
	fTestDecl                  // a test declaration: its readings
	fSubtree                   // a subtree: one node
	fNode                      // a decision, chance or test node: its branches
	fBranch                    // a branch: one node
	fBroken                    // a line that could not be read: lines under it are read but not placed
)

// frame is a line that lines below it may be indented under.
type frame struct {
	kind        frameKind
	indent      int
	childIndent int // -1 until the first line under it is seen
	line        int
	what        string // how messages name it: `let x`; empty: see desc
	noun, name  string
	label       string
	hasLabel    bool
	lastChild   *frame
	lastLine    int
	node        *tree.Node
	branch      *tree.Branch
	sub         *subtreeDef
	unc         *tree.Uncertainty
	test        *tree.Test
	hasNode     bool // a branch or subtree that already has its node
	nodeLine    int
	owner       *subtreeDef // the subtree the line is in; nil for the main tree
	detached    bool        // not part of the model (placed wrongly, reported)
	split       bool        // a three-point chance node: it takes one node, its branches are made
	silent      bool        // under a line that could not be read: no structure checks
	// kids are the branches of a node's frame while it is open: they go
	// to the node in one piece when it closes (closeFrame).
	kids []*tree.Branch
	reg  *regFrame // a register's line (register.go)
}

func (b *builder) brokenFrame(owner *subtreeDef) *frame {
	return b.newFrame(frame{kind: fBroken, silent: true, what: "this line", owner: owner})
}

// desc is how messages name the line: its what, or noun, name and quoted
// label (built only when a message needs it).
func (f *frame) desc() string {
	if f.what != "" {
		return f.what
	}
	s := f.noun
	if f.name != "" {
		s += " " + f.name
	}
	if f.hasLabel {
		s += " " + strconv.Quote(f.label)
	}
	return s
}

// subtreeDef is a `subtree NAME` definition.
type subtreeDef struct {
	name   string
	pos    tree.Pos
	line   int
	root   *tree.Node // may hold use placeholders
	deps   []*useRef  // the uses inside it
	used   bool
	broken bool // in a cycle, or empty: uses of it expand to nothing
	size   int  // nodes after expansion, saturated at the limit + 1
}

// useRef is one `use NAME` line.
type useRef struct {
	name     string
	pos      tree.Pos
	width    int
	owner    *subtreeDef
	detached bool
	target   *subtreeDef
}

// kindUse marks a placeholder node standing for `use NAME` until the
// subtree is expanded; Label holds the name. None is left in a returned
// model.
const kindUse tree.Kind = 0xff

// pendingCash is a branch's gain and cost, checked once the whole file is
// read.
type pendingCash struct {
	b          *tree.Branch
	gain, cost tree.Expr
}

type builder struct {
	limit    int
	free     []*frame // closed frames, for reuse
	alloc    allocator
	noFast   bool  // read every line with participle (to test the fast path against it)
	fastRead []int // the lines read by the fast path, when tracing (tests)
	trace    bool
	m        *tree.Model
	ds       tree.Diagnostics
	stack    []*frame
	headers  map[lineKind]int
	subs     map[string]*subtreeDef
	subOrder []*subtreeDef
	uses     []*useRef
	splits   int                    // three-point splits written
	useAt    map[*tree.Node]*useRef // placeholder → its use line
	refs     []declRef              // chance NAME, test NAME and on NAME, checked in finish
	lets     declared               // every let, uncertainty and test declared in the file
	uncs     declared
	tests    declared
	// pendingNames are the names met in expressions before any let defined
	// them; percentLets are the lets that add a bare percentage.
	pendingNames []nameRef
	percentLets  map[string]*percentLet
	chances      []plainChance // plain chance nodes as written
	strays       map[*frame][]strayItem
	// suggestBudget is what is left of the work suggestions may do.
	suggestBudget int
	lastLet       string // the last name found among the lets
	cash          []pendingCash
	rootLine      int
	sawNodeTop    bool
	// written counts the nodes of the main tree as written, the root and
	// one for each branch (each leads to a node or an end): never more
	// than the tree has once expanded. Past the node limit, reading stops
	// (stopped) with an error at the line.
	written   int
	stopped   bool
	registers *registerState // nil until a register is met (register.go)
	firstLine int
}

func (b *builder) errAt(p tree.Pos, n int, hint, format string, args ...any) {
	b.ds = append(b.ds, tree.Diagnostic{Severity: tree.Error, Pos: p, Len: n, Summary: fmt.Sprintf(format, args...), Hint: hint})
}

func tokPos(t lexer.Token) tree.Pos { return tree.At(t.Pos.Line, t.Pos.Column) }

// tokWidth is the width of a token in characters, found from the line.
func tokWidth(lx lexed, t lexer.Token) int {
	if i := tokenIndex(lx, t); i >= 0 {
		return lx.width[i]
	}
	return len([]rune(t.Value))
}

// unquote returns a label's text from its token ("..." with \" and \\).
func unquote(v string) string {
	v = strings.TrimPrefix(v, `"`)
	if !strings.Contains(v, `\`) {
		return strings.TrimSuffix(v, `"`)
	}
	var b strings.Builder
	for i := 0; i < len(v); i++ {
		c := v[i]
		if c == '\\' && i+1 < len(v) {
			b.WriteByte(v[i+1])
			i++
			continue
		}
		if c == '"' {
			break
		}
		b.WriteByte(c)
	}
	return b.String()
}

// add places one logical line.
func (b *builder) add(l *srcLine) {
	b.ds = append(b.ds, l.diags...)
	if len(l.lx.toks) == 0 {
		return
	}
	parent := b.enter(&l.lineHead)
	b.push(&l.lineHead, parent, b.place(l, parent))
}

// enter closes the frames a line at h is not under, checks its
// indentation against the frame it is under, and returns that frame (nil
// at the top level).
func (b *builder) enter(h *lineHead) *frame {
	if b.firstLine == 0 {
		b.firstLine = h.num
	}
	w := h.indent
	for len(b.stack) > 0 && b.stack[len(b.stack)-1].indent >= w {
		f := b.stack[len(b.stack)-1]
		b.closeFrame(f)
		b.stack = b.stack[:len(b.stack)-1]
		b.free = append(b.free, f)
	}
	var parent *frame
	if len(b.stack) > 0 {
		parent = b.stack[len(b.stack)-1]
		switch {
		case parent.childIndent < 0:
			parent.childIndent = w
		case parent.childIndent != w && !h.tab && !parent.silent:
			hint := fmt.Sprintf("line it up with %s on line %d (%s) or with %s on line %d (%s)",
				parent.lastChild.desc(), parent.lastLine, spaces(parent.childIndent), parent.desc(), parent.line, spaces(parent.indent))
			b.errAt(h.pos(), h.firstWidth(), hint, "the indentation (%s) does not line up with any line above", spaces(w))
		}
	} else if w > 0 && !h.tab {
		b.errAt(h.pos(), h.firstWidth(), "start top-level lines at the left edge; indent a line only to put it under the line above",
			"this line is indented, but there is no line above it to belong to")
	}
	return parent
}

// under is the frame a line indented by w would be under, found without
// closing anything.
func (b *builder) under(w int) *frame {
	for i := len(b.stack) - 1; i >= 0; i-- {
		if b.stack[i].indent < w {
			return b.stack[i]
		}
	}
	return nil
}

// push opens f, the frame of the line at h, under parent.
func (b *builder) push(h *lineHead, parent, f *frame) {
	f.indent, f.childIndent, f.line = h.indent, -1, h.num
	if h.tab {
		// Its width is unknowable (a tab counts one), so the lines that
		// seem to nest under it may not: check no structure there, the
		// tab itself is reported.
		f.silent = true
	}
	if parent != nil {
		parent.lastChild, parent.lastLine = f, h.num
		if parent.silent {
			f.silent = true
		}
		if parent.detached {
			f.detached = true
		}
	}
	b.stack = append(b.stack, f)
}

// newFrame returns a frame holding v, reusing one that was closed. A
// closed frame is only looked at again as the last child of the frame
// above it, for a message about the very line that closed it, before that
// line's own frame is made (see enter).
func (b *builder) newFrame(v frame) *frame {
	if n := len(b.free); n > 0 {
		f := b.free[n-1]
		b.free = b.free[:n-1]
		kids := f.kids[:0]
		*f = v
		f.kids = kids
		return f
	}
	f := new(frame)
	*f = v
	return f
}

func spaces(n int) string {
	if n == 0 {
		return "at the left edge"
	}
	if n == 1 {
		return "1 space"
	}
	return fmt.Sprintf("%d spaces", n)
}

// place reads a line in its context and returns its frame.
func (b *builder) place(l *srcLine, parent *frame) *frame {
	if f, ok := b.registerPlace(l, parent); ok {
		return f
	}
	silent := parent != nil && parent.silent
	var owner *subtreeDef
	if parent != nil {
		owner = parent.owner
	}
	role := roleBranch
	if parent != nil {
		switch parent.kind {
		case fUnc:
			role = roleState
		case fTestDecl:
			role = roleReading
		}
	}
	if l.kind == kUnknown && !silent && parent != nil && (parent.kind == fNode || parent.kind == fUnc || parent.kind == fTestDecl) &&
		!(len(l.lx.toks) > 1 && l.lx.toks[1].Type == tokString) {
		b.bareLabel(l, role)
	}
	if l.err != nil && !l.lx.lexErr {
		b.ds = append(b.ds, syntaxError(l.err, l.kind, role, l.lx))
	}
	if parent == nil && (l.kind == kDecision || l.kind == kChance || l.kind == kUse || l.kind == kTest && !isTestDecl(l)) {
		b.sawNodeTop = true
	}
	b.declare(l)
	first := l.first()
	switch l.kind {
	case kUnknown:
		if !silent && !l.lx.lexErr {
			b.unknownKeyword(l, parent)
		}
		return b.brokenFrame(owner)
	case kStray:
		if !silent && !l.lx.lexErr {
			hint := "a line starts with a keyword (" + strings.Join(topKeywords, ", ") + ") or with a quoted label"
			if first.Value == "gain" || first.Value == "cost" {
				hint = "gain and cost go on the branch's own line, after its label: \"Label\" gain 100"
			}
			b.errAt(l.pos(), l.firstWidth(), hint, "a line cannot start with %s", the(describe(first)))
		}
		return b.brokenFrame(owner)
	case kRisk:
		if silent {
			return b.newFrame(frame{kind: fLeaf, what: "the risk line", owner: owner})
		}
		return b.header(l, parent, false, "the risk tolerance line", func() { b.riskLine(l) })
	}
	if l.ast == nil {
		if parent != nil && parent.kind == fBranch && isNodeKind(l.kind) {
			parent.hasNode = true
		}
		return b.brokenFrame(owner)
	}
	if silent {
		// Read for its own mistakes, placed nowhere.
		b.lower(l, parent, role, true)
		return b.brokenFrame(owner)
	}
	return b.lower(l, parent, role, false)
}

func isNodeKind(k lineKind) bool {
	return k == kDecision || k == kChance || k == kUse || k == kTest
}

func isTestDecl(l *srcLine) bool {
	if t, ok := l.ast.(*gTest); ok {
		return t.On != nil
	}
	for _, t := range l.lx.toks {
		if t.Type == tokKeyword && t.Value == "on" {
			return true
		}
	}
	return false
}

// bareLabel handles a line under a node (or uncertainty, or test) that
// starts with unquoted words: most likely a label without its quotes. It is
// reported and the line is read as if the words were quoted.
func (b *builder) bareLabel(l *srcLine, role itemRole) {
	toks := l.lx.toks
	n := 0
	for n < len(toks) {
		t := toks[n]
		if t.Type == tokIdent || t.Type == tokKeyword && (t.Value == "on" || t.Value == "in" || t.Value == "if") {
			n++
			continue
		}
		break
	}
	last := n - 1
	end := toks[last].Pos.Column + l.lx.width[last]
	words := make([]string, n)
	for i := range n {
		words[i] = toks[i].Value
	}
	text := strings.Join(words, " ")
	b.errAt(l.pos(), end-toks[0].Pos.Column, fmt.Sprintf("write it as %q", text), "the label must be in double quotes")
	// Read the rest of the line with the label quoted.
	nt := append([]lexer.Token{{Type: tokString, Value: `"` + text + `"`, Pos: toks[0].Pos}}, toks[n:]...)
	nw := append([]int{end - toks[0].Pos.Column}, l.lx.width[n:]...)
	lx := lexed{toks: nt, width: nw, endCol: l.lx.endCol, lexErr: true, noParse: l.lx.noParse}
	hadLexErr := l.lx.lexErr
	l.lx, l.kind = lx, kItem
	l.setHead()
	l.ast, l.err = nil, nil
	if !lx.noParse {
		g, err := parseWith(getParsers().item, nt, lexer.Position{Line: l.num, Column: lx.endCol})
		if err != nil {
			if !hadLexErr {
				b.ds = append(b.ds, syntaxError(err, kItem, role, lx))
			}
		} else {
			l.ast = g
		}
	}
}

func (b *builder) unknownKeyword(l *srcLine, parent *frame) {
	first := l.first()
	list := topKeywords
	hint := "a line starts with one of: " + strings.Join(topKeywords, ", ") + "; or with a quoted label"
	if parent != nil {
		switch parent.kind {
		case fBranch, fSubtree:
			list = nodeKeywords
			hint = "under " + parent.desc() + " goes a node: " + strings.Join(nodeKeywords, ", ")
		case fNode:
			hint = "the lines under " + parent.desc() + " are its branches, each starting with a quoted label"
		}
	}
	msg := fmt.Sprintf("unknown keyword %q", shorten(first.Value))
	if s := suggest(strings.ToLower(first.Value), list); s != "" {
		msg += fmt.Sprintf(" (did you mean `%s`?)", s)
	} else if lk, ok := lineKinds[strings.ToLower(first.Value)]; ok && lk != kRisk {
		msg += fmt.Sprintf(" (keywords are lower case: `%s`)", strings.ToLower(first.Value))
	}
	b.errAt(l.pos(), l.firstWidth(), hint, "%s", msg)
}

// topOnly reports a declaration that is indented; it returns false then.
func (b *builder) topOnly(l *lineHead, parent *frame, what string) bool {
	if parent == nil {
		return true
	}
	b.errAt(l.pos(), l.firstWidth(), "remove the indentation: "+what+" stands at the left edge, outside the tree",
		"%s goes at the top level, not indented under %s", what, parent.desc())
	return false
}

// lower turns a parsed line into model parts and returns its frame. When
// quiet is set the line is checked but nothing is attached and no
// structure errors are reported.
func (b *builder) lower(l *srcLine, parent *frame, role itemRole, quiet bool) *frame {
	var owner *subtreeDef
	if parent != nil {
		owner = parent.owner
	}
	if quiet {
		parent = nil
	}
	switch g := l.ast.(type) {
	case *gTitle:
		return b.header(l, parent, quiet, "the title line", func() {
			if g.Label == nil {
				b.errAt(tokPos(g.Kw), tokWidth(l.lx, g.Kw), `write the title in double quotes: title "Which supplier"`, "the title line has no title")
				return
			}
			b.m.Title = b.label(l, g.Label, "the title")
		})
	case *gCurrency:
		return b.header(l, parent, quiet, "the currency line", func() {
			if g.Code == nil {
				if !l.lx.lexErr { // a stray character (€) is reported already
					b.errAt(tokPos(g.Kw), tokWidth(l.lx, g.Kw), "write the currency's code after it, such as currency EUR", "the currency line has no currency")
				}
				return
			}
			code := g.Code.Value
			if g.Code.Type == tokString {
				code = unquote(code)
			}
			b.m.Currency = code
		})
	case *gObjective:
		return b.header(l, parent, quiet, "the objective line", func() {
			hint := "`objective max` maximises net value (gains minus costs); `objective min` minimises net cost (costs minus gains)"
			if g.Word == nil {
				b.errAt(tokPos(g.Kw), tokWidth(l.lx, g.Kw), hint, "the objective line does not say max or min")
				return
			}
			o, ok := tree.ParseObjective(g.Word.Value)
			if !ok || g.Word.Value == "" {
				b.errAt(tokPos(*g.Word), tokWidth(l.lx, *g.Word), hint, "the objective is max or min, not %s", g.Word.Value)
				return
			}
			b.m.Objective = o
		})
	case *gLet:
		if !quiet && !b.topOnly(&l.lineHead, parent, "a let") {
			return b.brokenFrame(owner)
		}
		p := &tree.Param{Name: g.Name.Value, Pos: tokPos(g.Name)}
		p.Expr = b.expr(g.Value, ctxLet, l.lx)
		if pa := findPercentAdded(g.Value, l.lx); pa != nil && !quiet {
			if b.percentLets == nil {
				b.percentLets = map[string]*percentLet{}
			}
			b.percentLets[p.Name] = &percentLet{name: p.Name, p: pa}
		}
		if g.In != nil {
			p.Low = b.expr(g.Low, ctxLet, l.lx)
			p.High = b.expr(g.High, ctxLet, l.lx)
			b.rangePercent(p.Name, g.Value, g.Low, g.High, l.lx)
		}
		if !quiet {
			b.m.Params = append(b.m.Params, p)
		}
		return b.newFrame(frame{kind: fLeaf, what: "let " + p.Name})
	case *gUncertainty:
		if !quiet && !b.topOnly(&l.lineHead, parent, "an uncertainty") {
			return b.brokenFrame(owner)
		}
		u := &tree.Uncertainty{Name: g.Name.Value, Pos: tokPos(g.Name)}
		if g.Label != nil {
			u.Label = b.labelTok(l, *g.Label)
		}
		if quiet {
			return b.brokenFrame(owner)
		}
		b.m.Uncertainties = append(b.m.Uncertainties, u)
		return b.newFrame(frame{kind: fUnc, what: "uncertainty " + u.Name, unc: u})
	case *gTest:
		if g.On != nil {
			b.refs = append(b.refs, declRef{name: g.Unc.Value, pos: tokPos(*g.Unc), width: tokWidth(l.lx, *g.Unc), kind: refOn, test: g.Name.Value})
			if !quiet && parent != nil {
				b.errAt(l.pos(), l.firstWidth(), "declare the test at the top level; in the tree, run it with `test "+g.Name.Value+"`",
					"a test is declared at the top level, not under %s", parent.desc())
				return b.brokenFrame(owner)
			}
			t := &tree.Test{Name: g.Name.Value, Pos: tokPos(g.Name), On: g.Unc.Value}
			if g.Label != nil {
				t.Label = b.labelTok(l, *g.Label)
			}
			if g.Cost != nil {
				t.Cost = b.expr(g.Cost, ctxCash, l.lx)
				if pa := findPercentAdded(g.Cost, l.lx); pa != nil {
					b.warnPercentAdded(pa, "cost ")
				}
			}
			if quiet {
				return b.brokenFrame(owner)
			}
			b.m.Tests = append(b.m.Tests, t)
			return b.newFrame(frame{kind: fTestDecl, what: "test " + t.Name, test: t})
		}
		n := &tree.Node{Kind: tree.KindChance, Test: g.Name.Value, Pos: tokPos(g.Kw)}
		b.refs = append(b.refs, declRef{name: g.Name.Value, pos: tokPos(g.Name), width: tokWidth(l.lx, g.Name), kind: refTest})
		if g.Label != nil {
			n.Label = b.labelTok(l, *g.Label)
		}
		return b.placeNode(&l.lineHead, parent, n, "test", g.Name.Value, g.Label != nil, quiet)
	case *gSubtree:
		if !quiet && !b.topOnly(&l.lineHead, parent, "a subtree") {
			return b.brokenFrame(owner)
		}
		if quiet {
			return b.brokenFrame(owner)
		}
		d := &subtreeDef{name: g.Name.Value, pos: tokPos(g.Name), line: l.num}
		if prev := b.subs[d.name]; prev != nil {
			b.errAt(d.pos, tokWidth(l.lx, g.Name), fmt.Sprintf("it was first defined on line %d; give this one another name", prev.line),
				"subtree %q is defined twice", d.name)
		} else {
			b.subs[d.name] = d
		}
		b.subOrder = append(b.subOrder, d)
		return b.newFrame(frame{kind: fSubtree, what: "subtree " + d.name, sub: d, owner: d})
	case *gDecision:
		n := &tree.Node{Kind: tree.KindDecision, Pos: tokPos(g.Kw)}
		if g.Label == nil {
			b.errAt(tokPos(g.Kw), tokWidth(l.lx, g.Kw), `write its label in double quotes after it: decision "Which supplier"`, "the decision has no label")
		} else {
			n.Label = b.label(l, g.Label, "the label")
		}
		return b.placeNode(&l.lineHead, parent, n, "decision", "", true, quiet)
	case *gChance:
		if g.By != nil {
			return b.splitLine(l, g, parent, quiet)
		}
		n := &tree.Node{Kind: tree.KindChance, Pos: tokPos(g.Kw)}
		if g.Name != nil {
			n.Uncertainty = g.Name.Value
			b.refs = append(b.refs, declRef{name: g.Name.Value, pos: tokPos(*g.Name), width: tokWidth(l.lx, *g.Name), kind: refChance})
		}
		if g.Label != nil {
			n.Label = b.labelTok(l, *g.Label)
		}
		if g.Name == nil && g.Label == nil {
			b.errAt(tokPos(g.Kw), tokWidth(l.lx, g.Kw),
				`write chance "Label" for a chance node with its own probabilities, or chance NAME for a declared uncertainty`,
				"the chance node has no label")
		}
		return b.placeNode(&l.lineHead, parent, n, "chance", n.Uncertainty, g.Label != nil, quiet)
	case *gUse:
		n := &tree.Node{Kind: kindUse, Label: g.Name.Value, Pos: tokPos(g.Kw)}
		f := b.placeNode(&l.lineHead, parent, n, "use", g.Name.Value, false, quiet)
		if f.kind != fBroken {
			f.kind = fLeaf
		}
		u := &useRef{name: g.Name.Value, pos: tokPos(g.Name), width: tokWidth(l.lx, g.Name), owner: f.owner, detached: f.detached || quiet}
		b.uses = append(b.uses, u)
		b.useAt[n] = u
		return f
	case *gItem:
		return b.placeItem(l, g, parent, role, quiet)
	case *gCorrelate:
		if !quiet && !b.topOnly(&l.lineHead, parent, "a correlation") {
			return b.brokenFrame(owner)
		}
		c := &tree.Correlation{A: g.A.Value, B: g.B.Value, APos: tokPos(g.A), BPos: tokPos(g.B), Pos: tokPos(g.Kw)}
		c.Rho = b.expr(g.Rho, ctxLet, l.lx)
		if !quiet {
			b.m.Correlations = append(b.m.Correlations, c)
		}
		return b.newFrame(frame{kind: fLeaf, what: "the correlate line"})
	}
	return b.brokenFrame(owner)
}

// header sets a header once, checking it is at the top level.
func (b *builder) header(l *srcLine, parent *frame, quiet bool, what string, set func()) *frame {
	f := b.newFrame(frame{kind: fLeaf, what: what})
	if quiet {
		return f
	}
	if !b.topOnly(&l.lineHead, parent, what) {
		return b.newFrame(frame{kind: fBroken, silent: true, what: what})
	}
	if prev := b.headers[l.kind]; prev != 0 {
		b.errAt(l.pos(), l.firstWidth(), fmt.Sprintf("it was first given on line %d; keep one", prev), "the %s is given twice", strings.TrimSuffix(strings.TrimPrefix(what, "the "), " line"))
		return f
	}
	b.headers[l.kind] = l.num
	set()
	return f
}

// label reads a title or decision label, reporting one that is not quoted.
func (b *builder) label(l *srcLine, g *gLabel, what string) string {
	if g.Str != nil {
		return b.labelTok(l, *g.Str)
	}
	words := make([]string, len(g.Bare))
	for i, w := range g.Bare {
		words[i] = w.Tok.Value
	}
	text := strings.Join(words, " ")
	first, last := g.Bare[0].Tok, g.Bare[len(g.Bare)-1].Tok
	n := last.Pos.Column + tokWidth(l.lx, last) - first.Pos.Column
	b.errAt(tokPos(first), n, fmt.Sprintf("write it as %q", text), "%s must be in double quotes", what)
	return text
}

// labelTok reads a quoted label, reporting one that is empty.
func (b *builder) labelTok(l *srcLine, t lexer.Token) string {
	s := unquote(t.Value)
	if strings.TrimSpace(s) == "" && !l.lx.lexErr {
		b.errAt(tokPos(t), tokWidth(l.lx, t), "write what it stands for between the quotes", "the label is empty")
	}
	return s
}

// placeNode attaches a node where its line stands.
func (b *builder) placeNode(l *lineHead, parent *frame, n *tree.Node, noun, name string, hasLabel, quiet bool) *frame {
	f := b.newFrame(frame{kind: fNode, node: n, noun: noun, name: name, label: n.Label, hasLabel: hasLabel})
	if parent != nil {
		f.owner = parent.owner
	}
	if quiet {
		f.detached = true
		return f
	}
	detach := func(hint, format string, args ...any) *frame {
		b.errAt(l.pos(), l.firstWidth(), hint, format, args...)
		f.detached = true
		return f
	}
	if n.Kind == tree.KindChance && n.Uncertainty == "" && n.Test == "" && n.Split == nil {
		defer func() {
			if !f.detached {
				b.chances = bulk.Grow(b.chances, 1)
				b.chances = append(b.chances, plainChance{n: n, line: int32(l.num), width: int32(l.endCol - int(l.at.Col))})
			}
		}()
	}
	if parent == nil {
		if b.m.Root == nil && b.rootLine == 0 {
			b.m.Root, b.rootLine = n, l.num
			return f
		}
		return detach("a model has one tree, with a single node at the top; make the alternatives branches of one decision",
			"a second root node: the tree already starts on line %d", b.rootLine)
	}
	switch parent.kind {
	case fSubtree:
		if parent.hasNode {
			return detach("a subtree holds exactly one node; put several under one decision as its branches, or define more subtrees",
				"%s already has its node (line %d)", parent.desc(), parent.nodeLine)
		}
		parent.sub.root, parent.hasNode, parent.nodeLine = n, true, l.num
	case fBranch:
		if parent.hasNode {
			return detach("a branch leads to one node; give each node its own branch",
				"%s already leads to a node (line %d)", parent.desc(), parent.nodeLine)
		}
		parent.branch.Node, parent.hasNode, parent.nodeLine = n, true, l.num
	case fNode:
		return detach(fmt.Sprintf("the lines under %s are its branches, each starting with a quoted label; put a branch such as \"Go ahead\" above this line and indent the node under it", parent.desc()),
			"a node where a branch is expected")
	case fUnc:
		return detach("under an uncertainty go its states: a quoted label and a probability each, such as \"On time\" 55%",
			"a node cannot go under %s", parent.desc())
	case fTestDecl:
		return detach("under a test declaration go its readings, such as \"Alarm\" 90% if \"Defective\", 8% if \"Sound\"",
			"a node cannot go under %s", parent.desc())
	default:
		return detach(b.leafHint(parent), "%s takes no lines under it", parent.desc())
	}
	return f
}

func (b *builder) leafHint(f *frame) string {
	if strings.HasPrefix(f.desc(), "use ") {
		return "a use line stands for the whole subtree; to change what is under it, change the subtree"
	}
	return fmt.Sprintf("remove the indentation, or move the line to where it belongs (the line above is %s, on line %d)", f.desc(), f.line)
}

// placeItem reads a quoted-label line as a branch, a state or a reading,
// by what it is under.
func (b *builder) placeItem(l *srcLine, g *gItem, parent *frame, role itemRole, quiet bool) *frame {
	owner := (*subtreeDef)(nil)
	if parent != nil {
		owner = parent.owner
	}
	label := b.labelTok(l, g.Label)
	lp, lw := tokPos(g.Label), tokWidth(l.lx, g.Label)
	if quiet {
		b.itemExprs(l, g)
		return b.brokenFrame(owner)
	}
	if parent == nil {
		b.errAt(lp, lw, "indent it under the decision or chance node it belongs to (or under its uncertainty or test)",
			"a branch line with no node above it")
		return b.brokenFrame(owner)
	}
	switch parent.kind {
	case fNode:
		br := b.branch(l, g, label)
		parent.kids = append(parent.kids, br)
		b.countBranch(parent, lp, lw)
		return b.newFrame(frame{kind: fBranch, noun: "branch", label: label, hasLabel: true, branch: br, owner: owner})
	case fUnc:
		b.state(l, g, label, parent)
		return b.newFrame(frame{kind: fLeaf, noun: "state", label: label, hasLabel: true})
	case fTestDecl:
		b.reading(l, g, label, parent)
		return b.newFrame(frame{kind: fLeaf, noun: "reading", label: label, hasLabel: true})
	case fBranch:
		if parent.split {
			b.errAt(lp, lw, "its branches are made for it ("+splitLabels(parent.node)+"); indent under it the node that follows each of them",
				"a three-point chance node takes a node under it, not branches")
			break
		}
		b.addStray(parent, strayItem{pos: lp, width: lw, indent: l.indent, label: label,
			prob: g.tail().Amount != nil, afterNode: parent.hasNode})
	case fSubtree:
		b.errAt(lp, lw, "a subtree holds one node: put a decision or chance line under the subtree line, and the branches under that",
			"a branch where a node is expected")
	default:
		b.errAt(lp, lw, b.leafHint(parent), "%s takes no lines under it", parent.desc())
	}
	return b.brokenFrame(owner)
}

// itemExprs checks the expressions of a line that is placed nowhere.
func (b *builder) itemExprs(l *srcLine, g *gItem) {
	if a := g.tail().Amount; a != nil {
		for _, x := range append([]*gGiven{a.First}, a.More...) {
			if x.Prob != nil {
				b.primary(x.Prob, ctxProb, l.lx)
			}
		}
	}
	for _, c := range g.tail().Cash {
		b.expr(c.Amount, ctxCash, l.lx)
	}
}

func (b *builder) branch(l *srcLine, g *gItem, label string) *tree.Branch {
	br := &tree.Branch{Label: label, Pos: tokPos(g.Label)}
	if a := g.tail().Amount; a != nil {
		if a.First.If != nil || len(a.More) > 0 {
			at := a.First.If
			if at == nil {
				at = firstTok(a.More[0])
			}
			b.errAt(tokPos(*at), tokWidth(l.lx, *at),
				"a branch's probability is a number, a percent, a name, a calculation in parentheses, or rest",
				"likelihoods (`if`) belong to the readings of a test declaration")
		}
		if a.First.Rest != nil {
			br.Rest = true
		} else {
			br.Prob = b.primary(a.First.Prob, ctxProb, l.lx)
		}
	}
	var p pendingCash
	p.b = br
	for _, c := range g.tail().Cash {
		e := b.expr(c.Amount, ctxCash, l.lx)
		if pa := findPercentAdded(c.Amount, l.lx); pa != nil {
			b.warnPercentAdded(pa, c.Kind.Value+" ")
		}
		slot := &p.gain
		if c.Kind.Value == "cost" {
			slot = &p.cost
		}
		if *slot != nil {
			b.errAt(tokPos(c.Kind), tokWidth(l.lx, c.Kind), fmt.Sprintf("add the amounts in one: %s A + B", c.Kind.Value),
				"a second `%s` on this branch", c.Kind.Value)
			continue
		}
		*slot = e
	}
	br.Gain, br.Cost = p.gain, p.cost
	b.noteCash(br)
	return br
}

// noteCash keeps a branch whose gain or cost is written with a minus sign,
// to be warned about once the file is read.
func (b *builder) noteCash(br *tree.Branch) {
	_, g := br.Gain.(*tree.Unary)
	_, c := br.Cost.(*tree.Unary)
	if g || c {
		b.cash = append(b.cash, pendingCash{b: br, gain: br.Gain, cost: br.Cost})
	}
}

func firstTok(g *gGiven) *lexer.Token {
	if g.Rest != nil {
		return g.Rest
	}
	return firstPrimaryTok(g.Prob)
}

// firstPrimaryTok is the first token of a primary.
func firstPrimaryTok(p primaryValue) *lexer.Token {
	switch p := p.(type) {
	case *eNum:
		return &p.Tok
	case *eRest:
		return &p.Tok
	case *eName:
		return &p.Tok
	case *eCall:
		return &p.Name
	case *eParen:
		return &p.Open
	case *eNeg:
		return &p.Tok
	case *eBin:
		return firstPrimaryTok(p.X)
	}
	return &lexer.Token{}
}

func (b *builder) state(l *srcLine, g *gItem, label string, parent *frame) {
	s := &tree.State{Label: label, Pos: tokPos(g.Label)}
	u := parent.unc
	a := g.tail().Amount
	switch {
	case a == nil:
		b.errAt(s.Pos, tokWidth(l.lx, g.Label), "write its probability after the label, such as 55% or 0.55, or rest for what the other states leave",
			"state %q has no probability", label)
	case a.First.If != nil || len(a.More) > 0:
		at := a.First.If
		if at == nil {
			at = firstTok(a.More[0])
		}
		b.errAt(tokPos(*at), tokWidth(l.lx, *at), "a state has one probability; likelihoods go in a test declaration's readings",
			"likelihoods (`if`) belong to the readings of a test declaration")
	case a.First.Rest != nil:
	default:
		s.Prob = b.primary(a.First.Prob, ctxProb, l.lx)
	}
	if len(g.tail().Cash) > 0 {
		k := g.tail().Cash[0].Kind
		b.errAt(tokPos(k), tokWidth(l.lx, k), "put gain and cost on the branches of the tree", "a state of an uncertainty carries no money")
	}
	u.States = append(u.States, s)
}

func (b *builder) reading(l *srcLine, g *gItem, label string, parent *frame) {
	rd := &tree.Reading{Label: label, Pos: tokPos(g.Label)}
	t := parent.test
	a := g.tail().Amount
	if a == nil {
		b.errAt(rd.Pos, tokWidth(l.lx, g.Label), `give P(reading | state) for the states, as in "Alarm" 90% if "Defective", 8% if "Sound", or write rest`,
			"reading %q gives no likelihoods", label)
	} else {
		for _, x := range append([]*gGiven{a.First}, a.More...) {
			if x.Rest != nil {
				if x.If != nil {
					b.errAt(tokPos(*x.If), tokWidth(l.lx, *x.If), "write just rest: it gives every state not listed what its other readings leave",
						"`rest` stands alone in a reading")
				}
				if rd.Rest {
					b.errAt(tokPos(*x.Rest), tokWidth(l.lx, *x.Rest), "write rest once", "`rest` twice in one reading")
				}
				rd.Rest = true
				continue
			}
			e := b.primary(x.Prob, ctxProb, l.lx)
			if x.If == nil {
				ft := firstPrimaryTok(x.Prob)
				b.errAt(tokPos(*ft), tokWidth(l.lx, *ft), `write the state it is for after it, as in 90% if "Defective"`,
					"the likelihood %s does not say which state it is for", e)
				continue
			}
			rd.Given = append(rd.Given, &tree.Likelihood{State: unquote(x.State.Value), Prob: e, Pos: tokPos(*x.State)})
		}
	}
	if len(g.tail().Cash) > 0 {
		k := g.tail().Cash[0].Kind
		b.errAt(tokPos(k), tokWidth(l.lx, k), "the test's cost goes on its declaration: test NAME on UNCERTAINTY cost AMOUNT",
			"a reading of a test carries no money")
	}
	t.Readings = append(t.Readings, rd)
}

// exprCtx says where an expression stands, for the message about a
// misplaced `rest`.
type exprCtx uint8

const (
	ctxLet exprCtx = iota
	ctxProb
	ctxCash
	ctxExpr // a calculation read on its own (ParseExpr)
)

func (b *builder) expr(e exprValue, c exprCtx, lx lexed) tree.Expr {
	x, _ := b.lowerExpr(e, c, lx, true)
	return x
}

func (b *builder) primary(p primaryValue, c exprCtx, lx lexed) tree.Expr {
	x, _ := b.lowerExpr(p, c, lx, true)
	return x
}

// lowerExpr turns a parsed expression into a tree.Expr; it also returns
// where the expression starts (for a parenthesised one, at the parenthesis).
// It recurses along the expression, whose nesting the lexer bounds. top
// says that e is a whole term of the expression's sum (parentheses aside).
func (b *builder) lowerExpr(e exprValue, c exprCtx, lx lexed, top bool) (tree.Expr, tree.Pos) {
	switch e := e.(type) {
	case *eNum:
		at := tokPos(e.Tok)
		v, msg, hint := parseNumber(e.Tok.Value)
		if msg != "" {
			b.errAt(at, tokWidth(lx, e.Tok), hint, "%s", msg)
		}
		n := tree.WrittenDecimal(at, v, e.Tok.Value)
		return &n, at
	case *eRest:
		at := tokPos(e.Tok)
		switch c {
		case ctxLet:
			b.errAt(at, 4, "rest stands only for the probability that a chance node's other branches leave; give a number or a calculation here",
				"`rest` cannot be used in a let")
		case ctxProb, ctxExpr:
			b.errAt(at, 4, "write rest on its own, as the whole probability of the branch that takes what the others leave",
				"`rest` cannot be part of a calculation")
		default:
			b.errAt(at, 4, "rest stands only for a probability (what the other branches leave); write an amount here",
				"`rest` is not an amount")
		}
		n := tree.WrittenDecimal(at, decimal.Zero, "rest")
		return &n, at
	case *eName:
		at := tokPos(e.Tok)
		b.useName(e.Tok, lx, c, top)
		return &tree.Name{At: at, Name: e.Tok.Value}, at
	case *eCall:
		at := tokPos(e.Name)
		args := make([]tree.Expr, len(e.Args))
		for i, a := range e.Args {
			args[i], _ = b.lowerExpr(a, c, lx, false)
		}
		return &tree.Call{At: at, Func: e.Name.Value, Args: args}, at
	case *eParen:
		at := tokPos(e.Open)
		x, _ := b.lowerExpr(e.X, c, lx, top)
		if bin, ok := x.(*tree.Binary); ok {
			bin.At = at
		}
		return x, at
	case *eNeg:
		at := tokPos(e.Tok)
		x, _ := b.lowerExpr(e.X, c, lx, false)
		return &tree.Unary{At: at, Op: '-', X: x}, at
	case *eBin:
		sum := top && (e.Op.Value == "+" || e.Op.Value == "-")
		x, at := b.lowerExpr(e.X, c, lx, sum)
		y, _ := b.lowerExpr(e.Y, c, lx, sum)
		return &tree.Binary{At: at, Op: e.Op.Value[0], X: x, Y: y}, at
	}
	return tree.NumberOf(tree.Pos{}, decimal.Zero), tree.Pos{}
}

// finish runs the checks that need the whole file.
func (b *builder) finish() {
	for i := len(b.stack) - 1; i >= 0; i-- {
		b.closeFrame(b.stack[i])
	}
	b.stack = nil
	if b.stopped {
		// Only part of the file was read: what the rest would settle
		// (names defined below, subtrees) is not checked.
		if b.m.Root != nil {
			b.dropUses()
		}
		return
	}
	switch {
	case b.firstLine == 0 && len(b.ds) == 0:
		b.errAt(tree.Pos{Line: 1, Col: 1}, 1, "a model needs at least a tree: a `decision` line with its options indented beneath it",
			"the model is empty: it has no lines other than comments and blank lines")
	case b.m.Root == nil && !b.sawNodeTop && b.firstLine > 0 && !b.ds.HasErrors() && len(b.m.Registers) == 0:
		b.errAt(tree.At(b.firstLine, 1), 1, "add the tree at the left edge: a `decision` line, with its options indented beneath it",
			"the model has no tree: no decision, chance or test line at the top level")
	}
	for _, p := range b.cash {
		for _, c := range []struct {
			word, other string
			e           tree.Expr
		}{{"gain", "cost", p.gain}, {"cost", "gain", p.cost}} {
			if u, neg := c.e.(*tree.Unary); neg && u.Op == '-' {
				// Amounts are written positive; the word gives the sign.
				b.ds.Warn(u.Pos(), fmt.Sprintf("write `%s %s` if that is meant", c.other, u.X),
					"a negative %s: `%s %s` counts as %s %s", c.word, c.word, u, c.other, u.X)
			}
		}
	}
	b.checkNames()
	b.checkRefs()
	b.finishRegisters()
	for _, pl := range b.percentLets {
		if pl.money {
			b.warnPercentAdded(pl.p, "let "+pl.name+" = ")
		}
	}
	b.repeatedChance()
	for _, d := range b.subOrder {
		if d.root == nil && b.subs[d.name] == d {
			d.broken = true
			b.errAt(d.pos, len([]rune(d.name)), "indent one node (a decision, chance or test line) beneath it",
				"subtree %q has no node under it", d.name)
		}
	}
	b.expand()
	b.splitOut()
}

// countBranch counts a branch placed under the node of frame parent (at
// at, width wide) and stops reading once the main tree as written is past
// the node limit: a file of millions of plain lines is refused as it is
// read, before it is all built.
func (b *builder) countBranch(parent *frame, at tree.Pos, width int) {
	if parent.owner != nil || parent.detached || b.stopped {
		return // in a subtree's definition (weighed at its uses), or not placed
	}
	if b.written == 0 {
		b.written = 1 // the root
	}
	b.written++
	if b.written > b.limit {
		b.errAt(at, width, "if the model really is this big, raise the node limit (--max-nodes on the command line; Options.NodeLimit in Go)",
			"the tree has more than %s nodes; reading stopped here", grouped(b.limit))
		b.stopped = true
	}
}
