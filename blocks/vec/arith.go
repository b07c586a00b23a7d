package vec

// Fill sets every dst[i] to c.
func Fill(dst []complex128, c complex128) {
	for i := range dst {
		dst[i] = c
	}
}

// Scale is dst[i] = a·x[i].
func Scale(dst, x []complex128, a complex128) {
	check("Scale", len(dst), len(x))
	for i, v := range x {
		dst[i] = a * v
	}
}

// ScaleReal is dst[i] = a·x[i] with a real factor a (one multiplication per part instead of
// a complex product).
func ScaleReal(dst, x []complex128, a float64) {
	check("ScaleReal", len(dst), len(x))
	for i, v := range x {
		dst[i] = complex(a*real(v), a*imag(v))
	}
}

// Add is dst[i] = x[i] + y[i].
func Add(dst, x, y []complex128) {
	check("Add", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] + y[i]
	}
}

// Sub is dst[i] = x[i] − y[i].
func Sub(dst, x, y []complex128) {
	check("Sub", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] - y[i]
	}
}

// AddScaled is dst[i] = x[i] + a·y[i] (the axpy of BLAS).
func AddScaled(dst, x []complex128, a complex128, y []complex128) {
	check("AddScaled", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] + a*y[i]
	}
}

// Mul is the elementwise product dst[i] = x[i]·y[i].
func Mul(dst, x, y []complex128) {
	check("Mul", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] * y[i]
	}
}

// MulConj is dst[i] = x[i]·conj(y[i]): a signal x seen through a known gain y, phase removed
// and weighted by |y| (the matched weighting of a combiner).
func MulConj(dst, x, y []complex128) {
	check("MulConj", len(dst), len(x), len(y))
	for i := range dst {
		a, b := x[i], y[i]
		dst[i] = complex(real(a)*real(b)+imag(a)*imag(b), imag(a)*real(b)-real(a)*imag(b))
	}
}

// Div is the elementwise quotient dst[i] = x[i]/y[i] (a zero y[i] gives Inf or NaN parts, as
// Go's division does).
func Div(dst, x, y []complex128) {
	check("Div", len(dst), len(x), len(y))
	for i := range dst {
		dst[i] = x[i] / y[i]
	}
}

// Conj is dst[i] = conj(x[i]).
func Conj(dst, x []complex128) {
	check("Conj", len(dst), len(x))
	for i, v := range x {
		dst[i] = complex(real(v), -imag(v))
	}
}
