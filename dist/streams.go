package dist

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"
)

// Streams is the family of random streams of one simulation: run i's stream
// depends only on the seed and i. Its source is a PCG-DXSM generator
// (math/rand/v2) whose two seed words are derived from (seed, i) by the
// SplitMix64 finaliser (Steele, Lea & Flood, 2014, "Fast splittable
// pseudorandom number generators", OOPSLA):
//
//	h = mix(mix(seed) ⊕ i),  source = PCG(h, mix(h + γ))
//
// with γ = 0x9e3779b97f4a7c15. mix is a bijection, so distinct runs of one
// seed start from distinct states, and hashing keeps neighbouring runs'
// streams unrelated. Because no draw depends on which worker made it or
// when, a simulation that draws run i from Source(i) gives identical
// results whatever the number of workers. The derivation is part of the
// package's contract: a printed seed reproduces its results in later
// versions.
type Streams struct {
	seed uint64
}

// NewStreams returns the streams of the given seed.
func NewStreams(seed uint64) Streams { return Streams{seed: seed} }

// Seed returns the seed.
func (s Streams) Seed() uint64 { return s.seed }

// golden is γ, the odd constant of SplitMix64.
const golden = 0x9e3779b97f4a7c15

// mix is the SplitMix64 finaliser, a bijection on 64-bit words.
func mix(z uint64) uint64 {
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// words returns the two PCG seed words of run i.
func (s Streams) words(run uint64) (uint64, uint64) {
	h := mix(mix(s.seed) ^ run)
	return h, mix(h + golden)
}

// Source returns a new source for run i.
func (s Streams) Source(run uint64) *rand.PCG {
	return rand.NewPCG(s.words(run))
}

// Reset reseeds src in place to the start of run i's stream, so a worker
// can reuse one source for all its runs without allocating.
func (s Streams) Reset(src *rand.PCG, run uint64) {
	src.Seed(s.words(run))
}

// Sub returns an independent family of streams for another purpose within
// the same simulation (say, one for inputs and one for chance outcomes),
// derived from the seed and tag alone.
func (s Streams) Sub(tag uint64) Streams {
	return Streams{seed: mix(s.seed^golden) ^ mix(tag+golden)}
}

// runBlock is how many consecutive runs a worker takes at a time. It
// affects only scheduling, never results.
const runBlock = 256

// ForEachRun calls fn for runs 0 … runs−1, spread over workers goroutines
// (0 or less: one per available CPU). Before each call the worker's
// generator r is reset to the start of that run's stream, so what fn draws
// for run i depends only on s and i; worker (0 … workers−1) lets fn use
// per-worker scratch space. fn must write its results by run index.
//
// Workers take consecutive blocks of runs in order and check ctx between
// blocks. ForEachRun returns how many runs were done, always a prefix
// 0 … done−1: all of them, or on cancellation the runs of the blocks
// finished by then, with ctx's error; or, when fn fails, the runs before
// the first failing run with that run's error — the same error whatever the
// number of workers.
func ForEachRun(ctx context.Context, s Streams, runs, workers int, fn func(worker, run int, r *rand.Rand) error) (done int, err error) {
	if runs <= 0 {
		return 0, nil
	}
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	blocks := (runs + runBlock - 1) / runBlock
	workers = min(workers, blocks)
	var (
		next     atomic.Int64 // next block to claim
		stop     atomic.Bool
		finished = make([]bool, blocks) // each written by the one worker that took the block
		mu       sync.Mutex
		failRun  = -1
		failErr  error
		wg       sync.WaitGroup
	)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			src := rand.NewPCG(0, 0)
			r := rand.New(src)
			for !stop.Load() && ctx.Err() == nil {
				b := int(next.Add(1) - 1)
				if b >= blocks {
					return
				}
				end := min((b+1)*runBlock, runs)
				for run := b * runBlock; run < end; run++ {
					s.Reset(src, uint64(run))
					if e := fn(w, run, r); e != nil {
						mu.Lock()
						if failRun < 0 || run < failRun {
							failRun, failErr = run, e
						}
						mu.Unlock()
						stop.Store(true)
						return
					}
				}
				finished[b] = true
			}
		}()
	}
	wg.Wait()
	for done < blocks && finished[done] {
		done++
	}
	done = min(done*runBlock, runs)
	if failRun >= 0 {
		// Every block before the failing run's block was finished (workers
		// stop only between blocks), and so were the runs before it in its
		// own block.
		if done >= failRun/runBlock*runBlock {
			done = failRun
		}
		return done, fmt.Errorf("run %d: %w", failRun, failErr)
	}
	if done < runs {
		if e := ctx.Err(); e != nil {
			return done, e
		}
		return done, errors.New("simulation stopped early")
	}
	return done, nil
}
