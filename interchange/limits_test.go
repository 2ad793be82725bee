package interchange_test

import (
	"bytes"
	"fmt"
	"io"
	"runtime"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/tree"
)

// allocated returns the bytes allocated while f runs.
func allocated(f func()) uint64 {
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// repeat is an io.Reader of head, then body n times, then tail, made as
// it is read: a model of any size that is never held in memory. read
// counts the bytes handed out.
type repeat struct {
	head, body, tail string
	n                int
	part             string
	read             int64
}

func (r *repeat) Read(p []byte) (int, error) {
	for r.part == "" {
		switch {
		case r.head != "":
			r.part, r.head = r.head, ""
		case r.n > 0:
			r.part = r.body
			r.n--
		case r.tail != "":
			r.part, r.tail = r.tail, ""
		default:
			return 0, io.EOF
		}
	}
	k := copy(p, r.part)
	r.part = r.part[k:]
	r.read += int64(k)
	return k, nil
}

// TestReadLimits reads the reproducers of resource exhaustion: each must
// stop with the right error at its position, having allocated little
// whatever the size of the input (before the streaming reader, a 3 MB nest
// of `[` overflowed the goroutine stack and a 167 MB model ran out of
// memory before the node limit was looked at).
func TestReadLimits(t *testing.T) {
	const n = 3_000_000
	cases := []struct {
		name string
		src  []byte
		opts interchange.Options
		want string
		pos  tree.Pos
		max  uint64 // bytes the reading may allocate
	}{
		{
			name: "deep nest of [ at the top",
			src:  bytes.Repeat([]byte("["), n),
			want: "the model must be a JSON object, not an array", pos: tree.Pos{Line: 1, Col: 1},
			max: 64 << 10,
		},
		{
			name: "deep nest of [ in a value",
			src:  []byte(`{"root": {"type": "end", "best": ` + strings.Repeat("[", n)),
			want: fmt.Sprintf("the JSON nests arrays and objects more than %d deep", interchange.MaxNesting),
			// The model and the root node are two levels; the nest goes
			// past the limit at its (MaxNesting-1)th bracket.
			pos: tree.At(1, len(`{"root": {"type": "end", "best": `)+interchange.MaxNesting-1),
			max: 1 << 20,
		},
		{
			name: "deep nest of { in an unknown key",
			src:  []byte(`{"x": ` + strings.Repeat(`{"a": `, interchange.MaxNesting+10)),
			want: fmt.Sprintf("the JSON nests arrays and objects more than %d deep", interchange.MaxNesting),
			pos:  tree.At(1, len(`{"x": `)+6*(interchange.MaxNesting-1)+1),
			max:  1 << 20,
		},
		{
			name: "long flat array of branches past the node limit",
			src:  []byte(`{"root": {"type": "decision", "label": "d", "branches": [` + strings.Repeat(`{"label": "x"},`, 100_000) + `{"label": "y"}]}}`),
			opts: interchange.Options{NodeLimit: 1_000},
			want: "the tree has more than 1,000 nodes",
			// The root and 999 branches fill the limit: the 1,000th
			// branch goes past it.
			pos: tree.At(1, len(`{"root": {"type": "decision", "label": "d", "branches": [`)+15*999+1),
			max: 1 << 20,
		},
		{
			name: "long flat array of mistakes",
			src:  []byte(`{"root": {"type": "decision", "label": "d", "branches": [` + strings.Repeat(`7,`, 100_000) + `7]}}`),
			want: fmt.Sprintf("more than %d errors; reading stopped here", interchange.MaxErrors),
			pos:  tree.At(1, len(`{"root": {"type": "decision", "label": "d", "branches": [`)+2*interchange.MaxErrors+1),
			max:  1 << 20,
		},
		{
			name: "long key",
			src:  []byte(`{"` + strings.Repeat("k", 10_000_000) + `": 1, "root": {"type": "end"}}`),
			want: `unknown key "kkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkkk…" in the model`, pos: tree.Pos{Line: 1, Col: 2},
			max: 64 << 10,
		},
		{
			name: "long number",
			src:  []byte(`{"root": {"type": "end", "value": 1` + strings.Repeat("0", 10_000_000) + `}}`),
			want: "the number 100000000000000000000000000000000000000… has 10,000,001 digits; a number may have at most 100",
			pos:  tree.Pos{Line: 1, Col: 35},
			max:  64 << 10,
		},
		{
			name: "long calculation",
			src:  []byte(`{"root": {"type": "decision", "branches": [{"label": "a", "gain": "` + strings.Repeat("1+", 2_000_000) + `1"}]}}`),
			want: "the calculation is too long: more than 10000 parts",
			pos:  tree.At(1, len(`{"root": {"type": "decision", "branches": [{"label": "a", "gain": `)+2+10_000),
			// The calculation is kept as text while it is read (with room
			// for twice its length), copied once for the expression
			// reader, whose tokens stop at the limit: about four times
			// its length, however long.
			max: 4 * 4_000_001,
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var ds tree.Diagnostics
			n := allocated(func() { _, ds = interchange.ReadBytes(c.src, c.opts) })
			last := ds[len(ds)-1]
			if !ds.HasErrors() || last.Summary != c.want || last.Pos != c.pos {
				t.Fatalf("got %v (last at %v), want %q at %v", ds, last.Pos, c.want, c.pos)
			}
			t.Logf("allocated %d bytes reading %d", n, len(c.src))
			if n > c.max {
				t.Fatalf("allocated %d bytes reading %d; at most %d expected", n, len(c.src), c.max)
			}
		})
	}
}

