package modem

import "math"

// axis is one Gray-labelled PAM axis: L levels d·(L−1−2i), i = 0 … L−1, label gray(i).
// QAM uses one for I and the same for Q; BPSK and PAM use one on the real axis.
type axis struct {
	L      int
	bits   int       // log2(L)
	d      float64   // half the spacing of adjacent levels
	levels []float64 // by position i, most positive first
	labels []uint16  // label of position i
}

func newAxis(L int, d float64) axis {
	a := axis{L: L, bits: log2(L), d: d, levels: make([]float64, L), labels: make([]uint16, L)}
	for i := range L {
		a.levels[i] = d * float64(L-1-2*i)
		a.labels[i] = uint16(gray(i))
	}
	return a
}

// label is the bits of a.bits coded bits, most significant first.
func label(b []byte) int {
	l := 0
	for _, x := range b {
		l = l<<1 | int(x&1)
	}
	return l
}

// putLabel writes the bits of l into dst, most significant first.
func putLabel(dst []byte, l int) {
	n := len(dst)
	for j := range dst {
		dst[j] = byte(l>>(n-1-j)) & 1
	}
}

// sign is 1 for a negative x and 0 otherwise, without a branch: the sign bit of x.
func sign(x float64) byte { return byte(math.Float64bits(x) >> 63) }

// decide writes the hard decision on x: the nearest level by slicing, not by search.
func (a *axis) decide(x float64, dst []byte) {
	if a.L == 2 {
		dst[0] = sign(x)
		return
	}
	t := math.Floor((float64(a.L-1)-x/a.d)*0.5 + 0.5)
	i := int(min(max(t, 0), float64(a.L-1)))
	putLabel(dst, int(a.labels[i]))
}

// llr writes the LLRs of the axis's bits for the observation x with noise density n0 per
// complex sample (variance n0/2 on this axis): exact (log-MAP) or max-log. m and e are
// scratch of length L.
//
// Exact: LLR_j = log Σ_{i: bit j = 0} e^{m_i} − log Σ_{i: bit j = 1} e^{m_i}, m_i = −(x − a_i)²/n0.
// Max-log keeps the largest term of each sum.
func (a *axis) llr(x, n0 float64, dst, m, e []float64, exact bool) {
	if a.L == 2 {
		// log(e^{−(x−d)²/n0} / e^{−(x+d)²/n0}) = 4dx/n0, exact; 2y/σ² for BPSK.
		dst[0] = 4 * a.d * x / n0
		return
	}
	inv := 1 / n0
	for i, lv := range a.levels {
		e := x - lv
		m[i] = -e * e * inv
	}
	bitLLRs(m[:a.L], e[:a.L], a.labels, a.bits, dst, exact)
}

// bitLLRs turns metrics m[i] (log-likelihoods up to a common constant) of the points with
// labels lab[i] into the k bit LLRs, exact or max-log. e is scratch as long as m.
func bitLLRs(m, e []float64, lab []uint16, k int, dst []float64, exact bool) {
	if exact {
		mx := math.Inf(-1)
		for _, v := range m {
			mx = max(mx, v)
		}
		for i, v := range m {
			e[i] = math.Exp(v - mx)
		}
	}
	for j := range k {
		sh := uint(k - 1 - j)
		m0, m1 := math.Inf(-1), math.Inf(-1)
		var s0, s1 float64
		for i, v := range m {
			if lab[i]>>sh&1 == 0 {
				m0 = max(m0, v)
				if exact {
					s0 += e[i]
				}
			} else {
				m1 = max(m1, v)
				if exact {
					s1 += e[i]
				}
			}
		}
		if exact && s0 > 0x1p-1000 && s1 > 0x1p-1000 {
			dst[j] = math.Log(s0) - math.Log(s1)
		} else {
			// Max-log, or one half (nearly) underflowed, where subnormal sums would lose their
			// precision: it then lies e^690 below the other and the exact correction (at most
			// log(M/2)) no longer matters.
			dst[j] = m0 - m1
		}
	}
}
