package lang

import (
	"fmt"
	"io"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/alecthomas/participle/v2/lexer"
	"github.com/forkcast/forkcast/tree"
)

// Token types of the line lexer.
const (
	tokString  lexer.TokenType = iota + 1 // "a label", kept with its quotes
	tokNumber                             // 1_250.5%, validated when lowered
	tokIdent                              // a name or a line keyword
	tokKeyword                            // a word reserved inside lines: gain cost rest if in on
	tokPunct                              // = + - * / ( ) , ..
)

// reserved are the words that cannot be names because they mark the parts
// of a line.
var reserved = map[string]bool{
	"gain": true, "cost": true, "rest": true, "if": true, "in": true, "on": true,
}

// maxNesting bounds the parentheses (and the run of minus signs) in one
// expression, so that no input can make the parser recurse deeply.
const maxNesting = 32

// maxTokens bounds the tokens on one line, which bounds the depth of an
// expression's tree (a + b + c + ... is nested on the left).
const maxTokens = 10_000

// lineDef is the participle lexer definition. The reader lexes each line
// itself (lexLine) and hands the tokens to participle; Lex is provided so the
// definition is complete and lexes its input as a single line.
type lineDef struct{}

func (lineDef) Symbols() map[string]lexer.TokenType {
	return map[string]lexer.TokenType{
		"EOF": lexer.EOF, "String": tokString, "Number": tokNumber,
		"Ident": tokIdent, "Keyword": tokKeyword, "Punct": tokPunct,
	}
}

func (lineDef) Lex(_ string, r io.Reader) (lexer.Lexer, error) {
	b, err := io.ReadAll(r)
	if err != nil {
		return nil, err
	}
	var ds tree.Diagnostics
	l := lexLine(string(b), 1, 1, &ds)
	if len(ds) > 0 {
		return nil, fmt.Errorf("%s", ds[0].Error())
	}
	return &sliceLexer{toks: l.toks}, nil
}

// sliceLexer hands out a line's tokens, then EOF forever.
type sliceLexer struct {
	toks []lexer.Token
	eof  lexer.Token
	i    int
}

func (s *sliceLexer) Next() (lexer.Token, error) {
	if s.i < len(s.toks) {
		s.i++
		return s.toks[s.i-1], nil
	}
	return s.eof, nil
}

// lexed is one line's tokens.
type lexed struct {
	toks []lexer.Token
	// width[i] is the number of characters toks[i] spans in the source.
	width []int
	// endCol is the column just after the last character before any
	// comment (where "the end of the line" is shown).
	endCol int
	// lexErr is set when the lexer reported an error: the line is still
	// parsed (the stray character skipped), but a syntax error that follows
	// from it is not reported again.
	lexErr bool
	// noParse is set when the line must not be parsed at all (nesting too
	// deep).
	noParse bool
}

// lexLine splits the content of one line (indentation removed) into tokens.
// col is the column of s[0] on line line. A comment ends the line.
func lexLine(s string, line, col int, ds *tree.Diagnostics) lexed {
	var a arena
	return a.lexLine(s, line, col, ds)
}

// arena holds the tokens of many lines in shared slabs, so that a large
// file does not cost an allocation per line for its tokens.
type arena struct {
	toks  []lexer.Token
	width []int
}

