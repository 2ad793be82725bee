package graphviz

import (
	"bytes"
	"context"
	"fmt"
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"

	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/internal/fixtures"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// hostile are labels that must reach the picture as plain text: markup
// and escape characters of DOT, XML and HTML, non-ASCII text, and
// characters that must never reach a terminal or an XML document
// (terminal control sequences, NUL, C1 controls, line and paragraph
// separators, bidirectional overrides, XML's forbidden U+FFFE and U+FFFF,
// invalid UTF-8). want is the text the picture shows.
var hostile = []struct{ label, want string }{
	{`a <b> & "c" 'd' \ e`, `a <b> & "c" 'd' \ e`},
	{`ends with a backslash \`, `ends with a backslash \`},
	{"ünïcödé ✓ 日本 ‖", "ünïcödé ✓ 日本 ‖"},
	{"clear\x1b[2Jscreen", "clear [2Jscreen"},
	{"title\x1b]0;pwned\x07bell", "title ]0;pwned bell"},
	{"nul\x00byte del\x7f c1\u0085\u009b end", "nul byte del c1 end"},
	{"line\u2028para\u2029end", "line para end"},
	{"bidi \u202eevil\u202c \u2066iso\u2069", "bidi evil iso"},
	{"xml \ufffe\uffff bad", "xml bad"},
	{"bad \xff\xfe utf-8", "bad \uFFFD utf-8"}, // a run of invalid bytes is one U+FFFD
	{"]]> <![CDATA[ --> <!-- &amp; &#0;", "]]> <![CDATA[ --> <!-- &amp; &#0;"},
}

// hostileModel has every hostile label in every place a label is shown:
// the title, a decision, its options, a chance node and its outcomes.
func hostileModel() *tree.Model {
	root := tree.Decision(hostile[0].label)
	for k, h := range hostile {
		var outcomes []*tree.Branch
		outcomes = append(outcomes, tree.Outcome(h.label, tree.Num(decimal.RequireFromString("0.5")), tree.Gain(tree.Num(decimal.NewFromInt(int64(k)))), nil))
		outcomes = append(outcomes, tree.RestOutcome(fmt.Sprintf("other %d", k), tree.Gain(tree.Num(decimal.Zero)), nil))
		root.Branches = append(root.Branches, tree.Choice(h.label, tree.Gain(tree.Num(decimal.NewFromInt(-1))), tree.Chance(h.label, outcomes...)))
	}
	return &tree.Model{Title: strings.Join(func() []string {
		var ls []string
		for _, h := range hostile {
			ls = append(ls, h.label)
		}
		return ls
	}(), " | "), Currency: "EU\x1b[2JR", Root: root}
}

// unsafe reports the first character of s that must not be in a picture
// or reach a terminal: a control character other than the tab and line
// feed DOT's own layout uses, a bidirectional control, a character XML
// forbids, or invalid UTF-8.
func unsafe(s string) (rune, bool) {
	if !utf8.ValidString(s) {
		return utf8.RuneError, true
	}
	for _, r := range s {
		switch {
		case r == '\t' || r == '\n':
		case unicode.IsControl(r), r == 0xFFFE, r == 0xFFFF, r == '\u2028', r == '\u2029',
			r >= '\u202a' && r <= '\u202e', r >= '\u2066' && r <= '\u2069':
			return r, true
		}
	}
	return 0, false
}

func TestHostileLabels(t *testing.T) {
	sol := fixtures.Solve(t, hostileModel())
	for _, o := range []Options{{}, {PolicyOnly: true}, {WrapWidth: 200}} {
		dot, err := render.DOT(sol, o)
		if err != nil {
			t.Fatal(err)
		}
		if r, bad := unsafe(string(dot)); bad {
			t.Errorf("%+v: the DOT holds %U", o, r)
		}
		var buf bytes.Buffer
		if err := renderer(t).Render(context.Background(), dot, SVG, &buf); err != nil {
			t.Fatal(err)
		}
		if r, bad := unsafe(buf.String()); bad {
			t.Errorf("%+v: the SVG holds %U", o, r)
		}
		groups := parseSVG(t, buf.Bytes()) // fails unless well-formed XML
		if o.WrapWidth != 200 {
			continue
		}
		// Unwrapped, every label is one text line: the chance node under
		// option k shows the label as its title.
		for k, h := range hostile {
			kid := sol.Root.Kids()[k]
			hasText(t, groups[fmt.Sprintf("n%d", kid.Index())], h.want)
		}
	}
}
