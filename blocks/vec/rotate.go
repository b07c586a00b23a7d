package vec

import "math"

// Rotate turns every sample by the angle phase (radians): dst[i] = x[i]·e^{j·phase}, a fixed
// carrier phase offset (or its correction, with −phase).
func Rotate(dst, x []complex128, phase float64) {
	check("Rotate", len(dst), len(x))
	s, c := math.Sincos(phase)
	for i, v := range x {
		dst[i] = complex(c*real(v)-s*imag(v), s*real(v)+c*imag(v))
	}
}

// Ramp turns sample i by phase + i·step (radians): dst[i] = x[i]·e^{j(phase + i·step)}, a
// frequency offset of step/(2π) cycles per sample starting at phase (or its correction, with
// the signs turned).
//
// The angle of each sample is computed afresh (math.Sincos of phase + i·step), so the error
// does not grow along the frame as it would with a phasor multiplied up sample by sample.
func Ramp(dst, x []complex128, phase, step float64) {
	check("Ramp", len(dst), len(x))
	for i, v := range x {
		s, c := math.Sincos(phase + float64(i)*step)
		dst[i] = complex(c*real(v)-s*imag(v), s*real(v)+c*imag(v))
	}
}
