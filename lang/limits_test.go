package lang

import (
	"fmt"
	"io"
	"strings"
	"testing"
	"time"
)

// TestLongInputsReadQuickly reads inputs that are long in one dimension
// (a line, a word, a run of stray characters, many lines) and checks that
// each is read and printed in bounded time: before the fixes, a run of
// 100,000 stray characters took over a minute (its message was rebuilt for
// every character) and a 3,000,000-digit number 30 s. The bound is far
// above what linear work takes, so a busy machine does not fail it.
func TestLongInputsReadQuickly(t *testing.T) {
	if testing.Short() {
		t.Skip("long inputs")
	}
	tests := []struct {
		name   string
		src    string
		errors int
	}{
		{"stray run", "decision \"D\"\n  \"x\" " + strings.Repeat("@", 200_000) + "\n", 1},
		{"long label", "decision \"" + strings.Repeat("x", 1_000_000) + "\"\n  \"x\"\n", 0},
		{"long unknown name", "decision \"D\"\n  \"x\" gain " + strings.Repeat("a", 1_000_000) + "\n", 1},
		{"long sum", "let a = 1" + strings.Repeat(" + 1", 4_990) + "\ndecision \"D\"\n  \"x\" gain a\n", 0},
		// Suggestions for 4,000 unknown names against 4,000 lets of
		// similar length: the search for them has a budget.
		{"many unknown names", manyNames(4_000), 4_000},
		{"lone CR lines", strings.Repeat("# c\r", 1_000_000) + "decision \"D\"\r  \"x\"\r", 0},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			start := time.Now()
			_, ds := Load([]byte(tt.src), Options{})
			var out strings.Builder
			ds.Print(&out, "long.fork", []byte(tt.src))
			if took := time.Since(start); took > 10*time.Second {
				t.Errorf("took %v", took)
			}
			if n := len(ds.Errors()); n != tt.errors {
				t.Errorf("%d errors, want %d", n, tt.errors)
			}
			// Messages repeat at most a short piece of a long word.
			for _, d := range ds {
				if len(d.Summary)+len(d.Hint) > 1_000 {
					t.Errorf("a message of %d bytes: %.200s…", len(d.Summary)+len(d.Hint), d.Summary)
				}
			}
			io.Discard.Write([]byte(out.String()))
		})
	}
}

// manyNames writes a model with n lets and a branch that uses n other
// names, all of one length, none defined.
func manyNames(n int) string {
	var b strings.Builder
	for i := range n {
		fmt.Fprintf(&b, "let input_%05d = 1\n", i)
	}
	b.WriteString("decision \"D\"\n")
	for i := range n {
		fmt.Fprintf(&b, "  \"x%d\" gain other_%05d\n", i, i)
	}
	return b.String()
}
