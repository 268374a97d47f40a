package benchcpu

import (
	"runtime"
	"testing"
)

// A busy loop must advance the thread CPU clock by at least a good part of
// the wall time it took (Linux only; elsewhere the clock is absent).
func TestThreadCPUAdvances(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("no thread CPU clock on", runtime.GOOS)
	}
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	a, ok := threadCPU()
	if !ok {
		t.Fatal("getrusage(RUSAGE_THREAD) failed")
	}
	x := 1.0
	for i := range 50_000_000 {
		x += float64(i&7) * 1e-9
	}
	b, _ := threadCPU()
	if b-a <= 0 || x == 0 {
		t.Errorf("thread CPU time did not advance over a busy loop (%d ns)", b-a)
	}
}
