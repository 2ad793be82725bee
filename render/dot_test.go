package render

import (
	"bytes"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/render/internal/fixtures"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func TestCash(t *testing.T) {
	for _, c := range []struct {
		c    string
		obj  tree.Objective
		cur  string
		want string
	}{
		{"1400000", tree.Max, "EUR", "gain 1,400,000.00 EUR"},
		{"-520000", tree.Max, "EUR", "cost 520,000.00 EUR"},
		{"45000", tree.Min, "EUR", "cost 45,000.00 EUR"},
		{"-10", tree.Min, "JPY", "gain 10 JPY"},
		{"0.005", tree.Max, "", "gain 0.01"},
		{"0", tree.Max, "EUR", ""},
	} {
		if got := Cash(decimal.RequireFromString(c.c), c.obj, c.cur); got != c.want {
			t.Errorf("Cash(%s, %s, %q) = %q, want %q", c.c, c.obj, c.cur, got, c.want)
		}
	}
}

// A currency code from a model can hold anything: what Money prints is
// safe for a terminal (no control character, no bidirectional override).
func TestMoneyCodeIsSafe(t *testing.T) {
	for _, c := range []struct{ code, want string }{
		{"EUR", "1,234.50 EUR"},
		{"", "1,234.50"},
		{"E\x1b[2JUR", "1,234.50 E [2JUR"},
		{"\u202eRUE\x00", "1,234.50 RUE"},
		{"\x07", "1,234.50"},
		{"€ euro", "1,234.50 € euro"},
	} {
		if got := Money(decimal.RequireFromString("1234.5"), c.code); got != c.want {
			t.Errorf("Money(1234.5, %q) = %q, want %q", c.code, got, c.want)
		}
	}
}

func TestWrapText(t *testing.T) {
	for _, c := range []struct {
		in    string
		width int
		want  []string
	}{
		{"", 24, nil},
		{"short", 24, []string{"short"}},
		{"Integration with the fare back office", 24, []string{"Integration with the", "fare back office"}},
		{"abcdefghij", 4, []string{"abcd", "efgh", "ij"}},
		{"a bcdefgh i", 4, []string{"a", "bcde", "fgh", "i"}},
		{"ünï cödé", 3, []string{"ünï", "cöd", "é"}},
	} {
		if got := wrapText(c.in, c.width); fmt.Sprint(got) != fmt.Sprint(c.want) {
			t.Errorf("wrapText(%q, %d) = %q, want %q", c.in, c.width, got, c.want)
		}
	}
	if got := clean("a\nb\x00c \xff  d"); got != "a b c \uFFFD d" {
		t.Errorf("clean = %q", got)
	}
	if got := quote(`ends with \`); got != `"ends with /"` {
		t.Errorf("quote = %s", got)
	}
}

func TestDOTErrors(t *testing.T) {
	if _, err := DOT(nil, Options{}); !errors.Is(err, ErrNoTree) {
		t.Errorf("DOT(nil) = %v, want ErrNoTree", err)
	}
	if _, err := DOT(&eval.Solution{}, Options{}); !errors.Is(err, ErrNoTree) {
		t.Errorf("DOT(empty) = %v, want ErrNoTree", err)
	}
	sol := fixtures.Solve(t, fixtures.Tie())
	for _, o := range []Options{{MaxDepth: -1}, {WrapWidth: -3}} {
		if _, err := DOT(sol, o); err == nil {
			t.Errorf("DOT with %+v: no error", o)
		}
	}
	var big *TooBigError
	if _, err := DOT(sol, Options{MaxDrawn: 3}); !errors.As(err, &big) || big.Limit != 3 || big.Nodes != 6 {
		t.Errorf("DOT over MaxDrawn = %v, want a *TooBigError of 6 nodes", err)
	}
	if _, err := DOT(sol, Options{MaxDrawn: 6}); err != nil {
		t.Errorf("DOT at MaxDrawn: %v", err)
	}
}

// TestDOT checks the text Graphviz is given: every node id once, in
// pre-order, escaped labels, and the same bytes from two runs.
func TestDOT(t *testing.T) {
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			ex, _ := examples.Get(name)
			load := func() *eval.Solution {
				m, ds := lang.Load(ex.Source, lang.Options{})
				if ds.HasErrors() {
					t.Fatalf("%v", ds)
				}
				sol, err := eval.Solve(m)
				if err != nil {
					t.Fatal(err)
				}
				return sol
			}
			for _, o := range []Options{{}, {PolicyOnly: true}, {MaxDepth: 1}} {
				a, err := DOT(load(), o)
				if err != nil {
					t.Fatal(err)
				}
				b, _ := DOT(load(), o)
				if !bytes.Equal(a, b) {
					t.Errorf("%+v: two runs differ", o)
				}
				if o == (Options{}) {
					sol := load()
					for i := range sol.Nodes() {
						if n := bytes.Count(a, []byte(fmt.Sprintf("\tn%d [id=\"n%d\"", i, i))); n != 1 {
							t.Errorf("node n%d written %d times", i, n)
						}
					}
				}
			}
		})
	}
	dot, err := DOT(fixtures.Solve(t, fixtures.Odd()), Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"a &lt;b&gt; &amp; c &quot;d&quot; &#39;e&#39;", "\uFFFD utf-8", `digraph "Decision tree"`} {
		if !strings.Contains(string(dot), want) {
			t.Errorf("DOT lacks %q", want)
		}
	}
	for _, bad := range []string{"\n\t\t", "\xff", "<b>"} {
		if strings.Contains(string(dot), bad) {
			t.Errorf("DOT contains %q", bad)
		}
	}
}

func BenchmarkDOT(b *testing.B) {
	sol := fixtures.Solve(b, fixtures.Generated(1000))
	for b.Loop() {
		if _, err := DOT(sol, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
