// Package benchcpu reports the CPU time of a benchmark's own thread beside
// its wall time, for the project's benchmarks on shared machines, where wall
// time grows while other processes hold the core and thread CPU time does
// not.
package benchcpu

import (
	"runtime"
	"testing"
)

// Timer locks the benchmark to its OS thread and starts the thread CPU
// clock. Call the returned func after the loop: it reports the thread CPU
// time per operation as "cpu-ns/op" (where the platform has a thread CPU
// clock; elsewhere nothing is reported) and unlocks the thread.
func Timer(b *testing.B) func() {
	runtime.LockOSThread()
	start, ok := threadCPU()
	return func() {
		end, _ := threadCPU()
		runtime.UnlockOSThread()
		if ok && b.N > 0 {
			b.ReportMetric(float64(end-start)/float64(b.N), "cpu-ns/op")
		}
	}
}
