//go:build !amd64

package analysis

import "unsafe"

// haveFMAKernel is false off amd64: dot4x2 runs in plain Go.
var haveFMAKernel = false

// dot4x2FMA computes in plain Go off amd64 what gram_amd64.s computes
// with AVX2; it is reached only if haveFMAKernel is set.
func dot4x2FMA(a0, a1, a2, a3, b0, b1 *float64, n int, s *[8]float64) {
	*s = [8]float64{}
	dot4x2Go(unsafe.Slice(a0, n), unsafe.Slice(a1, n), unsafe.Slice(a2, n), unsafe.Slice(a3, n),
		unsafe.Slice(b0, n), unsafe.Slice(b1, n), s)
}
