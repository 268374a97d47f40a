package benchcpu

import "syscall"

// threadCPU returns the CPU time consumed so far by the calling OS thread
// (getrusage with RUSAGE_THREAD, Linux).
func threadCPU() (int64, bool) {
	var ru syscall.Rusage
	const rusageThread = 1 // RUSAGE_THREAD
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0, false
	}
	return ru.Utime.Nano() + ru.Stime.Nano(), true
}
