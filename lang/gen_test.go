package lang

import (
	"fmt"
	"strings"
)

// genModel writes a model with a uniform tree: depth levels of nodes, each
// with width branches, alternating decision and chance nodes. It has
// (width^(depth+1)-1)/(width-1) nodes counting the ends.
func genModel(width, depth int) []byte {
	var b strings.Builder
	b.WriteString("title \"Generated\"\nlet price = 10\n")
	var node func(level int, indent string)
	node = func(level int, indent string) {
		if level%2 == 0 {
			fmt.Fprintf(&b, "%sdecision \"D%d\"\n", indent, level)
		} else {
			fmt.Fprintf(&b, "%schance \"C%d\"\n", indent, level)
		}
		for i := 0; i < width; i++ {
			fmt.Fprintf(&b, "%s  \"B%d\"", indent, i)
			if level%2 == 1 {
				if i == width-1 {
					b.WriteString("  rest")
				} else {
					fmt.Fprintf(&b, "  %d%%", 100/width)
				}
			}
			fmt.Fprintf(&b, "  gain %d_000 cost price\n", i+1)
			if level+1 < depth {
				node(level+1, indent+"    ")
			}
		}
	}
	node(0, "")
	return []byte(b.String())
}
