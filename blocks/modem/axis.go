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
	// cuts are the exact decision boundaries between adjacent positions (see boundary), by bit
	// of the label: for bit j, most significant first, the 2^j boundaries k·L/2^(j+1) for odd k.
	cuts []float64
}

func newAxis(L int, d float64) axis {
	a := axis{L: L, bits: log2(L), d: d, levels: make([]float64, L), labels: make([]uint16, L)}
	for i := range L {
		a.levels[i] = d * float64(L-1-2*i)
		a.labels[i] = uint16(gray(i))
	}
	if L > 2 && d > 0 {
		for j := range a.bits {
			s := L >> (j + 1)
			for k := 1; k < 2<<j; k += 2 {
				a.cuts = append(a.cuts, a.boundary(k*s))
			}
		}
	}
	return a
}

// sliceIndex is the position of the level nearest x by slicing, x/d rounded (ties to the more
// negative level) and clamped: the definition of the hard decision, which decide reproduces
// by comparisons with the boundaries of sliceIndex.
func (a *axis) sliceIndex(x float64) int {
	t := math.Floor((float64(a.L-1)-x/a.d)*0.5 + 0.5)
	return int(min(max(t, 0), float64(a.L-1)))
}

// boundary is the largest float64 x with sliceIndex(x) ≥ j, found by bisection on the ordered
// float64 values between levels j and j−1 (sliceIndex does not increase with x).
func (a *axis) boundary(j int) float64 {
	lo, hi := ordered(a.levels[j]), ordered(a.levels[j-1]) // sliceIndex ≥ j at lo, < j at hi
	if a.sliceIndex(fromOrdered(lo)) < j || a.sliceIndex(fromOrdered(hi)) >= j {
		panic("modem: slicing boundary not between adjacent levels")
	}
	for uint64(hi-lo) > 1 { // the difference may not fit an int64, but fits a uint64
		mid := lo + int64(uint64(hi-lo)/2)
		if a.sliceIndex(fromOrdered(mid)) >= j {
			lo = mid
		} else {
			hi = mid
		}
	}
	return fromOrdered(lo)
}

// ordered maps float64 values (not NaN) to integers of the same order, ±0 to 0.
func ordered(x float64) int64 {
	b := int64(math.Float64bits(x))
	if b < 0 {
		b = math.MinInt64 - b
	}
	return b
}

// fromOrdered inverts ordered (0 gives +0).
func fromOrdered(k int64) float64 {
	if k < 0 {
		return math.Float64frombits(uint64(-k) | 1<<63)
	}
	return math.Float64frombits(uint64(k))
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
	switch a.L {
	case 2:
		dst[0] = sign(x)
	case 8:
		decide8(x, (*[7]float64)(a.cuts), dst)
	case 16:
		decide16(x, (*[15]float64)(a.cuts), dst)
	default:
		putLabel(dst, int(a.labels[a.sliceIndex(x)]))
	}
}

// decide8 and decide16 are decide for L = 8 and 16 without the division: the position is the
// number of boundaries c = a.cuts that x lies at or below (x ≤ c exactly when c − x has no
// sign bit, ±0 and infinities included), and Gray bit j is the parity of those among its 2^j
// boundaries (the position's bits above j, reflected); one boundary for bit 0, hence the 1 ^.
func decide8(x float64, c *[7]float64, dst []byte) {
	dst = dst[:3:3]
	dst[0] = 1 ^ sign(c[0]-x)
	dst[1] = sign(c[1]-x) ^ sign(c[2]-x)
	dst[2] = sign(c[3]-x) ^ sign(c[4]-x) ^ sign(c[5]-x) ^ sign(c[6]-x)
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

func decide16(x float64, c *[15]float64, dst []byte) {
	dst = dst[:4:4]
	dst[0] = 1 ^ sign(c[0]-x)
	dst[1] = sign(c[1]-x) ^ sign(c[2]-x)
	dst[2] = sign(c[3]-x) ^ sign(c[4]-x) ^ sign(c[5]-x) ^ sign(c[6]-x)
	dst[3] = sign(c[7]-x) ^ sign(c[8]-x) ^ sign(c[9]-x) ^ sign(c[10]-x) ^
		sign(c[11]-x) ^ sign(c[12]-x) ^ sign(c[13]-x) ^ sign(c[14]-x)
}
