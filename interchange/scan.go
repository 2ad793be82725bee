package interchange

import (
	"fmt"
	"io"
	"unicode/utf8"

	"github.com/forkcast/forkcast/tree"
)

// tokKind is the kind of a JSON token.
type tokKind uint8

const (
	tEOF tokKind = iota
	tObject
	tObjectEnd
	tArray
	tArrayEnd
	tColon
	tComma
	tString
	tNumber
	tTrue
	tFalse
	tNull
	tError // a syntax error or a limit: the scanner's diag says which
)

// readChunk is how much the scanner reads from its source at a time.
const readChunk = 64 << 10

// maxKeyText is the most of a key the scanner keeps.
const maxKeyText = 64

// maxNumberText is the longest number token kept as text; a longer one is
// counted (to say how many digits it has) but not kept.
const maxNumberText = 256

// scanner splits JSON text into tokens as it reads it, keeping the line and
// column (in characters) of each. It holds one chunk of the source and the
// text of the current token, never the whole input, and never recurses: the
// nesting of arrays and objects is a counter checked against MaxNesting.
type scanner struct {
	src  io.Reader
	buf  []byte
	i    int  // next byte in buf
	done bool // src is exhausted: buf holds the rest
	rerr error

	line, col int  // position of buf[i]
	cr        bool // the last byte was a CR: a LF right after it ends no new line

	depth int

	// The current token.
	kind tokKind
	pos  tree.Pos
	text []byte // a string's value (unescaped) or a number as written
	// cols maps each character of a string's value to its column offset
	// after the opening quote, when the string has escapes (so a character
	// is not at its own column); nil otherwise.
	cols    []int32
	chars   int   // characters in a string's value
	endOff  int32 // column offset of a string's closing quote from its opening one
	digits  int   // digits in a number's mantissa, leading zeros included
	long    bool  // a number too long to keep as text
	discard bool  // do not keep the next string's value (it is skipped)
	// keyCap keeps at most maxKeyText bytes of a string read as a key (no
	// key allowed is longer), so a long key costs no memory; cut says the
	// key was longer.
	keyCap, cut bool

	diag tree.Diagnostic // set when kind is tError
}

func newScanner(r io.Reader) *scanner {
	return &scanner{src: r, line: 1, col: 1}
}

// newBytesScanner scans src in place, without copying it.
func newBytesScanner(src []byte) *scanner {
	return &scanner{buf: src, done: true, line: 1, col: 1}
}

// fill makes at least one more byte available; it reports false at the end
// of the input (or on a read error, kept in rerr).
func (s *scanner) fill() bool {
	for !s.done {
		if s.i == len(s.buf) {
			if cap(s.buf) < readChunk {
				s.buf = make([]byte, 0, readChunk)
			}
			s.buf, s.i = s.buf[:0], 0
		} else if s.i > 0 {
			// Keep the unread tail (a partly read character).
			n := copy(s.buf[:cap(s.buf)], s.buf[s.i:])
			s.buf, s.i = s.buf[:n], 0
		}
		n, err := s.src.Read(s.buf[len(s.buf):cap(s.buf)])
		s.buf = s.buf[:len(s.buf)+n]
		if err != nil {
			s.done = true
			if err != io.EOF {
				s.rerr = err
			}
		}
		if n > 0 {
			return true
		}
	}
	return s.i < len(s.buf)
}

// peekByte returns the next byte without consuming it; ok is false at the
// end of the input.
func (s *scanner) peekByte() (byte, bool) {
	if s.i == len(s.buf) && !s.fill() {
		return 0, false
	}
	return s.buf[s.i], true
}

// advance consumes one byte, counting lines and characters.
func (s *scanner) advance() {
	c := s.buf[s.i]
	s.i++
	switch {
	case c == '\n':
		if !s.cr {
			s.line++
			s.col = 1
		}
		s.cr = false
	case c == '\r':
		s.line++
		s.col = 1
		s.cr = true
	case c&0xC0 != 0x80: // the first byte of a character
		s.col++
		s.cr = false
	default:
		s.cr = false
	}
}

func (s *scanner) here() tree.Pos { return tree.At(s.line, s.col) }

