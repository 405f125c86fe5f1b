package analysis

import (
	"os"

	"golang.org/x/sys/cpu"
)

// haveFMAKernel reports whether dot4x2FMA can run: it needs AVX2 and FMA.
// PCQC_NO_FMA_KERNEL (any value) turns it off, for comparing the two paths.
var haveFMAKernel = cpu.X86.HasAVX && cpu.X86.HasAVX2 && cpu.X86.HasFMA && os.Getenv("PCQC_NO_FMA_KERNEL") == ""

// dot4x2FMA sets s to the eight dot products of the rows at a0…a3 with the
// rows at b0 and b1, each n long; n must be a positive multiple of 4.
//
//go:noescape
func dot4x2FMA(a0, a1, a2, a3, b0, b1 *float64, n int, s *[8]float64)
