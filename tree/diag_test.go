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
