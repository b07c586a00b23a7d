package vec

// Combine is maximum-ratio combining of two branches with known gains g1, g2:
//
//	dst[i] = (conj(g1[i])·y1[i] + conj(g2[i])·y2[i]) / (|g1[i]|² + |g2[i]|²),
//
// the estimate of the sent sample s from y_b = g_b·s + n_b with equal noise on both branches
// (Brennan, "Linear diversity combining techniques", Proc. IRE 47(6), 1959): its SNR is the
// sum of the branches' SNRs. Dividing by the total gain power puts the sample back on the
// constellation's scale for a hard decision; the noise left on it has variance
// σ²/(|g1|²+|g2|²) per dimension. Where both gains are 0 the result is 0.
func Combine(dst, y1, g1, y2, g2 []complex128) {
	check("Combine", len(dst), len(y1), len(g1), len(y2), len(g2))
	for i := range dst {
		a, b, c, d := y1[i], g1[i], y2[i], g2[i]
		p := real(b)*real(b) + imag(b)*imag(b) + real(d)*real(d) + imag(d)*imag(d)
		if p == 0 {
			dst[i] = 0
			continue
		}
		re := real(a)*real(b) + imag(a)*imag(b) + real(c)*real(d) + imag(c)*imag(d)
		im := imag(a)*real(b) - real(a)*imag(b) + imag(c)*real(d) - real(c)*imag(d)
		dst[i] = complex(re/p, im/p)
	}
}

// GainPower is dst[i] = |g1[i]|² + |g2[i]|², the power gain after maximum-ratio combining of
// two branches (multiply by Es/N0 for the combined SNR of each sample).
func GainPower(dst []float64, g1, g2 []complex128) {
	check("GainPower", len(dst), len(g1), len(g2))
	for i := range dst {
		a, b := g1[i], g2[i]
		dst[i] = real(a)*real(a) + imag(a)*imag(a) + real(b)*real(b) + imag(b)*imag(b)
	}
}

// Choose is selection combining of two branches: dst[i] = y1[i]/g1[i] where |g1[i]| ≥
// |g2[i]|, else y2[i]/g2[i], the stronger branch with its gain taken out (Jakes, Microwave
// Mobile Communications, 1974, ch. 5). Where both gains are 0 the result is 0.
func Choose(dst, y1, g1, y2, g2 []complex128) {
	check("Choose", len(dst), len(y1), len(g1), len(y2), len(g2))
	for i := range dst {
		b, d := g1[i], g2[i]
		y, g := y1[i], b
		if real(d)*real(d)+imag(d)*imag(d) > real(b)*real(b)+imag(b)*imag(b) {
			y, g = y2[i], d
		}
		if g == 0 {
			dst[i] = 0
			continue
		}
		dst[i] = y / g
	}
}
