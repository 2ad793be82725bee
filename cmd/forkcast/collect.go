package main

import (
	"math"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
	"sync"
)

// Reading a model builds one structure that lives until the process ends:
// nearly everything allocated while a large model is read and compiled is
// still in use at the end. A garbage collection in that time marks all of
// it and frees little, and the collector's default pacing runs one each
// time the heap doubles (on an 864,000-node model that was a fifth of the
// reading time; BENCHMARKS.md). So while the CLI reads a model the
// collector waits until the heap has grown elevenfold instead of twofold
// (readingPercent): garbage stays bounded by the live heap, as it always
// is, only by a larger multiple. A memory limit would bound it in bytes,
// but a model that needs more than the limit (a big tree built by `use`
// from a small file) would then be collected over and over. Afterwards
// the next collection waits until the heap has grown by the usual share
// of what it is then, and the usual setting returns once it has run.

// readingPercent is the collector's setting while a model is read.
const readingPercent = 1000

var gcRelax struct {
	sync.Mutex
	depth   int // readings in progress (tests run commands at once)
	percent int // the collector's setting to return to
	// stretch counts the settings stretched after a reading; stretched is
	// set while the last one is in force (until the next collection).
	stretch   int
	stretched bool
}

// collectRarely makes the collector run rarely while a model is read and
// returns the function that ends that. Calls nest; calling the function
// it returns more than once is harmless. Where collection is off, or set
// to run even more rarely, it changes nothing.
func collectRarely() (done func()) {
	gcRelax.Lock()
	defer gcRelax.Unlock()
	if gcRelax.depth == 0 {
		percent := debug.SetGCPercent(readingPercent)
		if !gcRelax.stretched { // else the setting to return to is kept
			gcRelax.percent = percent
		}
		gcRelax.stretched = false
		if gcRelax.percent < 0 || gcRelax.percent >= readingPercent {
			debug.SetGCPercent(gcRelax.percent)
		}
	}
	gcRelax.depth++
	return sync.OnceFunc(collectAsUsual)
}

func collectAsUsual() {
	gcRelax.Lock()
	defer gcRelax.Unlock()
	gcRelax.depth--
	if gcRelax.depth > 0 {
		return
	}
	if gcRelax.percent < 0 || gcRelax.percent >= readingPercent {
		debug.SetGCPercent(gcRelax.percent)
		return
	}
	// Set back as it was, the collector would start at once on the whole
	// model, measured against the heap it last marked, early in the
	// reading. Instead the next collection waits until the heap has grown
	// by the usual share of what it is now, and the usual setting returns
	// when it is over.
	debug.SetGCPercent(stretchedPercent(gcRelax.percent))
	gcRelax.stretch++
	gcRelax.stretched = true
	sentinel := new([64]byte) // too big for the tiny allocator, whose blocks are freed together
	runtime.AddCleanup(sentinel, func(stretch int) {
		gcRelax.Lock()
		defer gcRelax.Unlock()
		if gcRelax.depth == 0 && gcRelax.stretched && gcRelax.stretch == stretch {
			debug.SetGCPercent(gcRelax.percent)
			gcRelax.stretched = false
		}
	}, gcRelax.stretch)
}

// stretchedPercent is the collector setting that puts the next collection
// where percent would put it had the last collection seen today's heap:
// the goal is the heap marked last × (1 + setting/100).
func stretchedPercent(percent int) int {
	s := []metrics.Sample{{Name: "/gc/heap/live:bytes"}, {Name: "/memory/classes/heap/objects:bytes"}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 || s[1].Value.Kind() != metrics.KindUint64 {
		return percent
	}
	live := max(float64(s[0].Value.Uint64()), 4<<20) // 4 MiB: the first goal
	now := float64(s[1].Value.Uint64())
	p := 100 * (now*(1+float64(percent)/100)/live - 1)
	return int(min(max(p, float64(percent)), math.MaxInt32))
}
