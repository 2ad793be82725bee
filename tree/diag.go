package tree

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
)

// Pos is a position in a source file: 1-based line and column (in
// characters). The zero Pos means "no position", as for a model built in Go.
// Both are 32-bit, as every node and branch of a model holds one (see At).
type Pos struct {
	Line, Col int32
}

// At makes the position of line and column. A line or column past
// math.MaxInt32, which only a source of 2 GiB or more can have, is held as
// math.MaxInt32 rather than wrapping around.
func At(line, col int) Pos { return Pos{Line: clamp32(line), Col: clamp32(col)} }

func clamp32(n int) int32 {
	return int32(min(max(n, math.MinInt32), math.MaxInt32))
}

// IsValid reports whether the position points into a source.
func (p Pos) IsValid() bool { return p.Line > 0 }

// String formats the position as line:col, or "-" when it is not valid.
func (p Pos) String() string {
	if !p.IsValid() {
		return "-"
	}
	return fmt.Sprintf("%d:%d", p.Line, p.Col)
}

// Before reports whether p comes before q in the source.
func (p Pos) Before(q Pos) bool {
	if p.Line != q.Line {
		return p.Line < q.Line
	}
	return p.Col < q.Col
}

// Severity says whether a diagnostic stops the model from being solved.
type Severity uint8

const (
	// Error: the model cannot be solved until it is fixed.
	Error Severity = iota
	// Warning: the model solves, but something in it is probably not meant.
	Warning
)

func (s Severity) String() string {
	if s == Warning {
		return "warning"
	}
	return "error"
}

// Diagnostic is one problem found in a model: where it is, what it is and,
// where one helps, what to do about it.
type Diagnostic struct {
	Severity Severity
	Pos      Pos    // where the problem starts
	Len      int    // how many characters it spans on that line (0: just Pos)
	Summary  string // what is wrong, one line, no trailing period
	Hint     string // what to do about it; may be empty
	// Note is one more line printed after the hint, for what the
	// diagnostic stands for beyond its own position (the same mistake on
	// other lines, say); may be empty.
	Note string
}

// Error formats the diagnostic as "line:col: message" (warnings say so).
func (d Diagnostic) Error() string {
	var b strings.Builder
	if d.Pos.IsValid() {
		b.WriteString(d.Pos.String())
		b.WriteString(": ")
	}
	if d.Severity == Warning {
		b.WriteString("warning: ")
	}
	b.WriteString(Printable(d.Summary))
	return b.String()
}

// Diagnostics is a list of problems. Like go/scanner's ErrorList it sorts
// by position and can stand as an error.
type Diagnostics []Diagnostic

// Add appends an error at pos.
func (ds *Diagnostics) Add(pos Pos, hint, format string, args ...any) {
	*ds = append(*ds, Diagnostic{Severity: Error, Pos: pos, Summary: fmt.Sprintf(format, args...), Hint: hint})
}

// Warn appends a warning at pos.
func (ds *Diagnostics) Warn(pos Pos, hint, format string, args ...any) {
	*ds = append(*ds, Diagnostic{Severity: Warning, Pos: pos, Summary: fmt.Sprintf(format, args...), Hint: hint})
}

// Sort orders the list by position, errors before warnings at one place,
// and drops exact repeats.
func (ds Diagnostics) Sort() Diagnostics {
	sort.SliceStable(ds, func(i, j int) bool {
		a, b := ds[i], ds[j]
		if a.Pos != b.Pos {
			return a.Pos.Before(b.Pos)
		}
		return a.Severity < b.Severity
	})
	out := ds[:0]
	for i, d := range ds {
		if i > 0 && d == ds[i-1] {
			continue
		}
		out = append(out, d)
	}
	return out
}

// Errors returns only the errors.
func (ds Diagnostics) Errors() Diagnostics { return ds.only(Error) }

// Warnings returns only the warnings.
func (ds Diagnostics) Warnings() Diagnostics { return ds.only(Warning) }

func (ds Diagnostics) only(sev Severity) Diagnostics {
	var out Diagnostics
	for _, d := range ds {
		if d.Severity == sev {
			out = append(out, d)
		}
	}
	return out
}

// HasErrors reports whether any diagnostic is an error.
func (ds Diagnostics) HasErrors() bool {
	for _, d := range ds {
		if d.Severity == Error {
			return true
		}
	}
	return false
}

// Err returns the errors as an error value, or nil when there are none.
func (ds Diagnostics) Err() error {
	if e := ds.Errors(); len(e) > 0 {
		return e
	}
	return nil
}

// Error prints the first error and how many more there are.
func (ds Diagnostics) Error() string {
	switch len(ds) {
	case 0:
		return "no problems"
	case 1:
		return ds[0].Error()
	}
	return fmt.Sprintf("%s (and %d more)", ds[0].Error(), len(ds)-1)
}

// snippetWidth is the most of a source line a diagnostic shows.
const snippetWidth = 100

