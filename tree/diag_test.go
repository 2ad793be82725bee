package tree

import (
	"strings"
	"testing"
)

func TestPrintClipsLongLines(t *testing.T) {
	src := []byte(strings.Repeat("a", 500) + "XYZ" + strings.Repeat("b", 500))
	ds := Diagnostics{{Pos: Pos{Line: 1, Col: 501}, Len: 3, Summary: "here"}}
	var b strings.Builder
	ds.Print(&b, "f", src)
	lines := strings.Split(b.String(), "\n")
	if len(lines) < 3 {
		t.Fatalf("output:\n%s", b.String())
	}
	snippet, caret := lines[1], lines[2]
	if len([]rune(snippet)) > snippetWidth+8 {
		t.Errorf("snippet of %d characters, want at most about %d", len([]rune(snippet)), snippetWidth)
	}
	// The caret must stand under the XYZ it points at.
	at := strings.Index(caret, "^^^")
	if at < 0 || string([]rune(snippet)[at:at+3]) != "XYZ" {
		t.Errorf("caret misplaced:\n%s\n%s", snippet, caret)
	}
}

// TestPrintEscapesControls checks that nothing Print writes carries a
// control character from the input, and that the caret still stands under
// what it marks when escapes widen the line.
func TestPrintEscapesControls(t *testing.T) {
	src := []byte("title \"a\x1b[2Jb\" \x07 bad\r\nnext\x00 line\u009b\u202e\n")
	ds := Diagnostics{
		{Pos: Pos{Line: 1, Col: 18}, Len: 3, Summary: "unexpected \x1b[31m", Hint: "remove \x07", Note: "also \x00"},
		{Pos: Pos{Line: 2, Col: 7}, Len: 4, Summary: "here"},
	}
	var b strings.Builder
	ds.Print(&b, "evil\x1b]0;x\x07.fork", src)
	out := b.String()
	for i, r := range out {
		if r != '\n' && needsEscape(r) {
			t.Fatalf("control character %U at byte %d of:\n%s", r, i, out)
		}
	}
	lines := strings.Split(out, "\n")
	// The snippet of line 1 and the caret under "bad".
	snippet, caret := []rune(lines[1]), lines[2]
	at := strings.Index(caret, "^^^")
	if at < 0 || string(snippet[at:at+3]) != "bad" {
		t.Errorf("caret misplaced:\n%s\n%s", lines[1], caret)
	}
	// Line 2 after a CRLF: "line" marked, the escapes after it shown.
	snippet, caret = []rune(lines[6]), lines[7]
	at = strings.Index(caret, "^^^^")
	if at < 0 || string(snippet[at:at+4]) != "line" || !strings.Contains(lines[6], `\u009b\u202e`) {
		t.Errorf("second line:\n%s\n%s", lines[6], caret)
	}
}

func TestPrintable(t *testing.T) {
	tests := []struct{ in, want string }{
		{"plain text, ünïcode, €", "plain text, ünïcode, €"},
		{"\x1b[2J", `\x1b[2J`},
		{"a\x00b\x07c\x7f", `a\x00b\x07c\x7f`},
		{"\u0085\u009b", `\u0085\u009b`},
		{"left\u202eright\u2066", `left\u202eright\u2066`},
	}
	for _, tt := range tests {
		if got := Printable(tt.in); got != tt.want {
			t.Errorf("Printable(%q) = %q, want %q", tt.in, got, tt.want)
		}
	}
}

func TestSplitLines(t *testing.T) {
	tests := []struct {
		src  string
		want []string
	}{
		{"a\nb\n", []string{"a", "b", ""}},
		{"a\r\nb\r\n", []string{"a", "b", ""}},
		{"# c\ra\rb", []string{"# c", "a", "b"}},
		{"\ufeffa\r\n\rb", []string{"a", "", "b"}},
		{"", []string{""}},
	}
	for _, tt := range tests {
		var got []string
		for _, l := range SplitLines([]byte(tt.src)) {
			got = append(got, string(l))
		}
		if strings.Join(got, "|") != strings.Join(tt.want, "|") {
			t.Errorf("SplitLines(%q) = %q, want %q", tt.src, got, tt.want)
		}
	}
}
