package compiled_test

import (
	"fmt"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// With evaluates a figure that is a·x + b of one input without running its
// program (compiled/linear.go); compiling the edited model runs the
// program. The two must give the same figure, or the same error, for
// figures of every shape: linear ones, and ones that only look it (x·x,
// x / 4, a product that overflows on the way).
func TestWithLinearFiguresAsCompiled(t *testing.T) {
	x := tree.Ref("x")
	bin := func(op byte, a, b tree.Expr) tree.Expr { return &tree.Binary{Op: op, X: a, Y: b} }
	neg := func(a tree.Expr) tree.Expr { return &tree.Unary{Op: '-', X: a} }
	exprs := []tree.Expr{
		x,
		bin('*', x, num("3")),
		bin('+', bin('*', num("3"), x), num("10")),
		bin('*', neg(bin('-', x, num("2.5"))), num("4")),
		bin('-', bin('*', num("2"), bin('*', num("3"), bin('+', x, num("0.25")))), x),
		bin('-', x, x),           // a = 0
		bin('*', x, num("1e39")), // at the bound of the table
		bin('*', bin('*', x, num("1e39")), num("1e39")),                                                            // steps past it: run as a program
		bin('-', bin('*', bin('*', x, num("1e80")), num("1e80")), bin('*', bin('*', x, num("1e80")), num("1e80"))), // too many digits on the way
		bin('*', x, x),
		bin('/', x, num("4")),
		bin('/', num("1"), x),
		bin('*', bin('+', x, num("1")), bin('-', x, num("1"))),
	}
	values := []string{"0", "1", "-7", "0.125", "123456789012345678", "1e-30", "3e35", "-2.5e-41", "1e45"}
	model := func(v tree.Expr) *tree.Model {
		var bs []*tree.Branch
		for i, e := range exprs {
			bs = append(bs, tree.Choice(fmt.Sprintf("o%d", i), tree.Gain(e), nil))
		}
		return &tree.Model{Params: []*tree.Param{tree.Input("x", v)}, Root: tree.Decision("d", bs...)}
	}
	base, ds := compiled.Compile(model(num("2")))
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	refused := 0
	for _, v := range values {
		set, err := base.Set("x", decimal.RequireFromString(v))
		if err != nil {
			t.Fatal(err)
		}
		with, errW := base.With(set)
		fresh, dsF := compiled.Compile(model(num(v)))
		if (errW != nil) != dsF.HasErrors() {
			t.Errorf("x = %s: With says %v, compiling says %v", v, errW, dsF.Errors())
			continue
		}
		if errW != nil {
			refused++
			if got, want := errW.Error(), dsF.Errors().Error(); got != want {
				t.Errorf("x = %s: With says %q, compiling %q", v, got, want)
			}
			continue
		}
		for i := range exprs {
			k := with.Child(0, i)
			if got, want := with.Cash(k), fresh.Cash(k); !got.Equal(want) {
				t.Errorf("x = %s, figure %s: With %s, compiled %s", v, exprs[i], got, want)
			}
		}
	}
	// x = 0 divides 1 by zero; x = 1e45 takes the product with 1e80 · 1e80
	// past 200 digits.
	if refused != 2 {
		t.Errorf("%d values refused, want 2", refused)
	}
}
