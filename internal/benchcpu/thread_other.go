//go:build !linux

package benchcpu

// threadCPU reports that no thread CPU clock is read on this platform.
func threadCPU() (int64, bool) { return 0, false }
