package vec

import "math"

// Abs is dst[i] = |x[i]|, the magnitude (math.Hypot of the parts, as cmplx.Abs).
func Abs(dst []float64, x []complex128) {
	check("Abs", len(dst), len(x))
	for i, v := range x {
		dst[i] = math.Hypot(real(v), imag(v))
	}
}

// Power is dst[i] = |x[i]|² = re² + im², the instantaneous power.
func Power(dst []float64, x []complex128) {
	check("Power", len(dst), len(x))
	for i, v := range x {
		dst[i] = real(v)*real(v) + imag(v)*imag(v)
	}
}

// Phase is dst[i] = arg x[i] in (−π, π] (math.Atan2 of the parts, as cmplx.Phase).
func Phase(dst []float64, x []complex128) {
	check("Phase", len(dst), len(x))
	for i, v := range x {
		dst[i] = math.Atan2(imag(v), real(v))
	}
}

// Real is dst[i] = re x[i].
func Real(dst []float64, x []complex128) {
	check("Real", len(dst), len(x))
	for i, v := range x {
		dst[i] = real(v)
	}
}

// Imag is dst[i] = im x[i].
func Imag(dst []float64, x []complex128) {
	check("Imag", len(dst), len(x))
	for i, v := range x {
		dst[i] = imag(v)
	}
}

// Clip limits the magnitude of every sample to limit and keeps its phase (an ideal envelope
// limiter, the soft limiter of amplifier models):
//
//	dst[i] = x[i]                  if |x[i]| ≤ limit
//	dst[i] = limit · x[i]/|x[i]|   otherwise.
//
// A negative or NaN limit panics.
func Clip(dst, x []complex128, limit float64) {
	check("Clip", len(dst), len(x))
	if !(limit >= 0) {
		panic("vec.Clip: limit must be ≥ 0")
	}
	l2 := limit * limit
	for i, v := range x {
		p := real(v)*real(v) + imag(v)*imag(v)
		if p <= l2 {
			dst[i] = v
			continue
		}
		s := limit / math.Hypot(real(v), imag(v))
		dst[i] = complex(s*real(v), s*imag(v))
	}
}