// fail ends scanning with an error at pos.
func (s *scanner) fail(pos tree.Pos, hint, format string, args ...any) tokKind {
	s.kind = tError
	s.diag = tree.Diagnostic{Severity: tree.Error, Pos: pos, Summary: fmt.Sprintf(format, args...), Hint: hint}
	return tError
}

// skipBOM skips a byte-order mark at the very start: positions count from
// the character after it, as in the text language.
func (s *scanner) skipBOM() {
	const bom = "\ufeff"
	for len(s.buf)-s.i < len(bom) && !s.done {
		s.fill()
	}
	if len(s.buf)-s.i >= len(bom) && string(s.buf[s.i:s.i+len(bom)]) == bom {
		s.i += len(bom)
	}
}

// next reads the next token. After tError or tEOF it keeps returning the
// same.
func (s *scanner) next() tokKind {
	if s.kind == tError {
		return tError
	}
	keep := !s.discard
	s.discard = false
	for {
		c, ok := s.peekByte()
		if !ok {
			s.pos = s.here()
			if s.rerr != nil {
				return s.fail(s.pos, "", "reading the JSON: %v", s.rerr)
			}
			s.kind = tEOF
			return tEOF
		}
		if c == ' ' || c == '\t' || c == '\n' || c == '\r' {
			s.advance()
			continue
		}
		break
	}
	s.pos = s.here()
	c := s.buf[s.i]
	switch c {
	case '{', '[':
		s.depth++
		if s.depth > MaxNesting {
			return s.fail(s.pos, "a model nests a node, its branches and a branch for each level of the tree; nothing else nests this deep",
				"the JSON nests arrays and objects more than %d deep", MaxNesting)
		}
		s.advance()
		s.kind = tObject
		if c == '[' {
			s.kind = tArray
		}
		return s.kind
	case '}', ']':
		s.depth--
		s.advance()
		s.kind = tObjectEnd
		if c == ']' {
			s.kind = tArrayEnd
		}
		return s.kind
	case ':':
		s.advance()
		s.kind = tColon
		return tColon
	case ',':
		s.advance()
		s.kind = tComma
		return tComma
	case '"':
		return s.str(keep)
	case 't':
		return s.word("true", tTrue)
	case 'f':
		return s.word("false", tFalse)
	case 'n':
		return s.word("null", tNull)
	}
	if c == '-' || c >= '0' && c <= '9' {
		return s.number()
	}
	r, _ := s.peekRune()
	if r == utf8.RuneError {
		return s.fail(s.pos, "save the file as UTF-8 text", "invalid UTF-8 in the JSON")
	}
	return s.fail(s.pos, "", "unexpected %s in the JSON", describeRune(r))
}

// peekRune decodes the character at the current byte (reading more input
// if it is cut by the end of the chunk).
func (s *scanner) peekRune() (rune, int) {
	for !utf8.FullRune(s.buf[s.i:]) && !s.done {
		if !s.fill() {
			break
		}
	}
	return utf8.DecodeRune(s.buf[s.i:])
}

func describeRune(r rune) string {
	if r < 0x20 || r == 0x7f || r >= 0x80 && r < 0xa0 {
		return fmt.Sprintf("control character U+%04X", r)
	}
	return fmt.Sprintf("character %q", r)
}

// word reads true, false or null.
func (s *scanner) word(w string, k tokKind) tokKind {
	for j := 0; j < len(w); j++ {
		c, ok := s.peekByte()
		if !ok {
			return s.fail(s.here(), "", "the JSON ends inside %q", w)
		}
		if c != w[j] {
			return s.fail(s.pos, "JSON text is made of objects {...}, arrays [...], strings \"...\", numbers, true, false and null", "unexpected word in the JSON; expected %s", w)
		}
		s.advance()
	}
	if c, ok := s.peekByte(); ok && (c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_') {
		return s.fail(s.pos, "JSON text is made of objects {...}, arrays [...], strings \"...\", numbers, true, false and null", "unexpected word in the JSON; expected %s", w)
	}
	s.kind = k
	return k
}