// Print writes every diagnostic as "file:line:col: message", followed by
// the source line, a caret under the column and the hint, when src holds the
// model's text. src may be nil (a model read from JSON or built in Go).
//
// Everything printed that may come from the input (the file name, the
// source line, labels quoted in messages) goes through [Printable], so no
// control sequence in a model reaches the terminal that shows the message.
func (ds Diagnostics) Print(w io.Writer, file string, src []byte) {
	var lines [][]byte
	if src != nil && len(ds) > 0 {
		lines = SplitLines(src)
	}
	file = Printable(file)
	// Diagnostics come sorted by position, so several on one line (a
	// minified JSON model is one line) share its decoding.
	cached, cachedLine := []rune(nil), 0
	for _, d := range ds {
		if file != "" {
			fmt.Fprintf(w, "%s:", file)
		}
		fmt.Fprintln(w, d.Error())
		if line := int(d.Pos.Line); d.Pos.IsValid() && line <= len(lines) {
			if cachedLine != line {
				cached, cachedLine = []rune(string(lines[line-1])), line
			}
			snippet, caret := excerpt(cached, max(int(d.Pos.Col)-1, 0), min(max(d.Len, 1), snippetWidth/2))
			fmt.Fprintf(w, "    %s\n    %s\n", snippet, caret)
		}
		if d.Hint != "" {
			fmt.Fprintf(w, "    hint: %s\n", Printable(d.Hint))
		}
		if d.Note != "" {
			fmt.Fprintf(w, "    note: %s\n", Printable(d.Note))
		}
	}
}

// excerpt returns the part of line shown for a diagnostic at column col
// (0-based, in characters) spanning n characters, and the caret line under
// it. A long line (minified JSON) is cut to a window around the column,
// marked with an ellipsis at each cut. A tab shows as one space (it counts
// one column); a control character as its escape, with the caret widened
// to match.
func excerpt(line []rune, col, n int) (snippet, caret string) {
	from, to := 0, len(line)
	if len(line) > snippetWidth {
		from = max(0, min(col-snippetWidth/2, len(line)-snippetWidth))
		to = min(len(line), from+snippetWidth)
	}
	var text strings.Builder
	pad, marks := 0, 0
	if from > 0 {
		text.WriteString("…")
		pad++
	}
	for i := from; i < to; i++ {
		r := line[i]
		shown := 1
		switch {
		case r == '\t':
			text.WriteByte(' ')
		case needsEscape(r):
			e := escapeRune(r)
			text.WriteString(e)
			shown = len(e)
		default:
			text.WriteRune(r)
		}
		switch {
		case i < col:
			pad += shown
		case i < col+n:
			marks += shown
		}
	}
	if to < len(line) {
		text.WriteString("…")
	}
	// A caret past the end of the line (where something is missing).
	pad += max(col-max(to, from), 0)
	marks += max(col+n-max(to, col), 0)
	return text.String(), strings.Repeat(" ", pad) + strings.Repeat("^", max(marks, 1))
}

// SplitLines splits a model's text into lines as positions count them:
// a line ends at LF, CRLF or a lone CR, and a byte-order mark at the start
// is not part of the first line. The line ends are not included.
func SplitLines(src []byte) [][]byte {
	src = bytes.TrimPrefix(src, []byte("\ufeff"))
	out := make([][]byte, 0, bytes.Count(src, []byte("\n"))+1)
	for {
		i := bytes.IndexAny(src, "\r\n")
		if i < 0 {
			return append(out, src)
		}
		out = append(out, src[:i])
		if src[i] == '\r' && i+1 < len(src) && src[i+1] == '\n' {
			i++
		}
		src = src[i+1:]
	}
}

// Printable returns s with every control character (C0, DEL and C1, such
// as NUL, BEL and the ESC that starts a terminal control sequence) and
// every bidirectional formatting character written as a visible escape
// (\x1b, \u202e), so that text from a model cannot move the cursor, clear
// the screen, retitle the window or reorder the line it is printed on.
func Printable(s string) string {
	clean := true
	for _, r := range s {
		if needsEscape(r) {
			clean = false
			break
		}
	}
	if clean {
		return s
	}
	var b strings.Builder
	for _, r := range s {
		if needsEscape(r) {
			b.WriteString(escapeRune(r))
		} else {
			b.WriteRune(r)
		}
	}
	return b.String()
}

// needsEscape reports whether r must not reach a terminal as it is.
func needsEscape(r rune) bool {
	switch {
	case r < 0x20, r >= 0x7f && r < 0xa0:
		return true
	case r == 0x200e, r == 0x200f, r >= 0x202a && r <= 0x202e, r >= 0x2066 && r <= 0x2069:
		// Left-to-right and right-to-left marks, embeddings, overrides
		// and isolates: invisible, and they reorder what follows.
		return true
	}
	return false
}

func escapeRune(r rune) string {
	if r < 0x80 {
		return fmt.Sprintf("\\x%02x", r)
	}
	return fmt.Sprintf("\\u%04x", r)
}
