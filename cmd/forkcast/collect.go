package main

import (
	"math"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
	"sync"
)

// Reading a model builds one structure that lives until the process ends:
// nearly every byte allocated while a large model is read and compiled is
// still in use at the end. A garbage collection in that time marks all of
// it and frees almost nothing, and the collector's default pacing runs one
// each time the heap doubles (on an 864,000-node model that was a fifth of
// the reading time; BENCHMARKS.md). So the CLI pauses the collector while
// it reads, with a memory limit as the bound should a model make garbage
// after all, and afterwards lets the heap double once more before the
// next collection, as the default pacing would have.

// pauseFloor is the least memory limit while the collector is paused: a
// model of the default node limit holds about 1 GB.
const pauseFloor = 1 << 30

// pauseTextFactor scales a file's size to the memory limit: a model holds
// 5 to 15 bytes of memory for each byte of its text.
const pauseTextFactor = 16

var gcPause struct {
	sync.Mutex
	depth   int   // pauses in progress (tests run commands at once)
	percent int   // the collector's setting to return to
	limit   int64 // the memory limit to return to
	// stretch counts the settings stretched after a pause; stretched is
	// set while the last one is in force (until the next collection).
	stretch   int
	stretched bool
}

// pauseCollection pauses garbage collection while a model of about size
// bytes of text is read (size 0: unknown) and returns the function that
// resumes it. Pauses nest; calling resume more than once is harmless.
func pauseCollection(size int64) (resume func()) {
	gcPause.Lock()
	defer gcPause.Unlock()
	if gcPause.depth == 0 {
		gcPause.limit = debug.SetMemoryLimit(-1)
		percent := debug.SetGCPercent(-1)
		if !gcPause.stretched { // else the setting to return to is kept
			gcPause.percent = percent
		}
		gcPause.stretched = false
		bound := max(pauseFloor, pauseTextFactor*size)
		if gcPause.limit < bound {
			bound = gcPause.limit // the user's own limit is lower
		}
		debug.SetMemoryLimit(bound)
	}
	gcPause.depth++
	return sync.OnceFunc(resumeCollection)
}

func resumeCollection() {
	gcPause.Lock()
	defer gcPause.Unlock()
	gcPause.depth--
	if gcPause.depth > 0 {
		return
	}
	debug.SetMemoryLimit(gcPause.limit)
	if gcPause.percent < 0 {
		debug.SetGCPercent(gcPause.percent) // collection was off before
		return
	}
	// Set back as it was, the collector would start at once on the whole
	// model, measured against the small heap it saw before reading. Instead
	// the next collection waits until the heap has grown by the usual share
	// of what it is now, and the usual setting returns when it is over.
	debug.SetGCPercent(stretchedPercent(gcPause.percent))
	gcPause.stretch++
	gcPause.stretched = true
	sentinel := new([64]byte) // too big for the tiny allocator, whose blocks are freed together
	runtime.AddCleanup(sentinel, func(stretch int) {
		gcPause.Lock()
		defer gcPause.Unlock()
		if gcPause.depth == 0 && gcPause.stretched && gcPause.stretch == stretch {
			debug.SetGCPercent(gcPause.percent)
			gcPause.stretched = false
		}
	}, gcPause.stretch)
}

// stretchedPercent is the collector setting that puts the next collection
// where percent would put it had the last collection seen today's heap:
// the goal is the heap marked last time × (1 + setting/100).
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
