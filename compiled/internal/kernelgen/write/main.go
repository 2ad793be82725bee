// Command write writes package compiled's rollback kernel (kernel_gen.go)
// from kernelgen's template. Run it with go generate in package compiled.
package main

import (
	"fmt"
	"os"

	"github.com/forkcast/forkcast/compiled/internal/kernelgen"
)

func main() {
	src, err := kernelgen.Source()
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	if err := os.WriteFile("kernel_gen.go", src, 0o644); err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
}
