package fft

import (
	"runtime"
	"syscall"
	"testing"
)

// threadCPU returns the CPU time consumed by the calling OS thread, which
// unlike wall time does not grow while other processes hold the core.
func threadCPU() int64 {
	var ru syscall.Rusage
	const rusageThread = 1 // RUSAGE_THREAD, Linux
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

// cpuTimer reports, besides the wall time of the benchmark, the thread CPU
// time per operation as "cpu-ns/op". Call the returned func after the loop.
func cpuTimer(b *testing.B) func() {
	runtime.LockOSThread()
	start := threadCPU()
	return func() {
		used := threadCPU() - start
		runtime.UnlockOSThread()
		if b.N > 0 {
			b.ReportMetric(float64(used)/float64(b.N), "cpu-ns/op")
		}
	}
}
