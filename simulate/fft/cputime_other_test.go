//go:build !linux

package fft

import "testing"

// cpuTimer is a no-op where the thread CPU clock is not read; the benchmark
// then reports wall time only.
func cpuTimer(b *testing.B) func() { return func() {} }