func (a *arena) lexLine(s string, line, col int, ds *tree.Diagnostics) (out lexed) {
	t0 := len(a.toks)
	defer func() {
		n := len(a.toks)
		out.toks, out.width = a.toks[t0:n:n], a.width[t0:n:n]
	}()
	pos := func(c int) lexer.Position { return lexer.Position{Line: line, Column: c} }
	errAt := func(c, n int, hint, format string, args ...any) {
		*ds = append(*ds, tree.Diagnostic{Severity: tree.Error, Pos: tree.At(line, c), Len: n,
			Summary: fmt.Sprintf(format, args...), Hint: hint})
		out.lexErr = true
	}
	tooLong := false // the line has more than maxTokens tokens: lexing stops
	emit := func(t lexer.TokenType, v string, c, w int) {
		if len(a.toks)-t0 == maxTokens {
			errAt(c, 1, "split it over several lines, for example with `let`", "the line is too long: more than %d parts", maxTokens)
			out.noParse, tooLong = true, true
		}
		a.toks = append(a.toks, lexer.Token{Type: t, Value: v, Pos: pos(c)})
		a.width = append(a.width, w)
		out.endCol = c + w
	}
	out.endCol = col
	depth, minusRun := 0, 0
	badUTF8 := false // reported once a line
	// A run of stray characters is one diagnostic; its message is written
	// once the line is read (rewriting it for every character would take
	// time quadratic in the run).
	strayEnd, strayAt := 0, 0
	type run struct{ diag, from, to int }
	var runs []run
	defer func() {
		for _, r := range runs {
			(*ds)[r.diag].Summary = fmt.Sprintf("unexpected characters %q", shorten(s[r.from:r.to]))
		}
	}()
	i := 0
	for i < len(s) && !tooLong {
		r, size := utf8.DecodeRuneInString(s[i:])
		c := col
		switch {
		case r == ' ' || r == '\t' || r == '\r':
			i += size
			col++
			continue
		case r == '#':
			return out
		case r == '"' || r == '“' || r == '”':
			// A label runs to its closing quote, on this line. \" and \\ are
			// escapes, kept as written (unquote removes them). Curly quotes
			// are reported and read as straight ones.
			j, n := i+size, 1
			end, closed, curly := len(s), false, r != '"'
			control := false // reported once a label
			for j < len(s) {
				q, qs := utf8.DecodeRuneInString(s[j:])
				if q == '\\' && j+1 < len(s) && (s[j+1] == '"' || s[j+1] == '\\') {
					j += 2
					n += 2
					continue
				}
				if q == '"' || q == '”' || (r == '“' && q == '“') {
					end, closed, curly = j, true, curly || q != '"'
					j += qs
					n++
					break
				}
				if q == utf8.RuneError && qs == 1 && !badUTF8 {
					errAt(col+n, 1, "save the file as UTF-8 text", "invalid UTF-8 in a label")
					badUTF8 = true
				}
				if unicode.IsControl(q) && !control {
					// NUL, ESC, BEL and the like: invisible, and a terminal
					// that prints the label would obey them.
					errAt(col+n, 1, controlHint(q), "%s in a label", controlName(q))
					control = true
				}
				j += qs
				n++
			}
			v := s[i:j]
			if curly || !closed {
				v = `"` + s[i+size:end] + `"`
			}
			switch {
			case !closed:
				errAt(c, n, "add the closing \" at the end of the label; a label must fit on one line",
					"unterminated label: the closing quote is missing")
			case curly:
				errAt(c, n, "use straight double quotes (\") around labels; word processors turn them into curly ones",
					"label in curly quotes")
			}
			emit(tokString, v, c, n)
			i = j
			col += n
			minusRun = 0
			continue
		case r >= '0' && r <= '9' || r == '.' && i+1 < len(s) && s[i+1] >= '0' && s[i+1] <= '9':
			j := i
			for j < len(s) {
				ch := s[j]
				if ch == '.' && j+1 < len(s) && s[j+1] == '.' {
					break
				}
				if ch >= '0' && ch <= '9' || ch >= 'a' && ch <= 'z' || ch >= 'A' && ch <= 'Z' || ch == '_' || ch == '.' || ch == '%' {
					j++
					continue
				}
				break
			}
			emit(tokNumber, s[i:j], c, j-i)
			col += j - i
			i = j
			minusRun = 0
			continue
		case r == '_' || unicode.IsLetter(r):
			j, n := i, 0
			for j < len(s) {
				q, qs := utf8.DecodeRuneInString(s[j:])
				if q != '_' && !unicode.IsLetter(q) && !unicode.IsDigit(q) {
					break
				}
				j += qs
				n++
			}
			w := s[i:j]
			t := tokIdent
			if reserved[w] {
				t = tokKeyword
			}
			emit(t, w, c, n)
			col += n
			i = j
			minusRun = 0
			continue
		}
		// Punctuation.
		switch r {
		case '.':
			if i+1 < len(s) && s[i+1] == '.' {
				emit(tokPunct, "..", c, 2)
				i += 2
				col += 2
				minusRun = 0
				continue
			}
		case '=', '+', '*', '/', ',', '%', '(', ')', '-', '−':
			if r == '−' {
				errAt(c, 1, "type the plain minus sign -", "unicode minus sign %q", r)
				r = '-'
			}
			switch r {
			case '(':
				depth++
				if depth == maxNesting+1 {
					errAt(c, 1, "split the calculation into several `let` lines", "more than %d parentheses nested in one expression", maxNesting)
					out.noParse = true
				}
			case ')':
				depth--
			}
			if r == '-' {
				minusRun++
				if minusRun == maxNesting+1 {
					errAt(c, 1, "write at most one minus sign", "more than %d minus signs in a row", maxNesting)
					out.noParse = true
				}
			} else {
				minusRun = 0
			}
			emit(tokPunct, string(r), c, 1)
			i += size
			col++
			continue
		}
		// Anything else is a stray character; report it and skip it.
		hint := "outside the quotes of a label, a line holds only words, numbers and the signs = + - * / ( ) , % .."
		switch r {
		case '$', '€', '£', '¥', '₹':
			hint = "write amounts as plain numbers; set the currency once with a `currency` line"
			if strings.HasPrefix(strings.TrimSpace(s), "currency") {
				hint = "write the currency's code, such as currency EUR, or quote the symbol: currency \"" + string(r) + "\""
			}
		case ':':
			hint = "no colon is needed: write the label, then the probability or amount"
		case '\u00a0':
			hint = "a non-breaking space crept in (often pasted from a document); retype it as a plain space"
		default:
			if unicode.IsControl(r) {
				hint = controlHint(r)
			}
		case '–', '—':
			hint = "a range is written LOW .. HIGH; a subtraction uses the plain minus sign -"
		case '‘', '’', '\'':
			hint = "labels go in straight double quotes (\")"
		case ';':
			hint = "write one thing per line; no ; is needed"
		case '[', ']', '{', '}':
			hint = "group calculations with ( and )"
		case '.':
			hint = "a decimal point goes between digits (0.5); a range is written LOW .. HIGH"
		}
		if n := len(*ds); out.lexErr && n > 0 && strayEnd == c && r != utf8.RuneError && hint == (*ds)[n-1].Hint {
			// A run of stray characters is one mistake.
			(*ds)[n-1].Len++
			if k := len(runs) - 1; k >= 0 && runs[k].diag == n-1 {
				runs[k].to = i + size
			} else {
				runs = append(runs, run{diag: n - 1, from: strayAt, to: i + size})
			}
		} else if r == utf8.RuneError && size == 1 {
			if !badUTF8 {
				errAt(c, 1, "save the file as UTF-8 text", "invalid UTF-8 in the line")
			}
			badUTF8 = true
		} else {
			errAt(c, 1, hint, "unexpected character %q", r)
			strayAt = i
		}
		i += size
		col++
		strayEnd = col
		minusRun = 0
	}
	return out
}

// controlName names a control character in a message: "the control
// character ESC (U+001B)".
func controlName(r rune) string {
	names := map[rune]string{0: "NUL", 7: "BEL", 8: "BS", 9: "TAB", 0x0b: "VT", 0x0c: "FF", 0x1b: "ESC", 0x7f: "DEL"}
	if n, ok := names[r]; ok {
		return fmt.Sprintf("the control character %s (U+%04X)", n, r)
	}
	return fmt.Sprintf("the control character U+%04X", r)
}

func controlHint(r rune) string {
	if r == '\t' {
		return "write a space instead of the tab"
	}
	return "remove it: it is invisible, and a terminal showing the text would act on it (it often comes with text copied from a terminal or another program)"
}
