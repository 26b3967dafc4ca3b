//go:build !unix

package fft

import "time"

// processCPU is not available on this platform; the cpu-ns/op metric is then not reported.
func processCPU() (time.Duration, bool) { return 0, false }
