package lang

import (
	"fmt"
	"strings"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// Names are checked here, while the file is read, so that a name that is
// defined nowhere gets a suggestion from the names that are (a let, an
// uncertainty, a test, or `rest` where a probability stands). A name that
// is defined, but below its use, is left to compiled.Compile, which says
// where.

// declared is the names one kind of line defines, in file order, with the
// line of the first definition. Every such line counts, even one placed
// wrongly (that is reported on its own): a misplaced `let` should not also
// make its uses unknown.
type declared struct {
	line  map[string]int
	order []string
}

func (d *declared) add(name string, line int) {
	if d.line == nil {
		d.line = map[string]int{}
	}
	if _, dup := d.line[name]; !dup {
		d.line[name] = line
		d.order = append(d.order, name)
	}
}

func (d *declared) has(name string) bool {
	_, ok := d.line[name]
	return ok
}

// nameRef is a name used in an expression that was not defined when it was
// met; finish checks it against every let in the file.
type nameRef struct {
	name  string
	pos   tree.Pos
	width int
	ctx   exprCtx
	top   bool // a whole term of an amount of money (see percentAdded)
}

// declRef is a name that must be a declared uncertainty or test: `chance
// NAME`, `test NAME` in the tree, or `on NAME` in a test declaration.
type declRef struct {
	name  string
	pos   tree.Pos
	width int
	kind  refKind
	test  string // for refOn: the test declared on it
}

type refKind uint8

const (
	refChance refKind = iota // chance NAME
	refTest                  // test NAME, in the tree
	refOn                    // test T on NAME
)

// declare records the name a let, uncertainty or test declaration line
// defines, from its tokens, so that even a line that could not be read
// counts.
func (b *builder) declare(l *srcLine) {
	switch l.kind {
	case kLet, kUncertainty, kTest:
	default:
		return // most lines: their tokens need not be touched here
	}
	toks := l.lx.toks
	if len(toks) < 2 || toks[1].Type != tokIdent {
		return
	}
	switch l.kind {
	case kLet:
		b.lets.add(toks[1].Value, l.num)
	case kUncertainty:
		b.uncs.add(toks[1].Value, l.num)
	case kTest:
		if isTestDecl(l) {
			b.tests.add(toks[1].Value, l.num)
		}
	}
}

// useName records a name met in an expression.
func (b *builder) useName(t lexer.Token, lx lexed, c exprCtx, top bool) {
	if !b.knownLet(t.Value, c, top) {
		b.pendingNames = append(b.pendingNames, nameRef{name: t.Value, pos: tokPos(t), width: tokWidth(lx, t), ctx: c, top: top})
	}
}

// knownLet reports whether name is a let defined above the line that uses
// it, marking a let that adds a bare percentage as used as money when it
// is a whole term of an amount. Names it does not know are checked once
// the whole file is read (checkNames).
func (b *builder) knownLet(name string, c exprCtx, top bool) bool {
	// The same input is often used line after line (cost price, ...):
	// one comparison instead of a map lookup.
	if name != b.lastLet && !b.lets.has(name) {
		return false
	}
	b.lastLet = name
	if top && c == ctxCash && b.percentLets != nil {
		b.usedAsMoney(nameRef{name: name, ctx: c, top: top})
	}
	return true
}

// usedAsMoney marks a let that adds a bare percentage as used as money
// when r is a whole term of an amount.
func (b *builder) usedAsMoney(r nameRef) {
	if r.top && r.ctx == ctxCash {
		if pl := b.percentLets[r.name]; pl != nil {
			pl.money = true
		}
	}
}

// checkNames reports the names used in expressions that no `let` in the
// file defines, and marks the lets used as money that were defined below
// their use.
func (b *builder) checkNames() {
	for _, r := range b.pendingNames {
		if b.lets.has(r.name) {
			b.usedAsMoney(r)
			continue // defined below its use: compiling says where
		}
		name := shorten(r.name)
		msg := fmt.Sprintf("unknown name %q", name)
		hint := "define it with `let " + name + " = ...` above this line"
		cands := b.lets.order
		if r.ctx == ctxProb {
			cands = append(cands[:len(cands):len(cands)], "rest")
		}
		switch s := suggestWithin(r.name, cands, &b.suggestBudget); {
		case s == "rest":
			msg += " (did you mean `rest`?)"
			hint = "`rest` takes whatever probability the others leave"
		case s != "":
			msg += fmt.Sprintf(" (did you mean `%s`?)", s)
			hint = fmt.Sprintf("`%s` is the input defined on line %d; or define %s with `let %s = ...` above this line", s, b.lets.line[s], name, name)
		case b.uncs.has(r.name):
			hint = fmt.Sprintf("%s is an uncertainty (line %d), not an input: a chance node on it is written `chance %s`; a calculation uses inputs defined with `let`", r.name, b.uncs.line[r.name], r.name)
		case b.tests.has(r.name):
			hint = fmt.Sprintf("%s is a test (line %d), not an input: it is run in the tree with `test %s`; a calculation uses inputs defined with `let`", r.name, b.tests.line[r.name], r.name)
		case b.subs[r.name] != nil:
			hint = fmt.Sprintf("%s is a subtree (line %d), not an input: it is placed in the tree with `use %s`; a calculation uses inputs defined with `let`", r.name, b.subs[r.name].line, r.name)
		}
		b.errAt(r.pos, r.width, hint, "%s", msg)
	}
}

// checkRefs reports `chance NAME`, `test NAME` and `on NAME` that name no
// declared uncertainty or test, with the closest declared name, and a test
// run with `chance` or an uncertainty run with `test`.
func (b *builder) checkRefs() {
	for _, r := range b.refs {
		switch {
		case r.kind == refChance && b.uncs.has(r.name), r.kind == refOn && b.uncs.has(r.name), r.kind == refTest && b.tests.has(r.name):
			continue
		case r.kind == refChance && b.tests.has(r.name):
			b.errAt(r.pos, r.width, "a node that runs a test is written `test "+r.name+"`; its branches are the test's readings",
				"%q is a test, not an uncertainty", r.name)
			continue
		case r.kind == refTest && b.uncs.has(r.name):
			b.errAt(r.pos, r.width, "a chance node on an uncertainty is written `chance "+r.name+"`; its branches are the uncertainty's states",
				"%q is an uncertainty, not a test", r.name)
			continue
		}
		list, noun, name := &b.uncs, "uncertainty", shorten(r.name)
		msg := fmt.Sprintf("unknown uncertainty %q", name)
		hint := "declare it with `uncertainty " + name + "` above the tree"
		switch r.kind {
		case refTest:
			list, noun = &b.tests, "test"
			msg = fmt.Sprintf("unknown test %q", name)
			hint = "declare it with `test " + name + " on ...` above the tree"
		case refOn:
			msg = fmt.Sprintf("test %q is on %q, which is not a declared uncertainty", shorten(r.test), name)
			hint = "declare it with `uncertainty " + name + "` above the test"
		}
		if s := suggestWithin(r.name, list.order, &b.suggestBudget); s != "" {
			msg += fmt.Sprintf(" (did you mean `%s`?)", s)
			hint = fmt.Sprintf("`%s` is the %s declared on line %d; or %s", s, noun, list.line[s], hint)
		} else if b.lets.has(r.name) {
			hint = fmt.Sprintf("%s is an input (let, line %d), not %s; %s", r.name, b.lets.line[r.name], article(noun), hint)
		}
		b.errAt(r.pos, r.width, hint, "%s", msg)
	}
}

// article puts "a" or "an" before a noun.
func article(noun string) string {
	if noun != "" && strings.ContainsRune("aeiou", rune(noun[0])) {
		return "an " + noun
	}
	return "a " + noun
}
