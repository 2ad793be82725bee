package lang

import (
	"bytes"
	"fmt"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// srcLine is one logical line: a line of the file with content other than
// spaces and a comment.
type srcLine struct {
	num    int // 1-based line number
	indent int // width of the indentation in characters (a tab counts one)
	tab    bool
	lx     lexed
	kind   lineKind
	ast    any   // the parsed production; nil if parsing failed or was skipped
	err    error // the parse error, reported in context by the builder
	diags  tree.Diagnostics
}

// first returns the line's first token.
func (l *srcLine) first() lexer.Token { return l.lx.toks[0] }

// pos returns the position of the line's first token.
func (l *srcLine) pos() tree.Pos { return tokPos(l.lx.toks[0]) }

// firstWidth is the width of the first token.
func (l *srcLine) firstWidth() int { return l.lx.width[0] }

// scan splits src into logical lines and lexes each. Tabs in the
// indentation are reported here; everything else about a line's content is
// reported by the lexer and the parser.
func scan(src []byte) []*srcLine {
	src = bytes.TrimPrefix(src, []byte("\ufeff"))
	var out []*srcLine
	a := &arena{toks: make([]lexer.Token, 0, len(src)/8+16), width: make([]int, 0, len(src)/8+16)}
	num := 0
	// A file indented with tabs has them on most lines: the first is
	// reported, and the others counted in a note on it.
	var firstTab *srcLine
	moreTabs, nextTab, lastTab := 0, 0, 0
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
		l := &srcLine{num: num, indent: n, tab: tabAt >= 0}
		switch {
		case l.tab && firstTab == nil:
			l.diags.Add(tree.At(num, tabAt+1),
				"indent with spaces only (two per level is usual); most editors can be set to insert spaces for the Tab key",
				"tab character in the indentation")
			l.diags[len(l.diags)-1].Len = 1
			firstTab = l
		case l.tab:
			moreTabs++
			if nextTab == 0 {
				nextTab = num
			}
			lastTab = num
		}
		l.lx = a.lexLine(string(content), num, n+1, &l.diags)
		if len(l.lx.toks) == 0 {
			// Only stray characters, already reported: keep the messages,
			// but the line takes no part in the structure.
			if len(l.diags) > 0 {
				out = append(out, l)
			}
			continue
		}
		out = append(out, l)
	}
	switch {
	case moreTabs == 1:
		firstTab.diags[0].Note = fmt.Sprintf("1 more line is indented with a tab: line %d", nextTab)
	case moreTabs > 1:
		firstTab.diags[0].Note = fmt.Sprintf("%d more lines are indented with tabs, from line %d to line %d", moreTabs, nextTab, lastTab)
	}
	return out
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