// number reads a JSON number: -?(0|[1-9][0-9]*)(.[0-9]+)?([eE][+-]?[0-9]+)?,
// kept as written. digits counts the mantissa's digits.
func (s *scanner) number() tokKind {
	s.text, s.digits, s.long = s.text[:0], 0, false
	keep := func(c byte) {
		if len(s.text) < maxNumberText {
			s.text = append(s.text, c)
		} else {
			s.long = true
		}
		s.advance()
	}
	digitRun := func(count bool) int {
		n := 0
		for {
			c, ok := s.peekByte()
			if !ok || c < '0' || c > '9' {
				return n
			}
			keep(c)
			n++
			if count {
				s.digits++
			}
		}
	}
	bad := func() tokKind {
		return s.fail(s.pos, "write a JSON number such as 1250, -40 or 0.25, or a string such as \"55%\"", "malformed number in the JSON")
	}
	if c, _ := s.peekByte(); c == '-' {
		keep(c)
	}
	c, ok := s.peekByte()
	switch {
	case !ok || c < '0' || c > '9':
		return bad()
	case c == '0':
		keep(c)
		s.digits++
		if c, ok := s.peekByte(); ok && c >= '0' && c <= '9' {
			return s.fail(s.pos, "leave out the leading zero, or write the number as a string", "a JSON number cannot start with 0 followed by digits")
		}
	default:
		digitRun(true)
	}
	if c, ok := s.peekByte(); ok && c == '.' {
		keep(c)
		if digitRun(true) == 0 {
			return bad()
		}
	}
	if c, ok := s.peekByte(); ok && (c == 'e' || c == 'E') {
		keep(c)
		if c, ok := s.peekByte(); ok && (c == '+' || c == '-') {
			keep(c)
		}
		if digitRun(false) == 0 {
			return bad()
		}
	}
	if c, ok := s.peekByte(); ok && (c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c == '_' || c == '.' || c == '%') {
		return s.fail(s.pos, "write a JSON number such as 1250, -40 or 0.25, or a string such as \"55%\" or \"1_250\"", "malformed number in the JSON")
	}
	s.kind = tNumber
	return tNumber
}

// str reads a string, unescaping it into text when keep is set.
func (s *scanner) str(keep bool) tokKind {
	s.text, s.cols, s.chars, s.cut = s.text[:0], s.cols[:0], 0, false
	escaped := false
	room := func() bool {
		if s.keyCap && len(s.text) >= maxKeyText {
			s.cut = true
			return false
		}
		return keep
	}
	s.advance()     // the opening quote
	off := int32(1) // column offset of the next character from the quote
	for {
		c, ok := s.peekByte()
		if !ok {
			return s.fail(s.pos, "add the closing \"", "the JSON ends inside a string")
		}
		if plainByte(c) {
			// A run of plain ASCII characters, taken at once.
			j := s.i + 1
			for j < len(s.buf) && plainByte(s.buf[j]) {
				j++
			}
			n := j - s.i
			if keep {
				if s.keyCap {
					n = min(n, maxKeyText-len(s.text))
					s.cut = s.cut || n < j-s.i
				}
				s.text = appendGrow(s.text, s.buf[s.i:s.i+n])
				if escaped {
					for k := 0; k < n; k++ {
						s.cols = append(s.cols, off+int32(k))
					}
				}
			}
			s.col += j - s.i
			s.cr = false
			off += int32(j - s.i)
			s.chars += j - s.i
			s.i = j
			continue
		}
		switch {
		case c == '"':
			s.advance()
			s.endOff = off
			s.kind = tString
			return tString
		case c < 0x20:
			return s.fail(s.here(), "write it as an escape such as \\n or \\u001b", "%s inside a string", describeRune(rune(c)))
		case c == '\\':
			at := s.here()
			s.advance()
			e, ok := s.peekByte()
			if !ok {
				return s.fail(s.pos, "add the closing \"", "the JSON ends inside a string")
			}
			s.advance()
			var r rune
			width := int32(2)
			switch e {
			case '"', '\\', '/':
				r = rune(e)
			case 'b':
				r = '\b'
			case 'f':
				r = '\f'
			case 'n':
				r = '\n'
			case 'r':
				r = '\r'
			case 't':
				r = '\t'
			case 'u':
				var bad bool
				r, bad = s.hex4()
				width = 6
				if bad {
					return s.fail(at, "\\u is followed by four hexadecimal digits, such as \\u00e9", "malformed \\u escape in a string")
				}
				if utf8.ValidRune(r) {
					break
				}
				if r >= 0xD800 && r < 0xDC00 {
					// A high surrogate: a low one must follow.
					if c, ok := s.peekByte(); ok && c == '\\' {
						s.advance()
						if c, ok := s.peekByte(); ok && c == 'u' {
							s.advance()
							lo, bad := s.hex4()
							if !bad && lo >= 0xDC00 && lo < 0xE000 {
								r = 0x10000 + (r-0xD800)<<10 + (lo - 0xDC00)
								width = 12
								break
							}
						}
					}
				}
				return s.fail(at, "write a character outside the basic plane as a surrogate pair, such as \\ud83d\\ude00", "malformed \\u escape in a string: an unpaired surrogate")
			default:
				return s.fail(at, "the escapes are \\\" \\\\ \\/ \\b \\f \\n \\r \\t and \\uXXXX", "unknown escape \\%c in a string", e)
			}
			if room() {
				if !escaped {
					escaped = true
					for k := 0; k < s.chars; k++ {
						s.cols = append(s.cols, int32(k+1))
					}
				}
				s.cols = append(s.cols, off)
				s.text = utf8.AppendRune(s.text, r)
			}
			off += width
			s.chars++
		default:
			r, size := rune(c), 1
			if c >= 0x80 {
				r, size = s.peekRune()
				if r == utf8.RuneError && size <= 1 {
					return s.fail(s.here(), "save the file as UTF-8 text", "invalid UTF-8 in a string")
				}
			}
			if room() {
				if escaped {
					s.cols = append(s.cols, off)
				}
				s.text = append(s.text, s.buf[s.i:s.i+size]...)
			}
			for k := 0; k < size; k++ {
				s.advance()
			}
			off++
			s.chars++
		}
	}
}