// TestReadSkipsInBoundedMemory reads a model with 20 MB of values it does
// not keep (an unknown key, the "best" of solved output): they are checked
// and skipped without being held.
func TestReadSkipsInBoundedMemory(t *testing.T) {
	src := []byte(`{"x": [` + strings.Repeat(`"some text", 12.5, {"k": [true, null]}, `, 500_000) + `0],
	  "root": {"type": "decision", "label": "d", "best": ["` + strings.Repeat("y", 1_000_000) + `"], "branches": [{"label": "a"}]}}`)
	var ds tree.Diagnostics
	var m *tree.Model
	n := allocated(func() { m, ds = interchange.ReadBytes(src, interchange.Options{}) })
	if len(ds) != 1 || ds[0].Error() != `1:2: unknown key "x" in the model` || m == nil || len(m.Root.Branches) != 1 {
		t.Fatalf("got %v", ds)
	}
	if n > 256<<10 {
		t.Fatalf("allocated %d bytes reading %d", n, len(src))
	}
}

// TestReadStreamStopsAtTheLimit reads a model of 167 MB, made as it is
// read, with a node limit of 1,000: reading stops at the limit, having
// read a small part of the stream and allocated in proportion to the
// thousand nodes it built.
func TestReadStreamStopsAtTheLimit(t *testing.T) {
	branch := `{"label": "an option with a longer label", "gain": 1250.5, "cost": "fee * 2", "node": {"type": "end"}},` + "\n"
	r := &repeat{
		head: `{"inputs": [{"name": "fee", "value": 3}], "root": {"type": "decision", "label": "d", "branches": [` + "\n",
		body: branch,
		n:    167_000_000 / len(branch),
		tail: `{"label": "last"}]}}`,
	}
	var ds tree.Diagnostics
	n := allocated(func() { _, ds = interchange.Read(r, interchange.Options{NodeLimit: 1_000}) })
	if !ds.HasErrors() || ds[0].Summary != "the tree has more than 1,000 nodes" || ds[0].Pos != (tree.Pos{Line: 1001, Col: 1}) {
		t.Fatalf("got %v", ds)
	}
	if r.read > 1<<20 {
		t.Fatalf("read %d bytes of the stream before stopping", r.read)
	}
	// A thousand branches, each with its label, two figures and a
	// calculation: well under 2 KB a node, and nothing like the stream.
	if n > 2<<20 {
		t.Fatalf("allocated %d bytes for 1,000 nodes", n)
	}
}

// TestReadMemoryFollowsTheModel reads models of 5,000 and 50,000 nodes
// from streams and checks that what reading allocates grows with the model
// (about tenfold), at a bounded cost a node.
func TestReadMemoryFollowsTheModel(t *testing.T) {
	branch := `{"label": "option", "gain": 1250.5, "cost": "fee * 2"},` + "\n"
	per := map[int]uint64{}
	for _, size := range []int{5_000, 50_000} {
		r := &repeat{
			head: `{"inputs": [{"name": "fee", "value": 3}], "root": {"type": "decision", "label": "d", "branches": [` + "\n",
			body: branch, n: size - 1, tail: `{"label": "last"}]}}`,
		}
		var ds tree.Diagnostics
		n := allocated(func() { _, ds = interchange.Read(r, interchange.Options{}) })
		if ds.HasErrors() {
			t.Fatal(ds)
		}
		per[size] = n / uint64(size)
	}
	if per[50_000] > 2*per[5_000]+64 || per[50_000] > 2048 {
		t.Fatalf("bytes allocated a node: %d at 5,000 nodes, %d at 50,000", per[5_000], per[50_000])
	}
}
