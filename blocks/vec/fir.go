package vec

// FIR filters x by the taps h, causally and from an empty state (the frame starts the filter,
// as every block must treat frames as independent):
//
//	dst[n] = Σₖ h[k]·x[n−k],  k = 0 … len(h)−1,  x[m] = 0 for m < 0,
//
// keeping the first len(x) outputs (the tail of the convolution is dropped; a filter whose
// delay matters shifts or pads x first). dst may be x: the filter then runs from the last
// sample back, in place. An empty h gives zeros.
func FIR(dst, x, h []complex128) {
	check("FIR", len(dst), len(x))
	for n := len(x) - 1; n >= 0; n-- {
		var s complex128
		m := min(len(h), n+1)
		for k := 0; k < m; k++ {
			s += h[k] * x[n-k]
		}
		dst[n] = s
	}
}

// FIRReal filters x by real taps h, as FIR does (half the multiplications of complex taps:
// pulse shapes and averaging filters are real).
func FIRReal(dst, x []complex128, h []float64) {
	check("FIRReal", len(dst), len(x))
	for n := len(x) - 1; n >= 0; n-- {
		var re, im float64
		m := min(len(h), n+1)
		for k := 0; k < m; k++ {
			v := x[n-k]
			re += h[k] * real(v)
			im += h[k] * imag(v)
		}
		dst[n] = complex(re, im)
	}
}
