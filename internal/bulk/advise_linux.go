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
// MADV_HUGEPAGE, rounding out to whole huge pages: the ends of the
// rounded range are the Go heap's own memory (its arenas are reserved in
// multiples of the huge page size, on huge-page boundaries), so advice on
// them only lets the neighbours' memory come in huge pages too, where it
// is not yet in use. It is advice: when the kernel refuses it (huge pages
// turned off, an old kernel) nothing changes, so the error is dropped.
func advise(p unsafe.Pointer, size uintptr) {
	beg := uintptr(p) &^ (hugePage - 1)
	end := (uintptr(p) + size + hugePage - 1) &^ (hugePage - 1)
	b := unsafe.Slice((*byte)(unsafe.Add(p, -int(uintptr(p)-beg))), end-beg)
	_ = syscall.Madvise(b, syscall.MADV_HUGEPAGE)
}