// plainByte is a character of a string that stands for itself: ASCII,
// not a control character, a quote or a backslash.
func plainByte(c byte) bool { return c >= 0x20 && c < 0x80 && c != '"' && c != '\\' }

// appendGrow appends p to b, doubling b's room when it must grow, so that a
// long string costs about twice its length however it arrives.
func appendGrow(b, p []byte) []byte {
	if len(b)+len(p) > cap(b) {
		nb := make([]byte, len(b), 2*(len(b)+len(p)))
		copy(nb, b)
		b = nb
	}
	return append(b, p...)
}

// hex4 reads four hexadecimal digits.
func (s *scanner) hex4() (rune, bool) {
	var r rune
	for k := 0; k < 4; k++ {
		c, ok := s.peekByte()
		if !ok {
			return 0, true
		}
		var v byte
		switch {
		case c >= '0' && c <= '9':
			v = c - '0'
		case c >= 'a' && c <= 'f':
			v = c - 'a' + 10
		case c >= 'A' && c <= 'F':
			v = c - 'A' + 10
		default:
			return 0, true
		}
		s.advance()
		r = r<<4 | rune(v)
	}
	return r, false
}

// token is a scalar token as read: a string's value or a number's text,
// with what is needed to place each of its characters in the JSON text.
// The scanner's current token aliases its buffers; saved copies them.
type token struct {
	kind   tokKind
	pos    tree.Pos
	text   []byte
	digits int  // a number's mantissa digits
	long   bool // a number too long to keep as text
	cols   []int32
	endOff int32
}

// tok is the current token.
func (s *scanner) tok() token {
	return token{kind: s.kind, pos: s.pos, text: s.text, digits: s.digits, long: s.long, cols: s.cols, endOff: s.endOff}
}

// saved is a copy of t that outlives the next token.
func (t token) saved() token {
	t.text = append([]byte(nil), t.text...)
	if len(t.cols) > 0 {
		t.cols = append([]int32(nil), t.cols...)
	}
	return t
}

// at is the position of character k of a string's value (k past the end:
// counted on from the closing quote).
func (t token) at(k int) tree.Pos {
	start := t.pos
	switch {
	case k < 0:
		return start
	case len(t.cols) == 0:
		return tree.At(int(start.Line), int(start.Col)+1+k)
	case k < len(t.cols):
		return tree.At(int(start.Line), int(start.Col)+int(t.cols[k]))
	}
	return tree.At(int(start.Line), int(start.Col)+int(t.endOff)+k-len(t.cols))
}
