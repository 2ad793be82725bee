package main

import (
	"fmt"
	"runtime"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
)

// doublingBomb is a model of a few hundred bytes a line that expands to
// 2^(levels+2)+1 nodes: each of levels subtrees is a decision whose two
// options both use the next one, the last has two ends, and the root adds
// itself and one end.
func doublingBomb(levels int) string {
	var b strings.Builder
	for i := 0; i < levels; i++ {
		fmt.Fprintf(&b, "subtree l%d\n  decision \"L%d\"\n    \"a\"\n      use l%d\n    \"b\"\n      use l%d\n", i, i, i+1, i+1)
	}
	fmt.Fprintf(&b, "subtree l%d\n  decision \"End\"\n    \"a\"\n    \"b\"\n", levels)
	b.WriteString("decision \"Top\"\n  \"go\"\n    use l0\n  \"stop\"\n")
	return b.String()
}

// TestDefaultLimitRefusesBomb checks that a model just over the default
// node limit is refused before it is built: every command that reads it
// exits 1 with the message at the `use` that goes over, and reading it
// allocates a few megabytes, not the gigabyte its tree would take.
func TestDefaultLimitRefusesBomb(t *testing.T) {
	// 19 levels: 2^21+1 = 2,097,153 nodes, just over the default; 18
	// levels (1,048,577) would be under it.
	const levels = 19
	if n := 1<<(levels+2) + 1; n <= tree.DefaultNodeLimit || (n-1)/2+1 > tree.DefaultNodeLimit {
		t.Fatalf("a bomb of %d levels (%d nodes) is not just over the default limit of %d", levels, n, tree.DefaultNodeLimit)
	}
	src := doublingBomb(levels)
	path := writeFile(t, "bomb.fork", src)
	// The `use l0` under "Top": the name is at column 9.
	want := fmt.Sprintf("bomb.fork:%d:9: using subtree \"l0\" here takes the tree past the limit of 2,000,000 nodes", levels*6+4+3)
	for _, args := range [][]string{{"check", path}, {"solve", path}, {"solve", "--json", path}, {"solve", "--no-tree", path}} {
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		code, out, errs := forkcast(t, "", args...)
		runtime.ReadMemStats(&after)
		if code != 1 || !strings.Contains(errs, want) || !strings.Contains(errs, "--max-nodes") || out != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr:\n%s\nwant exit 1 and %q with a hint naming --max-nodes", args, code, out, errs, want)
		}
		if n := after.TotalAlloc - before.TotalAlloc; n > 32<<20 {
			t.Errorf("%v: %d MB allocated before refusing the model", args, n>>20)
		}
	}
}
