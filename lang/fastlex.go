package lang

import (
	"unicode"
	"unicode/utf8"

	"github.com/alecthomas/participle/v2/lexer"
)

// The fast lexer. Most lines of a large model are plain ASCII words,
// numbers, quoted labels and a few signs; this lexer reads those straight
// from the file's bytes into compact tokens (offsets, no strings), so that
// a line costs no allocation. It gives up (ok false) on anything it does
// not read exactly as lexLine does: a character lexLine would report, an
// escape or a curly quote in a label, a word with letters outside ASCII, a
// long line, deep parentheses. The line then goes to lexLine and
// participle, which report what is wrong. It never reports anything
// itself.

// ftok is a token of the fast lexer: its type (as lexLine's), where it is
// in the line's content, and its column and width in characters.
type ftok struct {
	typ      lexer.TokenType
	from, to int32 // content[from:to] is the token as written (a label with its quotes)
	col      int32
	width    int32
}

// fastMaxTokens bounds the tokens of a line the fast lexer reads; longer
// lines are rare, and lexLine reads them. It keeps every count on the fast
// path small.
const fastMaxTokens = 64

// fastMaxDepth bounds the parentheses nested in a line on the fast path,
// far below maxNesting.
const fastMaxDepth = 8

// fastLex splits the content of a line (indentation removed) whose first
// character is at column col into toks, reusing its storage. It returns
// the tokens, the column just past the last one (lexLine's endCol) and
// whether it read the whole line.
func fastLex(s []byte, col int, toks []ftok) ([]ftok, int, bool) {
	toks = toks[:0]
	endCol := col
	depth := 0
	prevMinus := false
	i := 0
	for i < len(s) {
		ch := s[i]
		start, c := i, col
		typ := lexer.TokenType(0)
		switch {
		case ch == ' ' || ch == '\t' || ch == '\r':
			i++
			col++
			continue
		case ch == '#':
			return toks, endCol, true
		case ch == '"':
			// A label: to the closing quote, no escapes, no control
			// characters, no curly quotes, valid UTF-8.
			j, n := i+1, 1
			closed := false
			for j < len(s) {
				q := s[j]
				if q == '"' {
					j++
					n++
					closed = true
					break
				}
				if q == '\\' || q < 0x20 || q == 0x7f {
					return toks, 0, false
				}
				if q < utf8.RuneSelf {
					j++
					n++
					continue
				}
				r, size := utf8.DecodeRune(s[j:])
				if r == utf8.RuneError || r == '“' || r == '”' || unicode.IsControl(r) {
					return toks, 0, false
				}
				j += size
				n++
			}
			if !closed {
				return toks, 0, false
			}
			typ, i, col = tokString, j, col+n
		case ch >= '0' && ch <= '9' || ch == '.' && i+1 < len(s) && s[i+1] >= '0' && s[i+1] <= '9':
			// As lexLine: letters, digits, _ . and % run on, up to a "..";
			// whether they make a number is seen when it is read.
			j := i
			for j < len(s) {
				q := s[j]
				if q == '.' && j+1 < len(s) && s[j+1] == '.' {
					break
				}
				if q >= '0' && q <= '9' || q >= 'a' && q <= 'z' || q >= 'A' && q <= 'Z' || q == '_' || q == '.' || q == '%' {
					j++
					continue
				}
				break
			}
			typ, col, i = tokNumber, col+j-i, j
		case ch == '_' || ch >= 'a' && ch <= 'z' || ch >= 'A' && ch <= 'Z':
			j := i
			for j < len(s) {
				q := s[j]
				if q == '_' || q >= 'a' && q <= 'z' || q >= 'A' && q <= 'Z' || q >= '0' && q <= '9' {
					j++
					continue
				}
				if q >= utf8.RuneSelf {
					return toks, 0, false // a word that goes on past ASCII
				}
				break
			}
			typ, col, i = tokIdent, col+j-i, j
			if isReserved(s[start:i]) {
				typ = tokKeyword
			}
		case ch == '.' && i+1 < len(s) && s[i+1] == '.':
			typ, i, col = tokPunct, i+2, col+2
		case ch == '(':
			depth++
			if depth > fastMaxDepth {
				return toks, 0, false
			}
			typ, i, col = tokPunct, i+1, col+1
		case ch == ')':
			depth--
			typ, i, col = tokPunct, i+1, col+1
		case ch == '-':
			if prevMinus {
				return toks, 0, false // a run of minus signs: lexLine bounds it
			}
			typ, i, col = tokPunct, i+1, col+1
		case ch == '=' || ch == '+' || ch == '*' || ch == '/' || ch == ',' || ch == '%':
			typ, i, col = tokPunct, i+1, col+1
		default:
			return toks, 0, false
		}
		if len(toks) == fastMaxTokens {
			return toks, 0, false
		}
		prevMinus = ch == '-'
		toks = append(toks, ftok{typ: typ, from: int32(start), to: int32(i), col: int32(c), width: int32(col - c)})
		endCol = col
	}
	return toks, endCol, true
}

// isReserved is reserved[string(w)] without making a string.
func isReserved(w []byte) bool {
	switch string(w) {
	case "gain", "cost", "rest", "if", "in", "on":
		return true
	}
	return false
}
