package vec

import "math"

// ScaleFloats is dst[i] = a·x[i] (LLR scaling, for instance).
func ScaleFloats(dst, x []float64, a float64) {
	check("ScaleFloats", len(dst), len(x))
	for i, v := range x {
		dst[i] = a * v
	}
}

// AddFloats is dst[i] = x[i] + y[i] (summing the LLRs of two branches, for instance).
func AddFloats(dst, x, y []float64) {
	check("AddFloats", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] + y[i]
	}
}

// MulFloats is the elementwise product dst[i] = x[i]·y[i].
func MulFloats(dst, x, y []float64) {
	check("MulFloats", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] * y[i]
	}
}

// ClipFloats limits every value to [−limit, limit] (LLR saturation). A negative or NaN limit
// panics; a NaN value stays NaN.
func ClipFloats(dst, x []float64, limit float64) {
	check("ClipFloats", len(dst), len(x))
	if !(limit >= 0) {
		panic("vec.ClipFloats: limit must be ≥ 0")
	}
	for i, v := range x {
		switch {
		case v > limit:
			v = limit
		case v < -limit:
			v = -limit
		}
		dst[i] = v
	}
}

// SumFloats is Σ x[i].
func SumFloats(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v
	}
	return s
}

// NormFloats is the Euclidean norm √(Σ x[i]²).
func NormFloats(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return math.Sqrt(s)
}

// Signs sets hard decisions from LLRs (log P(0)/P(1)): bits[i] = 1 where llr[i] < 0, else 0,
// the convention of the frame's LLR and Hard.
func Signs(bits []byte, llr []float64) {
	check("Signs", len(bits), len(llr))
	for i, v := range llr {
		var b byte
		if v < 0 {
			b = 1
		}
		bits[i] = b
	}
}
