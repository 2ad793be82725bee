package tree_test

import (
	"bytes"
	"strings"
	"testing"
	"time"

	"github.com/forkcast/forkcast/tree"
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

// BenchmarkReadJSONScaling reads a 1 000- and a 10 000-node minified model in
// the same run and reports the ratio of their times: about 10 for a linear
// reader, about 100 for one that rescans the line for every position.
func BenchmarkReadJSONScaling(b *testing.B) {
	small, large := minified(1_000), minified(10_000)
	var ts, tl time.Duration
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		if _, ds := tree.ReadJSON(small, 0); ds.HasErrors() {
			b.Fatal(ds)
		}
		t1 := time.Now()
		if _, ds := tree.ReadJSON(large, 0); ds.HasErrors() {
			b.Fatal(ds)
		}
		ts, tl = ts+t1.Sub(t0), tl+time.Since(t1)
	}
	b.ReportMetric(float64(tl)/float64(ts), "large/small")
}

func TestReadJSONMinifiedPositions(t *testing.T) {
	src := minified(3)
	src = bytes.Replace(src, []byte(`"probability":0.5,"cash":1}`), []byte(`"probability":0.5,"cash":true}`), 1)
	_, ds := tree.ReadJSON(src, 0)
	if !ds.HasErrors() || ds[0].Error() != `1:88: "cash" of a branch must be a number, not true or false` {
		t.Fatalf("got %v", ds)
	}
}
