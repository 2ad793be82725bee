package render

import (
	"fmt"
	"runtime"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/render/internal/fixtures"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// bytesAllocated is how many bytes f allocates on the heap. Unlike its
// time, that does not depend on how busy the machine is.
func bytesAllocated(f func()) uint64 {
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// A long label with no spaces is wrapped in work linear in its length: the
// bytes allocated stay a small multiple of the label's size (a wrapper
// that copies the rest of the word for every line allocates about
// length² / width bytes: 180 MB here).
func TestWrapTextLinear(t *testing.T) {
	for _, label := range []string{
		strings.Repeat("x", 64<<10),
		strings.Repeat("ü", 32<<10),
		strings.Repeat("ab ", 20<<10) + strings.Repeat("y", 40<<10),
	} {
		var lines []string
		n := bytesAllocated(func() { lines = wrapText(label, 24) })
		if n > uint64(8*len(label)) {
			t.Errorf("wrapping a label of %d bytes allocated %d bytes", len(label), n)
		}
		if got := strings.ReplaceAll(strings.Join(lines, ""), " ", ""); got != strings.ReplaceAll(label, " ", "") {
			t.Errorf("the lines do not hold the label's text")
		}
		for _, l := range lines {
			if k := len([]rune(l)); k > 24 {
				t.Fatalf("a line of %d characters", k)
			}
		}
	}
}

// tiedOptions is one decision with n options of equal value.
func tiedOptions(n int) *tree.Model {
	root := tree.Decision("Many tied options")
	for i := range n {
		root.Branches = append(root.Branches, tree.Choice(fmt.Sprintf("Option %d", i+1), tree.Gain(tree.Num(decimal.NewFromInt(5))), nil))
	}
	return &tree.Model{Title: "Ties", Currency: "EUR", Root: root}
}

// Drawing a decision with many tied options costs work linear in their
// number: four times the options, about four times the allocations (the
// square of it, sixteen times, when each option asks which of all the
// others tie with the best).
func TestDOTLinearInOptions(t *testing.T) {
	allocs := func(n int) float64 {
		sol := fixtures.Solve(t, tiedOptions(n))
		for _, o := range []Options{{}, {PolicyOnly: true}} {
			if _, err := DOT(sol, o); err != nil {
				t.Fatal(err)
			}
		}
		return testing.AllocsPerRun(1, func() {
			for _, o := range []Options{{}, {PolicyOnly: true}} {
				if _, err := DOT(sol, o); err != nil {
					t.Fatal(err)
				}
			}
		})
	}
	small, big := allocs(250), allocs(1000)
	if r := big / small; r > 6 {
		t.Errorf("4× the options took %.1f× the allocations (%.0f against %.0f)", r, big, small)
	}
}
