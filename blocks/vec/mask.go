package vec

// Greater sets mask[i] to 1 where a[i] > b[i], else 0 (a NaN compares false): with powers of
// two branches, the mask of the samples where the first is stronger.
func Greater(mask []byte, a, b []float64) {
	check("Greater", len(mask), len(a), len(b))
	for i := range mask {
		var m byte
		if a[i] > b[i] {
			m = 1
		}
		mask[i] = m
	}
}

// Above sets mask[i] to 1 where x[i] > level, else 0.
func Above(mask []byte, x []float64, level float64) {
	check("Above", len(mask), len(x))
	for i, v := range x {
		var m byte
		if v > level {
			m = 1
		}
		mask[i] = m
	}
}

// Select picks per sample: dst[i] = a[i] where mask[i] ≠ 0, else b[i] (selection
// combining, with the mask from Greater).
func Select(dst []complex128, mask []byte, a, b []complex128) {
	check("Select", len(dst), len(mask), len(a), len(b))
	for i, m := range mask {
		if m != 0 {
			dst[i] = a[i]
		} else {
			dst[i] = b[i]
		}
	}
}

// SelectFloats is Select for real values (LLRs, powers).
func SelectFloats(dst []float64, mask []byte, a, b []float64) {
	check("SelectFloats", len(dst), len(mask), len(a), len(b))
	for i, m := range mask {
		if m != 0 {
			dst[i] = a[i]
		} else {
			dst[i] = b[i]
		}
	}
}

// Count is the number of non-zero values of mask (the ones of a bit slice).
func Count(mask []byte) int {
	n := 0
	for _, m := range mask {
		if m != 0 {
			n++
		}
	}
	return n
}
