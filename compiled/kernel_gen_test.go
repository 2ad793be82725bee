package compiled

import (
	"bytes"
	"os"
	"testing"

	"github.com/forkcast/forkcast/compiled/internal/kernelgen"
)

// TestKernelGenerated: kernel_gen.go is what its template generates, so
// the kernel has one source (run go generate in package compiled after
// changing internal/kernelgen).
func TestKernelGenerated(t *testing.T) {
	want, err := kernelgen.Source()
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile("kernel_gen.go")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Fatal("kernel_gen.go is not what internal/kernelgen generates: run go generate ./compiled")
	}
}
