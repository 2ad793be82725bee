package lang

import (
	"bytes"
	"fmt"
	"io"

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

// lineReader places the lines of a file in the tree one at a time: a line
// is read by the fast path (fast.go) when it can be, by lexLine and
// participle otherwise. Nothing of a line is kept once it is placed but
// what goes into the model, so a file can be read from a stream. Tabs in
// the indentation are reported here; everything else about a line's
// content is reported by the lexer, the parser and the builder.
type lineReader struct {
	b   *builder
	ps  *parsers
	fl  fastLine
	num int // the number of the last line read
	// A file indented with tabs has them on most lines: the first is
	// reported, and the others counted in a note on it.
	firstTab                   int // its index in b.ds, -1 before it
	moreTabs, nextTab, lastTab int
}

func (b *builder) lineReader() *lineReader {
	return &lineReader{b: b, ps: getParsers(), firstTab: -1}
}

// read splits src into lines and places each in the tree.
func (b *builder) read(src []byte) {
	src = bytes.TrimPrefix(src, []byte("\ufeff"))
	lr := b.lineReader()
	// A line ends at LF, CRLF or a lone CR, as tree.SplitLines has it. nl
	// is the offset of the next LF at or after pos (-1: none left), kept
	// across lines so that a file of lone CRs is read in linear time.
	pos, nl := 0, -2
	for pos < len(src) || lr.num == 0 {
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
		lr.line(raw)
	}
	lr.end()
}

// readFrom reads the lines of r, as read does those of a file held whole,
// through a buffer of size bytes that holds a few lines at a time (it
// grows to hold the longest line). It returns the first error reading r.
func (b *builder) readFrom(r io.Reader, size int) error {
	lr := b.lineReader()
	buf := make([]byte, 0, max(size, 1))
	start, eof := 0, false // buf[start:] is not read yet
	bom := true            // the start of the file is yet to be looked at
	// A line ends at LF, CRLF or a lone CR. nl is the offset in buf of the
	// next LF at or after start (buf has been searched for LFs up to
	// lfDone), or -1 when buf[start:lfDone] has none; buf[start:crDone]
	// is known to have no CR. Both are
	// kept across lines and refills, so that each byte is searched once
	// however the file's lines end and however the reads split it.
	nl, lfDone, crDone := -1, 0, 0
	for {
		if bom && (len(buf)-start >= 3 || eof) {
			bom = false
			if bytes.HasPrefix(buf[start:], []byte("\ufeff")) {
				start += 3
				lfDone, crDone = start, start
			}
		}
		if !bom {
			if nl < start && lfDone < len(buf) {
				from := max(start, lfDone)
				lfDone = len(buf)
				if nl = bytes.IndexByte(buf[from:], '\n'); nl >= 0 {
					nl += from
					lfDone = nl + 1
				}
			}
			end := len(buf)
			if nl >= start {
				end = nl
			}
			k := -1
			if from := max(start, crDone); from < end {
				if k = bytes.IndexByte(buf[from:end], '\r'); k >= 0 {
					k += from
				}
			}
			switch {
			case k < 0 && nl >= start:
				k = nl
			case k < 0:
				crDone = end
			}
			// A CR at the end of what is buffered waits for the next
			// byte (an LF may follow), unless there is none.
			if k >= 0 && (buf[k] == '\n' || k+1 < len(buf) || eof) {
				next := k + 1
				if buf[k] == '\r' && next < len(buf) && buf[next] == '\n' {
					next++
				}
				lr.line(buf[start:k])
				start, crDone = next, next
				if b.stopped {
					lr.end()
					return nil // the rest of the file is not read
				}
				continue
			}
		}
		if eof {
			if start < len(buf) || lr.num == 0 {
				lr.line(buf[start:])
			}
			lr.end()
			return nil
		}
		// Keep what is left of the last line at the front, and fill the
		// rest of the buffer (twice as large when the line fills it).
		n := copy(buf[:cap(buf)], buf[start:])
		lfDone, crDone = max(lfDone-start, 0), max(crDone-start, 0)
		buf, start, nl = buf[:n], 0, -1
		if n == cap(buf) {
			buf = append(buf, make([]byte, cap(buf))...)[:n]
		}
		m, err := r.Read(buf[n:cap(buf)])
		buf = buf[:n+m]
		switch {
		case err == io.EOF:
			eof = true
		case err != nil:
			return err
		}
	}
}

// line places one line of the file (without its line end).
func (lr *lineReader) line(raw []byte) {
	b := lr.b
	if b.stopped {
		return
	}
	lr.num++
	num := lr.num
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
		return
	}
	if tabAt < 0 && !b.noFast && b.fast(&lr.fl, content, num, n) {
		if b.trace {
			b.fastRead = append(b.fastRead, num)
		}
		return
	}
	l := &srcLine{lineHead: lineHead{num: num, indent: n, tab: tabAt >= 0}}
	switch {
	case l.tab && lr.firstTab < 0:
		l.diags.Add(tree.At(num, tabAt+1),
			"indent with spaces only (two per level is usual); most editors can be set to insert spaces for the Tab key",
			"tab character in the indentation")
		l.diags[len(l.diags)-1].Len = 1
		lr.firstTab = len(b.ds) // add puts the line's diagnostics first
	case l.tab:
		lr.moreTabs++
		if lr.nextTab == 0 {
			lr.nextTab = num
		}
		lr.lastTab = num
	}
	l.lx = lexLine(string(content), num, n+1, &l.diags)
	if len(l.lx.toks) > 0 {
		l.setHead()
		lr.ps.parseLine(l)
	}
	// A line of stray characters only, already reported, takes no part
	// in the structure: add just keeps its messages.
	b.add(l)
}

// end notes, on the first line indented with a tab, the others.
func (lr *lineReader) end() {
	switch {
	case lr.moreTabs == 1:
		lr.b.ds[lr.firstTab].Note = fmt.Sprintf("1 more line is indented with a tab: line %d", lr.nextTab)
	case lr.moreTabs > 1:
		lr.b.ds[lr.firstTab].Note = fmt.Sprintf("%d more lines are indented with tabs, from line %d to line %d", lr.moreTabs, lr.nextTab, lr.lastTab)
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
