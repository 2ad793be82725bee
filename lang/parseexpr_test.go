package lang_test

import (
	"runtime"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
)

func TestParseExpr(t *testing.T) {
	at := tree.Pos{Line: 3, Col: 10}
	good := []struct{ src, want string }{
		{"12 * 61_000 - discount", "((12 * 61_000) - discount)"},
		{"55%", "55%"},
		{"(base + extra) * 110%", "((base + extra) * 110%)"},
		{"--3", "--3"},
		{"f(1, x)", "f(1, x)"},
		{"  7  ", "7"},
	}
	for _, c := range good {
		x, ds := lang.ParseExpr(c.src, at)
		if len(ds) > 0 || x == nil || x.String() != c.want {
			t.Errorf("%q: got %v %v, want %s", c.src, x, ds, c.want)
		}
	}
	// Positions count from at: the name starts at column 10 + 14.
	x, _ := lang.ParseExpr("12 * 61_000 - discount", at)
	if y := x.(*tree.Binary).Y; y.Pos() != (tree.Pos{Line: 3, Col: 24}) {
		t.Errorf("discount at %v, want 3:24", y.Pos())
	}
	bad := []struct{ src, want string }{
		{"", "3:10: the calculation is empty"},
		{"1 +", "3:13: the calculation ends where a number, a name or a calculation was expected"},
		{"a b", "3:12: unexpected word b after the calculation"},
		{"x)", "3:11: unexpected `)` after the calculation"},
		{"(1", "3:12: the calculation ends where a closing `)` was expected"},
		{"rest", "3:10: `rest` cannot be part of a calculation"},
		{"1e6", "3:10: 1e6 is not a number"},
		{"1__0", "3:10: 1__0 has two _ in a row"},
		{"€5", "3:10: unexpected character '€'"},
		{"gain 5", "3:10: expected a number, a name or a calculation, found `gain`"},
	}
	for _, c := range bad {
		x, ds := lang.ParseExpr(c.src, at)
		if x != nil || len(ds) == 0 || ds[0].Error() != c.want {
			t.Errorf("%q: got %v %v, want %s", c.src, x, ds, c.want)
		}
	}
}

// TestParseExprLong reads a calculation of 4 MB: it stops at the limit on
// the parts of one line, having kept no more of it (it once went on
// lexing: 1.4 GB and 19 s).
func TestParseExprLong(t *testing.T) {
	src := strings.Repeat("1+", 2_000_000) + "1"
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	_, ds := lang.ParseExpr(src, tree.Pos{Line: 1, Col: 1})
	runtime.ReadMemStats(&after)
	if len(ds) != 1 || ds[0].Error() != "1:10001: the calculation is too long: more than 10000 parts" {
		t.Fatalf("got %v", ds)
	}
	if n := after.TotalAlloc - before.TotalAlloc; n > 16<<20 {
		t.Fatalf("allocated %d bytes", n)
	}
}

// FuzzParseExpr reads any text as a calculation: it either gives an
// expression whose text reads back as the same expression, or errors, and
// never panics.
func FuzzParseExpr(f *testing.F) {
	for _, s := range []string{"12 * 61_000 - discount", "(a + b) / 3", "-(1 - -x)", "f(1, g(2))", "55% * 1_000", "1..2", "rest"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		x, ds := lang.ParseExpr(src, tree.Pos{Line: 1, Col: 1})
		if (x == nil) != ds.HasErrors() {
			t.Fatalf("%q: expression %v with diagnostics %v", src, x, ds)
		}
		if x == nil {
			return
		}
		y, ds := lang.ParseExpr(x.String(), tree.Pos{Line: 1, Col: 1})
		if ds.HasErrors() || y.String() != x.String() {
			t.Fatalf("%q written as %q reads back as %v %v", src, x.String(), y, ds)
		}
	})
}
