//go:build !linux

package bulk

import "unsafe"

// advise does nothing where the system has no transparent huge pages to
// ask for.
func advise(unsafe.Pointer, uintptr) {}
