//go:build !unix

package eval

import "time"

// cpuTime is 0 where the process's CPU time is not read: the benchmark
// then reports no CPU-time rate, only the wall-clock one.
func cpuTime() time.Duration { return 0 }
