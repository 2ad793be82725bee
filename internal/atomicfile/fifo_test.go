//go:build unix

package atomicfile

import (
	"io"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// TestNamedPipe writes into a FIFO in place: it is read from, not
// replaced by a regular file.
func TestNamedPipe(t *testing.T) {
	p := filepath.Join(t.TempDir(), "pipe")
	if err := syscall.Mkfifo(p, 0o600); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	got := make(chan string, 1)
	go func() {
		f, err := os.Open(p)
		if err != nil {
			got <- "open: " + err.Error()
			return
		}
		defer f.Close()
		b, _ := io.ReadAll(f)
		got <- string(b)
	}()
	if err := Write(p, []byte("through the pipe"), 0o644); err != nil {
		t.Fatal(err)
	}
	if s := <-got; s != "through the pipe" {
		t.Errorf("read %q from the pipe", s)
	}
	st, err := os.Lstat(p)
	if err != nil || st.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("the pipe was replaced: %v %v", st.Mode(), err)
	}
}
