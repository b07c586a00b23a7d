package modem

import (
	"math"

	"tally/blocks/link"
)

// DEBPSK is differentially encoded BPSK with coherent detection. The transmitter puts the data
// in phase changes exactly as DBPSK does: bit b multiplies the previous symbol by +1 (b = 0) or
// −1 (b = 1), after a reference symbol +1 at the start of each frame (so a frame of n bits has
// n + 1 symbols, a rate loss the Eb/N0 accounting does not charge). The receiver, unlike
// DBPSK's, decides each symbol coherently on the sign of its real part, as BPSK does, and then
// decodes differentially: bit i is the exclusive or of the decisions on symbols i and i + 1.
//
// A phase ambiguity of π (a carrier recovery locked to the wrong half-turn, or impair.Phase(180))
// therefore costs nothing, and a cycle slip costs only the one bit that straddles it. The price
// is that one symbol error spoils the two bits around it: Pb = 2p(1 − p) with p = Q(√(2Eb/N0))
// the BPSK error rate (theory.DEBPSK), about twice the coherent BER and below DBPSK's.
//
// Soft outputs are the exact bit posteriors of the pair of symbols a bit depends on (exact
// because the encoded symbols after the reference are independent and equiprobable): with
// per-symbol BPSK LLRs La, Lb (4·Re y/N0), log-MAP gives 2·artanh(tanh(La/2)·tanh(Lb/2)) and
// max-log sign(La·Lb)·min(|La|, |Lb|). CSI is available as for BPSK.
func DEBPSK() *Modem {
	m := fixed("DEBPSK", 2)
	m.setAxes(1, 2)
	m.kind = kindDEBPSK
	return m
}

// DEQPSK is differentially encoded Gray QPSK with coherent detection. The symbols are QPSK's
// points (±1 ± j)/√2 (Points() is QPSK's alphabet); number the quadrants q = 0, 1, 2, 3
// counterclockwise from (1 + j)/√2. The data label l of a bit pair (first bit most significant)
// advances the quadrant by the Gray-labelled step used by DQPSK: q_i = q_{i−1} + δ(l) mod 4 with
// δ = 0, 1, 2, 3 for l = 00, 01, 11, 10, after a reference symbol in quadrant 0 at the start of
// each frame (n bit pairs, n + 1 symbols). The receiver decides each symbol's quadrant coherently
// (the signs of I and Q, as QPSK does) and decodes the label gray(q̂_i − q̂_{i−1} mod 4).
//
// A phase ambiguity of a multiple of π/2 (impair.Phase(90), or a four-fold carrier recovery
// locked to the wrong quadrant) therefore costs nothing, and a cycle slip costs only the one
// symbol that straddles it. One wrong quadrant spoils the two decisions around it; per bit
// Pb = 2p(1 − p) with p = Q(√(2Eb/N0)) the error rate of each rail (theory.DEQPSK).
//
// Soft outputs are the exact posteriors of the step from the pair of symbols it depends on
// (the encoded quadrants after the reference are independent and equiprobable): the metric of
// label l is log Σ_q exp(μ_{i−1}(q) + μ_i(q + δ(l))), μ(q) = 2·Re(y·conj(s_q))/N0, or its
// largest term for max-log. CSI is available as for QPSK.
func DEQPSK() *Modem {
	m := fixed("DEQPSK", 4)
	m.setAxes(2, 2)
	m.kind = kindDEQPSK
	return m
}

// deQuadrant[q] is the DE-QPSK point of quadrant q, e^{jπ/4}·j^q.
var deQuadrant = [4]complex128{
	complex(math.Sqrt2/2, math.Sqrt2/2), complex(-math.Sqrt2/2, math.Sqrt2/2),
	complex(-math.Sqrt2/2, -math.Sqrt2/2), complex(math.Sqrt2/2, -math.Sqrt2/2),
}

// quadrantOf[sign(I)<<1|sign(Q)] is the quadrant of a sample from the signs of its axes.
var quadrantOf = [4]int{0, 3, 1, 2}

