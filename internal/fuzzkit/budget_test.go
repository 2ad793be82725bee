package fuzzkit

import (
	"strings"
	"testing"
	"time"

	"github.com/forkcast/forkcast/compiled"
)

// TestWithin checks that the budget catches what it is there to catch.
func TestWithin(t *testing.T) {
	if got := Within(time.Second, 0, func() string { return "" }); got != "" {
		t.Errorf("quick and clean: %q", got)
	}
	if got := Within(time.Second, 0, func() string { return "wrong" }); got != "wrong" {
		t.Errorf("a problem: %q", got)
	}
	if got := Within(time.Second, 0, func() string { panic("boom") }); !strings.HasPrefix(got, "panic: boom\n") {
		t.Errorf("a panic: %q", got)
	}
	release := make(chan struct{})
	defer close(release)
	if got := Within(10*time.Millisecond, 0, func() string { <-release; return "" }); !strings.HasPrefix(got, "over the time budget") {
		t.Errorf("a stall: %q", got)
	}
	if got := Within(time.Second, 1<<10, func() string { _ = make([]byte, 1<<20); return "" }); !strings.HasPrefix(got, "allocated") {
		t.Errorf("greedy: %q", got)
	}
}

// TestModelsCompile: whatever the bytes, the models built compile.
func TestModelsCompile(t *testing.T) {
	for _, data := range [][]byte{nil, {1, 2, 3}, []byte(strings.Repeat("\xff\x01\x7f", 200)), []byte("any text at all: labels, numbers 123")} {
		if _, ds := compiled.Compile(FromBytes(data)); ds.HasErrors() {
			t.Errorf("FromBytes(%q): %v", data, ds)
		}
		if _, ds := compiled.Compile(Analysable(data)); ds.HasErrors() {
			t.Errorf("Analysable(%q): %v", data, ds)
		}
	}
}
