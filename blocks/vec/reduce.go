package vec

import (
	"fmt"
	"math"
)

// Sum is Σ x[i].
func Sum(x []complex128) complex128 {
	var s complex128
	for _, v := range x {
		s += v
	}
	return s
}

// Dot is the inner product Σ conj(x[i])·y[i], conjugating the first argument as gonum's
// cmplxs.Dot does: Dot(x, x) is the energy of x, Dot(s, y) correlates a received y with a
// known s. x and y must have the same length.
func Dot(x, y []complex128) complex128 {
	if len(y) != len(x) {
		panic(fmt.Sprintf("vec.Dot: x has %d values, y %d (they must be the same length)", len(x), len(y)))
	}
	var re, im float64
	for i, a := range x {
		b := y[i]
		re += real(a)*real(b) + imag(a)*imag(b)
		im += real(a)*imag(b) - imag(a)*real(b)
	}
	return complex(re, im)
}

// Energy is Σ |x[i]|², the squared Euclidean norm.
func Energy(x []complex128) float64 {
	var s float64
	for _, v := range x {
		s += real(v)*real(v) + imag(v)*imag(v)
	}
	return s
}

// Norm is the Euclidean norm √(Σ |x[i]|²). It is computed from Energy, so it overflows only
// past about 1e154 per sample (signals in a link are near 1).
func Norm(x []complex128) float64 { return math.Sqrt(Energy(x)) }

// MeanPower is Energy(x)/len(x), the average power per sample (0 for an empty x).
func MeanPower(x []complex128) float64 {
	if len(x) == 0 {
		return 0
	}
	return Energy(x) / float64(len(x))
}

// MaxAbs is max |x[i]| (0 for an empty x): the peak amplitude.
func MaxAbs(x []complex128) float64 {
	var p float64
	for _, v := range x {
		p = max(p, real(v)*real(v)+imag(v)*imag(v))
	}
	return math.Sqrt(p)
}