// mapDE maps coded bits c (ns symbols' worth) to buf[0 : ns+1]: the reference, then the
// differentially encoded symbols.
func mapDE(m *Modem, c []byte, buf []complex128, ns int) {
	if m.kind == kindDEBPSK {
		s := 1.0
		buf[0] = 1
		for i, x := range c[:ns] {
			s *= 1 - 2*float64(x&1)
			buf[i+1] = complex(s, 0)
		}
		return
	}
	buf[0] = deQuadrant[0]
	q := 0
	for i := range ns {
		q = (q + grayInv[c[2*i]&1<<1|c[2*i+1]&1]) & 3
		buf[i+1] = deQuadrant[q]
	}
}

// deDetect decides the symbols of y coherently and decodes them differentially.
func (d *Detector) deDetect(f *link.Frame, y []complex128, soft, exact bool) {
	if d.m.kind == kindDEBPSK {
		d.debpskDetect(f, y, soft, exact)
	} else {
		d.deqpskDetect(f, y, soft, exact)
	}
	if soft {
		hardFromLLR(d.hard, d.llr)
	}
}

func (d *Detector) debpskDetect(f *link.Frame, y []complex128, soft, exact bool) {
	if !soft {
		for i := range d.hard {
			d.hard[i] = sign(real(y[i])) ^ sign(real(y[i+1]))
		}
		return
	}
	la := 4 * real(y[0]) / d.n0At(f, 0)
	for i := range d.llr {
		lb := 4 * real(y[i+1]) / d.n0At(f, i+1)
		if exact {
			// 2·artanh(tanh(a/2)·tanh(b/2)) = log cosh((a+b)/2) − log cosh((a−b)/2).
			d.llr[i] = logCosh((la+lb)/2) - logCosh((la-lb)/2)
		} else {
			d.llr[i] = (math.Abs(la+lb) - math.Abs(la-lb)) / 2
		}
		la = lb
	}
}

// logCosh is log cosh x without overflow.
func logCosh(x float64) float64 {
	x = math.Abs(x)
	return x + math.Log1p(math.Exp(-2*x)) - math.Ln2
}

func (d *Detector) deqpskDetect(f *link.Frame, y []complex128, soft, exact bool) {
	if !soft {
		prev := quadrantOf[sign(real(y[0]))<<1|sign(imag(y[0]))]
		for i := range len(y) - 1 {
			v := y[i+1]
			q := quadrantOf[sign(real(v))<<1|sign(imag(v))]
			putLabel(d.hard[2*i:2*i+2], gray((q-prev)&3))
			prev = q
		}
		return
	}
	var ma, mb [4]float64
	quadrantMetrics(y[0], d.n0At(f, 0), &ma)
	met := d.m1[:4]
	for i := range len(y) - 1 {
		quadrantMetrics(y[i+1], d.n0At(f, i+1), &mb)
		for l := range 4 {
			s := grayInv[l]
			best := math.Inf(-1)
			var t [4]float64
			for q := range 4 {
				t[q] = ma[q] + mb[(q+s)&3]
				best = max(best, t[q])
			}
			if exact && !math.IsInf(best, 0) {
				sum := 0.0
				for _, v := range t {
					sum += math.Exp(v - best)
				}
				best += math.Log(sum)
			}
			met[l] = best
		}
		bitLLRs(met, d.m2[:4], identity[:4], 2, d.llr[2*i:2*i+2], exact)
		ma = mb
	}
}

// quadrantMetrics sets mu[q] = 2·Re(y·conj(s_q))/N0 (−|y − s_q|²/N0 up to a constant), zero
// for a sample with infinite noise.
func quadrantMetrics(y complex128, n0 float64, mu *[4]float64) {
	if math.IsInf(n0, 1) {
		*mu = [4]float64{}
		return
	}
	for q, s := range deQuadrant {
		mu[q] = 2 * (real(y)*real(s) + imag(y)*imag(s)) / n0
	}
}
