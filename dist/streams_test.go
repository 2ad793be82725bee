package dist

import (
	"context"
	"errors"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestMix: the SplitMix64 generator seeded with 0 first returns
// 0xe220a8397b1dcdaf (the published reference output of Steele, Lea &
// Flood's SplitMix64 — recalled from memory); its output is mix(state + γ).
func TestMix(t *testing.T) {
	if got := mix(0 + golden); got != 0xe220a8397b1dcdaf {
		t.Errorf("mix(γ) = %#x, want 0xe220a8397b1dcdaf", got)
	}
}

// TestStreamDerivation checks Source against the derivation documented on
// Streams, so that a printed seed keeps reproducing its results.
func TestStreamDerivation(t *testing.T) {
	s := NewStreams(20240611)
	for _, run := range []uint64{0, 1, 2, 1 << 40} {
		h := mix(mix(20240611) ^ run)
		want := rand.NewPCG(h, mix(h+golden))
		got := s.Source(run)
		for range 5 {
			if g, w := got.Uint64(), want.Uint64(); g != w {
				t.Fatalf("run %d: %#x, want %#x", run, g, w)
			}
		}
	}
}

func TestStreams(t *testing.T) {
	s := NewStreams(42)
	draw := func(src rand.Source) []uint64 {
		out := make([]uint64, 8)
		for i := range out {
			out[i] = src.Uint64()
		}
		return out
	}
	a, b := draw(s.Source(7)), draw(s.Source(7))
	if !slices.Equal(a, b) {
		t.Error("the same seed and run gave different draws")
	}
	if slices.Equal(a, draw(s.Source(8))) || slices.Equal(a, draw(NewStreams(43).Source(7))) || slices.Equal(a, draw(s.Sub(1).Source(7))) {
		t.Error("a different run, seed or family gave the same draws")
	}
	src := rand.NewPCG(0, 0)
	src.Uint64()
	s.Reset(src, 7)
	if !slices.Equal(a, draw(src)) {
		t.Error("Reset does not restart run 7's stream")
	}
	if slices.Equal(draw(s.Sub(1).Source(0)), draw(s.Sub(2).Source(0))) {
		t.Error("two families gave the same draws")
	}
}

// fill draws three values per run with the given number of workers.
func fill(t *testing.T, runs, workers int) []float64 {
	t.Helper()
	pert, _ := NewPERT(10, 12, 20)
	norm, _ := NewNormal(0, 1)
	out := make([]float64, 3*runs)
	done, err := ForEachRun(context.Background(), NewStreams(2026), runs, workers, func(w, run int, r *rand.Rand) error {
		out[3*run] = pert.Rand(r)
		out[3*run+1] = norm.Rand(r)
		out[3*run+2] = r.Float64()
		return nil
	})
	if err != nil || done != runs {
		t.Fatalf("done %d of %d: %v", done, runs, err)
	}
	return out
}

// TestForEachRunWorkers: the result does not depend on the number of
// workers, and equals drawing run i from Source(i) in a plain loop.
func TestForEachRunWorkers(t *testing.T) {
	const runs = 10_001 // not a multiple of the block size
	one := fill(t, runs, 1)
	for _, w := range []int{2, 4, 0} {
		if !slices.Equal(one, fill(t, runs, w)) {
			t.Errorf("%d workers gave different draws from 1", w)
		}
	}
	pert, _ := NewPERT(10, 12, 20)
	src := NewStreams(2026).Source(runs - 1)
	if got := pert.Rand(rand.New(src)); got != one[3*(runs-1)] {
		t.Errorf("last run's first draw %v, want %v from its own source", one[3*(runs-1)], got)
	}
}

func TestForEachRunFailure(t *testing.T) {
	fail := errors.New("division by zero")
	for _, w := range []int{1, 2, 4} {
		ran := make([]bool, 5000)
		done, err := ForEachRun(context.Background(), NewStreams(1), 5000, w, func(_, run int, _ *rand.Rand) error {
			if run == 777 || run == 3000 {
				return fail
			}
			ran[run] = true
			return nil
		})
		if done != 777 || !errors.Is(err, fail) || err.Error() != "run 777: division by zero" {
			t.Errorf("%d workers: done %d, error %v; want 777 and run 777's error", w, done, err)
		}
		for i := range done {
			if !ran[i] {
				t.Errorf("%d workers: run %d reported done but not run", w, i)
			}
		}
	}
}

func TestForEachRunCancel(t *testing.T) {
	for _, w := range []int{1, 2, 4} {
		ctx, cancel := context.WithCancel(context.Background())
		ran := make([]bool, 100_000)
		done, err := ForEachRun(ctx, NewStreams(1), len(ran), w, func(_, run int, _ *rand.Rand) error {
			ran[run] = true
			if run == 3000 {
				cancel()
			}
			return nil
		})
		if !errors.Is(err, context.Canceled) || done == 0 || done >= len(ran) || done%runBlock != 0 {
			t.Errorf("%d workers: done %d, error %v", w, done, err)
		}
		for i := range done {
			if !ran[i] {
				t.Errorf("%d workers: run %d reported done but not run", w, i)
				break
			}
		}
		cancel()
	}
	if done, err := ForEachRun(context.Background(), NewStreams(1), 0, 2, nil); done != 0 || err != nil {
		t.Errorf("no runs: %d, %v", done, err)
	}
}
