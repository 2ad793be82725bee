package bulk

import (
	"runtime"
	"slices"
	"testing"
)

// The reference for every case is the built-in make and slices.Grow (the
// Go standard library): Make, Grow and Slab must give the same values,
// lengths and capacities a program relying on those expects.

func TestMakeIsZeroedOfLength(t *testing.T) {
	for _, n := range []int{0, 1, 7, Threshold / 8, Threshold/8 + 1, 3 * Threshold / 8} {
		s := Make[int64](n)
		if len(s) != n || cap(s) < n {
			t.Fatalf("Make(%d): len %d cap %d", n, len(s), cap(s))
		}
		for i, v := range s {
			if v != 0 {
				t.Fatalf("Make(%d)[%d] = %d, want 0", n, i, v)
			}
		}
		for i := range s { // the memory is the program's to write
			s[i] = int64(i)
		}
		if n > 0 && s[n-1] != int64(n-1) {
			t.Fatalf("Make(%d): last element not written", n)
		}
	}
}

func TestGrowKeepsValuesAndMakesRoom(t *testing.T) {
	var s []int32
	var want []int32
	for i := range 3 * Threshold / 4 { // past the threshold, so Make marks
		s = Grow(s, 1)
		if cap(s)-len(s) < 1 {
			t.Fatalf("Grow left no room at %d", i)
		}
		s = append(s, int32(i))
		want = append(want, int32(i))
	}
	if !slices.Equal(s, want) {
		t.Fatal("Grow lost or changed values")
	}
	if g := Grow(s[:len(s):len(s)], 10); cap(g)-len(g) < 10 || !slices.Equal(g, want) {
		t.Fatalf("Grow(full, 10): room %d", cap(g)-len(g))
	}
}

func TestSlabCutsApartAndGrows(t *testing.T) {
	var s Slab[uint64]
	var parts [][]uint64
	total := 0
	for i := 0; total < 2*Threshold/8; i++ {
		n := i%5 + 1
		p := s.Cut(n)
		if len(p) != n || cap(p) != n {
			t.Fatalf("Cut(%d): len %d cap %d", n, len(p), cap(p))
		}
		for j := range p {
			if p[j] != 0 {
				t.Fatalf("Cut(%d) not zero", n)
			}
			p[j] = uint64(i)
		}
		parts = append(parts, p)
		total += n
	}
	// No part overlaps another: each still holds what was written to it.
	for i, p := range parts {
		for _, v := range p {
			if v != uint64(i) {
				t.Fatalf("part %d holds %d: parts overlap", i, v)
			}
		}
	}
	// An append to a part reallocates instead of writing over the next.
	a, b := s.Cut(2), s.Cut(2)
	b[0] = 7
	_ = append(a, 99)
	if b[0] != 7 {
		t.Fatal("append to a cut part wrote over the next part")
	}
	if s.Cut(0) != nil {
		t.Fatal("Cut(0) is not nil")
	}
	if p := s.New(); *p != 0 {
		t.Fatal("New is not zero")
	}
	// The chunks doubled as values were cut: a few allocations, not one
	// per part.
	if s.size < total/2 {
		t.Fatalf("chunk size %d after %d values: the chunks did not grow", s.size, total)
	}
}

func TestChunkBounds(t *testing.T) {
	cases := []struct {
		last, want int
	}{
		{0, 8}, {8, 16}, {1 << 20, 32 << 20 / 24}, {32 << 20 / 24, 32 << 20 / 24},
	}
	for _, c := range cases {
		if got := Chunk[[3]uint64](c.last); got != c.want {
			t.Errorf("Chunk(%d) = %d, want %d", c.last, got, c.want)
		}
	}
	if got := Chunk[[64 << 20]byte](0); got != 8 {
		t.Errorf("Chunk of a huge type = %d, want the least, 8", got)
	}
}

// Arrays marked for huge pages are made while the collector runs on
// another goroutine and small objects come and go around them: the advice
// reaches past the array's ends, and no pointer to those ends may exist
// when the collector looks (an earlier version made one, and the runtime
// stopped with "found bad pointer in Go heap").
func TestMakeUnderCollection(t *testing.T) {
	UseHugePages(true)
	defer UseHugePages(false)
	stop := make(chan struct{})
	done := make(chan struct{})
	go func() {
		defer close(done)
		for {
			select {
			case <-stop:
				return
			default:
				runtime.GC()
			}
		}
	}()
	var keep [][]byte
	for i := range 300 {
		s := Make[byte](Threshold + (i%7)*8192)
		s[len(s)-1] = 1
		keep = append(keep, make([]byte, 40<<10+i%50<<10))
		if len(keep) > 20 {
			keep = keep[1:]
		}
	}
	close(stop)
	<-done
}
