package interchange_test

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
	"time"

	"github.com/forkcast/forkcast/interchange"
)

// minified returns the JSON of a chain of n chance nodes on one line, the
// shape a program that writes compact JSON produces.
func minified(n int) []byte {
	var b bytes.Buffer
	b.WriteString(`{"root":`)
	for i := 0; i < n; i++ {
		b.WriteString(`{"type":"chance","label":"c","branches":[{"label":"a","probability":0.5,"cash":1},{"label":"b","probability":0.5,"node":`)
	}
	b.WriteString(`{"type":"end"}`)
	b.WriteString(strings.Repeat("}]}", n))
	b.WriteString("}")
	return b.Bytes()
}

// wide returns the JSON of a tree of alternating decision and chance
// levels, fan branches at every node, levels deep, written with one member
// per line as a person or a pretty-printer writes it.
func wide(levels, fan int) []byte {
	var b bytes.Buffer
	var node func(d int)
	node = func(d int) {
		if d == levels {
			b.WriteString(`{"type": "end", "payoff": 3}`)
			return
		}
		kind := "decision"
		if d%2 == 1 {
			kind = "chance"
		}
		fmt.Fprintf(&b, "{\n  \"type\": %q, \"label\": \"level %d\", \"branches\": [\n", kind, d)
		for i := 0; i < fan; i++ {
			if i > 0 {
				b.WriteString(",\n")
			}
			fmt.Fprintf(&b, `  {"label": "option %d", `, i)
			if d%2 == 1 {
				b.WriteString(`"probability": 0.25, `)
			}
			b.WriteString(`"gain": 1250.5, "cost": "fee", "node": `)
			node(d + 1)
			b.WriteString("}")
		}
		b.WriteString("]}")
	}
	b.WriteString(`{"title": "generated", "inputs": [{"name": "fee", "value": 12, "low": 0, "high": 100}], "root": `)
	node(0)
	b.WriteString("}")
	return b.Bytes()
}

// BenchmarkReadJSONScaling reads a 1 000- and a 10 000-node minified model in
// the same run and reports the ratio of their times: about 10 for a linear
// reader, about 100 for one that rescans the line for every position.
func BenchmarkReadJSONScaling(b *testing.B) {
	small, large := minified(1_000), minified(10_000)
	b.ResetTimer()
	var ts, tl time.Duration
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		if _, ds := interchange.ReadBytes(small, interchange.Options{}); ds.HasErrors() {
			b.Fatal(ds)
		}
		t1 := time.Now()
		if _, ds := interchange.ReadBytes(large, interchange.Options{}); ds.HasErrors() {
			b.Fatal(ds)
		}
		ts, tl = ts+t1.Sub(t0), tl+time.Since(t1)
	}
	b.ReportMetric(float64(tl)/float64(ts), "large/small")
}

// BenchmarkReadJSONWide reads a pretty-printed model of 87,381 nodes (8 levels
// of 4 branches; about 9 MB) with a calculation on every branch.
func BenchmarkReadJSONWide(b *testing.B) {
	src := wide(8, 4)
	b.SetBytes(int64(len(src)))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, ds := interchange.ReadBytes(src, interchange.Options{}); ds.HasErrors() {
			b.Fatal(ds)
		}
	}
}
