package main

import (
	"math"
	"runtime/debug"
	"runtime/metrics"
	"sync"
	"time"
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
	// set while the last one is in force (until a collection has ended).
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
		percent := gcRelax.percent // the setting to return to, while stretched
		if !gcRelax.stretched {
			percent = gcPercent()
		}
		gcRelax.percent, gcRelax.stretched = percent, false
		if percent >= 0 && percent < readingPercent {
			debug.SetGCPercent(readingPercent)
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
	// as soon as a collection has ended: the goal is then worked out again
	// from the heap that collection marked. (A collection already under
	// way counts too: its goal from the stretched setting is undone at
	// once.)
	cycles := gcCycles()
	debug.SetGCPercent(stretchedPercent(gcRelax.percent))
	gcRelax.stretch++
	gcRelax.stretched = true
	go restoreAfterCollection(gcRelax.stretch, cycles)
}

// restoreAfterCollection sets the usual collector setting back once a
// collection has ended after cycles (the count when the setting was
// stretched), unless another reading has begun or ended since.
func restoreAfterCollection(stretch int, cycles uint64) {
	for {
		time.Sleep(restorePoll)
		gcRelax.Lock()
		if gcRelax.depth > 0 || !gcRelax.stretched || gcRelax.stretch != stretch {
			gcRelax.Unlock()
			return
		}
		if gcCycles() > cycles {
			debug.SetGCPercent(gcRelax.percent)
			gcRelax.stretched = false
			gcRelax.Unlock()
			return
		}
		gcRelax.Unlock()
	}
}

// restorePoll is how often restoreAfterCollection looks for a finished
// collection: the heap can grow by little in that time.
const restorePoll = 5 * time.Millisecond

// gcCycles is the number of collections completed so far.
func gcCycles() uint64 {
	n, _ := readMetric("/gc/cycles/total:gc-cycles")
	return n
}

// gcPercent is the collector's setting, read without changing it (a
// change, even one undone at once, could let a collection start): -1 when
// collection is off.
func gcPercent() int {
	v, ok := readMetric("/gc/gogc:percent")
	switch {
	case !ok: // no such metric: read it the old way
		p := debug.SetGCPercent(100)
		debug.SetGCPercent(p)
		return p
	case v <= math.MaxInt32:
		return int(v)
	}
	return -1
}

// stretchedPercent is the collector setting that puts the next collection
// where percent would put it had the last collection seen today's heap:
// the goal is the heap marked last × (1 + setting/100).
func stretchedPercent(percent int) int {
	marked, ok1 := readMetric("/gc/heap/live:bytes")
	now, ok2 := readMetric("/memory/classes/heap/objects:bytes")
	if !ok1 || !ok2 {
		return percent
	}
	live := max(float64(marked), 4<<20) // 4 MiB: the first goal
	p := 100 * (float64(now)*(1+float64(percent)/100)/live - 1)
	return int(min(max(p, float64(percent)), math.MaxInt32))
}

// readMetric reads one of the runtime's counters; ok is false when this
// Go has no such counter.
func readMetric(name string) (v uint64, ok bool) {
	s := []metrics.Sample{{Name: name}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 {
		return 0, false
	}
	return s[0].Value.Uint64(), true
}
