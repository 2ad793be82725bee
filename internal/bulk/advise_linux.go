//go:build linux

package bulk

import (
	"syscall"
	"unsafe"
)

// hugePage is the size of a transparent huge page on the machines Go
// runs Linux on (x86-64 and arm64 with 4 KiB pages).
const hugePage = 2 << 20

// advise marks the huge pages that [p, p+size) touches with
// MADV_HUGEPAGE, rounding out to whole huge pages: an array seldom starts
// or ends on a 2 MiB boundary, and its ends in 4 KiB pages cost as much as
// the rest. The ends of the rounded range are the Go heap's memory
// (arenas are reserved in multiples of the huge page size, on such
// boundaries): the advice lets the neighbours' pages come in 2 MiB too,
// where they are not yet in use. The range goes to the system as plain
// numbers, never as a Go pointer, since its ends need not lie in any
// object. It is advice: when the kernel refuses it (huge pages turned off,
// an old kernel) nothing changes, so the error is dropped.
func advise(p unsafe.Pointer, size uintptr) {
	beg := uintptr(p) &^ (hugePage - 1)
	end := (uintptr(p) + size + hugePage - 1) &^ (hugePage - 1)
	syscall.Syscall(syscall.SYS_MADVISE, beg, end-beg, syscall.MADV_HUGEPAGE)
}
