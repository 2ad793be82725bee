package lang

import (
	"bytes"
	"fmt"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// lineHead is what placing a line in the tree needs to know of it, on
// the fast path and the slow one alike.
type lineHead struct {
	num    int // 1-based line number
	indent int // width of the indentation in characters (a tab counts one)
	tab    bool
	at     tree.Pos // where the first token is
	width  int      // the first token's width in characters
	endCol int      // the column just after the last token
}

// pos returns the position of the line's first token.
func (h *lineHead) pos() tree.Pos { return h.at }

// firstWidth is the width of the first token.
func (h *lineHead) firstWidth() int { return h.width }

// srcLine is one logical line read the slow way: lexed by lexLine and
// parsed by participle.
type srcLine struct {
	lineHead
	lx    lexed
	kind  lineKind
	ast   any   // the parsed production; nil if parsing failed or was skipped
	err   error // the parse error, reported in context by the builder
	diags tree.Diagnostics
}

// first returns the line's first token.
func (l *srcLine) first() lexer.Token { return l.lx.toks[0] }

// setHead fills the line's head from its tokens.
func (l *srcLine) setHead() {
	l.at, l.width, l.endCol = tokPos(l.lx.toks[0]), l.lx.width[0], l.lx.endCol
}

// read splits src into logical lines and places each in the tree, one at
// a time: a line is read by the fast path (fast.go) when it can be, by
// lexLine and participle otherwise. Nothing of a line is kept once it is
// placed but what goes into the model. Tabs in the indentation are
// reported here; everything else about a line's content is reported by
// the lexer, the parser and the builder.
func (b *builder) read(src []byte) {
	src = bytes.TrimPrefix(src, []byte("\ufeff"))
	ps := getParsers()
	num := 0
	// A file indented with tabs has them on most lines: the first is
	// reported, and the others counted in a note on it.
	firstTab := -1 // its index in b.ds
	moreTabs, nextTab, lastTab := 0, 0, 0
	fl := &fastLine{}
	// A line ends at LF, CRLF or a lone CR, as tree.SplitLines has it. nl
	// is the offset of the next LF at or after pos (-1: none left), kept
	// across lines so that a file of lone CRs is read in linear time.
	pos, nl := 0, -2
	for pos < len(src) || num == 0 {
		num++
		if nl != -1 && nl < pos {
			if nl = bytes.IndexByte(src[pos:], '\n'); nl >= 0 {
				nl += pos
			}
		}
		end := len(src)
		if nl >= 0 {
			end = nl
		}
		var raw []byte
		if k := bytes.IndexByte(src[pos:end], '\r'); k >= 0 {
			raw, pos = src[pos:pos+k], pos+k+1
			if pos < len(src) && src[pos] == '\n' {
				pos++
			}
		} else {
			raw, pos = src[pos:end], end+1
		}
		n := 0
		tabAt := -1
		for n < len(raw) && (raw[n] == ' ' || raw[n] == '\t') {
			if raw[n] == '\t' && tabAt < 0 {
				tabAt = n
			}
			n++
		}
		content := raw[n:]
		if len(content) == 0 || content[0] == '#' {
			continue
		}
		if tabAt < 0 && !b.noFast && b.fast(fl, content, num, n) {
			if b.trace {
				b.fastRead = append(b.fastRead, num)
			}
			continue
		}
		l := &srcLine{lineHead: lineHead{num: num, indent: n, tab: tabAt >= 0}}
		switch {
		case l.tab && firstTab < 0:
			l.diags.Add(tree.At(num, tabAt+1),
				"indent with spaces only (two per level is usual); most editors can be set to insert spaces for the Tab key",
				"tab character in the indentation")
			l.diags[len(l.diags)-1].Len = 1
			firstTab = len(b.ds) // add puts the line's diagnostics first
		case l.tab:
			moreTabs++
			if nextTab == 0 {
				nextTab = num
			}
			lastTab = num
		}
		l.lx = lexLine(string(content), num, n+1, &l.diags)
		if len(l.lx.toks) > 0 {
			l.setHead()
			ps.parseLine(l)
		}
		// A line of stray characters only, already reported, takes no
		// part in the structure: add just keeps its messages.
		b.add(l)
	}
	switch {
	case moreTabs == 1:
		b.ds[firstTab].Note = fmt.Sprintf("1 more line is indented with a tab: line %d", nextTab)
	case moreTabs > 1:
		b.ds[firstTab].Note = fmt.Sprintf("%d more lines are indented with tabs, from line %d to line %d", moreTabs, nextTab, lastTab)
	}
}

// fillLen gives a caret span to diagnostics that have none (those from
// compiling, which knows positions but not the text): the width of the token
// at the position, or of the whole parenthesised group starting there.
func fillLen(src []byte, ds tree.Diagnostics) {
	var lines [][]byte
	for i := range ds {
		d := &ds[i]
		if d.Len != 0 || !d.Pos.IsValid() {
			continue
		}
		if lines == nil {
			lines = tree.SplitLines(src)
		}
		if int(d.Pos.Line) > len(lines) {
			continue
		}
		raw := lines[d.Pos.Line-1]
		n := 0
		for n < len(raw) && (raw[n] == ' ' || raw[n] == '\t') {
			n++
		}
		var scratch tree.Diagnostics
		lx := lexLine(string(raw[n:]), int(d.Pos.Line), n+1, &scratch)
		for j, t := range lx.toks {
			if t.Pos.Column != int(d.Pos.Col) {
				continue
			}
			d.Len = lx.width[j]
			if t.Type == tokPunct && t.Value == "(" {
				depth := 0
				for k := j; k < len(lx.toks); k++ {
					switch lx.toks[k].Value {
					case "(":
						depth++
					case ")":
						depth--
					}
					if depth == 0 {
						d.Len = lx.toks[k].Pos.Column + lx.width[k] - t.Pos.Column
						break
					}
				}
			}
			break
		}
	}
}
