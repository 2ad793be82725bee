// Package fuzzkit holds what the fuzz targets share: a budget that makes a
// slow or greedy input fail a fuzz run instead of stalling it, and a
// builder that turns any bytes into a small valid model.
package fuzzkit

import (
	"fmt"
	"runtime"
	"runtime/debug"
	"testing"
	"time"
)

// Within runs check under a budget of its own and returns the problem it
// reports, a panic with its stack, or which budget it went over: the time
// d (it is then left running: a goroutine cannot be stopped, but the run
// it belongs to fails) or maxBytes allocated in all (0: no limit).
func Within(d time.Duration, maxBytes uint64, check func() string) string {
	var before, after runtime.MemStats
	if maxBytes > 0 {
		runtime.ReadMemStats(&before)
	}
	done := make(chan string, 1)
	go func() {
		defer func() {
			if p := recover(); p != nil {
				done <- fmt.Sprintf("panic: %v\n%s", p, debug.Stack())
			}
		}()
		done <- check()
	}()
	timer := time.NewTimer(d)
	defer timer.Stop()
	select {
	case problem := <-done:
		if problem != "" {
			return problem
		}
	case <-timer.C:
		return fmt.Sprintf("over the time budget of %v", d)
	}
	if maxBytes > 0 {
		runtime.ReadMemStats(&after)
		if n := after.TotalAlloc - before.TotalAlloc; n > maxBytes {
			return fmt.Sprintf("allocated %d bytes, over the budget of %d", n, maxBytes)
		}
	}
	return ""
}

// Check is Within for a test: it runs f under the budget and fails t when
// f goes over it or panics.
func Check(t testing.TB, d time.Duration, maxBytes uint64, f func()) {
	t.Helper()
	if problem := Within(d, maxBytes, func() string { f(); return "" }); problem != "" {
		t.Fatal(problem)
	}
}
