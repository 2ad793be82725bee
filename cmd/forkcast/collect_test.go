package main

import (
	"runtime"
	"runtime/debug"
	"testing"
	"time"
)

// gcSetting reads the collector's percent setting by setting it back;
// only while no cleanup of collectAsUsual can be pending.
func gcSetting() int {
	p := debug.SetGCPercent(100)
	debug.SetGCPercent(p)
	return p
}

// gogc reads the collector's setting without writing it: once a reading
// has ended, the cleanup that sets it back runs on a goroutine of its
// own, and a write here could undo that.
func gogc() uint64 {
	v, _ := readMetric("/gc/gogc:percent")
	return v
}

// Not parallel: it reads the process-wide collector settings, which
// commands running at the same time would change.
func TestCollectRarelyRestores(t *testing.T) {
	defer debug.SetGCPercent(debug.SetGCPercent(100))

	// A reading that begins while an earlier one's stretched setting is
	// in force returns to the setting from before both.
	collectRarely()()
	outer := collectRarely()
	if p := gcSetting(); p != readingPercent {
		t.Fatalf("while reading the collector setting is %d, want %d", p, readingPercent)
	}
	inner := collectRarely()
	inner()
	inner() // a second call is harmless
	if p := gcSetting(); p != readingPercent {
		t.Fatalf("after the inner reading ended the setting is %d, want still %d", p, readingPercent)
	}
	keep := make([][]byte, 0, 64)
	for range 64 { // a heap that grew while reading
		keep = append(keep, make([]byte, 1<<20))
	}
	outer()
	if p := gogc(); p < 100 {
		t.Fatalf("after the reading the setting is %d, want at least 100 until the next collection", p)
	}
	runtime.GC()
	deadline := time.Now().Add(5 * time.Second)
	for gogc() != 100 {
		if time.Now().After(deadline) {
			t.Fatalf("the setting is %d after a collection, want 100 again", gogc())
		}
		runtime.GC()
		time.Sleep(10 * time.Millisecond)
	}
	runtime.KeepAlive(keep)

	// A setting of the user's that collects even more rarely, or never,
	// is left as it is.
	for _, user := range []int{-1, 5000} {
		debug.SetGCPercent(user)
		done := collectRarely()
		if p := gcSetting(); p != user {
			t.Errorf("with the user's setting %d, reading sets %d", user, p)
		}
		done()
		if p := gcSetting(); p != user {
			t.Errorf("with the user's setting %d, after reading it is %d", user, p)
		}
	}
}

// A collection already under way when a reading ends finishes with the
// stretched setting; the usual one must be back as soon as it has ended,
// not only after the collection that follows (which the stretched goal
// would put far off).
func TestCollectAsUsualAfterACollectionUnderWay(t *testing.T) {
	defer debug.SetGCPercent(debug.SetGCPercent(100))
	done := collectRarely()
	keep := make([][]byte, 0, 40)
	for range 40 {
		keep = append(keep, make([]byte, 1<<20))
	}
	collected := make(chan struct{})
	go func() {
		runtime.GC()
		close(collected)
	}()
	time.Sleep(time.Millisecond / 2)
	done()
	<-collected
	deadline := time.Now().Add(2 * time.Second)
	for gogc() != 100 {
		if time.Now().After(deadline) {
			t.Fatalf("the setting is %d after the collection under way ended, want 100 without another collection", gogc())
		}
		time.Sleep(time.Millisecond)
	}
	runtime.KeepAlive(keep)
}

func TestStretchedPercent(t *testing.T) {
	// The goal of the collector is the heap marked last × (1 + p/100)
	// (the runtime/debug.SetGCPercent documentation): a heap that has
	// grown since is given at least the usual setting, never less.
	if p := stretchedPercent(100); p < 100 {
		t.Fatalf("stretchedPercent(100) = %d, want at least 100", p)
	}
	keep := make([]byte, 256<<20)
	p := stretchedPercent(100)
	marked, _ := readMetric("/gc/heap/live:bytes")
	live := max(float64(marked), 4<<20)
	if goal := live * (1 + float64(p)/100); goal < 2*256<<20 {
		t.Fatalf("with 256 MiB more on the heap than was marked (%.0f), stretchedPercent(100) = %d puts the next collection at %.0f bytes, want at least twice the 256 MiB", live, p, goal)
	}
	runtime.KeepAlive(keep)
}
