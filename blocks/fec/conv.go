package fec

import (
	"fmt"
	"math"
	"math/bits"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Convolutional is a rate-1/2 feedforward convolutional code of constraint length K, with
// optional puncturing, decoded by the Viterbi algorithm.
//
// Each input bit u_t gives two code bits A_t = ⟨G[0], r_t⟩ and B_t = ⟨G[1], r_t⟩ (mod 2), sent
// in the order A0 B0 A1 B1 …, where r_t holds u_t and the K−1 bits before it and a generator's
// most significant octal bit taps u_t (the convention of Proakis, Digital Communications, 4th
// ed., 2001, §8.2). Conv is the K = 7 code with generators 133 and 171 (octal), free distance
// 10, of CCSDS 131.0-B, IEEE 802.11a and DVB-S.
//
// Every frame starts in the zero state and is terminated by K−1 zero tail bits, so n bits give
// 2(n + K − 1) mother-code bits before puncturing; the encoder multiplies f.CodeRate by the rate
// the frame sees (tail included). Puncturing removes code bits by a cyclic mask over the
// mother-code sequence; the decoder puts zero LLRs (erasures) in their place.
//
// The decoder is a maximum-likelihood sequence decoder over the 2^(K−1)-state trellis
// (Viterbi, IEEE Trans. Inf. Theory, 1967): add-compare-select on integer correlation metrics (the LLRs quantised finely),
// Σ ±LLR along a branch, one survivor bit per state and step, and a traceback from the zero
// state at the end of the frame. Soft input is f.LLR; hard input is ±1 from f.Hard (Hamming
// distance decoding). By default the decoder takes f.LLR when the demodulator gave it and f.Hard
// otherwise (see Viterbi.Hard, Viterbi.Soft); as the outer code of a concatenation (f.Out set
// by an inner decoder) it decodes f.Out as hard input. Decoding time is linear in the frame and
// allocates nothing once the buffers have grown.
type Convolutional struct {
	K    int    // constraint length, 3…7 (2^(K−1) ≤ 64 states)
	G    [2]int // generators, octal written as Go octal literals, e.g. 0o133, 0o171
	Keep []byte // puncturing mask over A0 B0 A1 B1 … (1 = sent), repeated; nil = unpunctured

	pattern string
	err     error
}

// Conv is the K = 7, rate-1/2 code with generators 133 and 171 (octal).
func Conv() *Convolutional { return ConvCode(7, 0o133, 0o171) }

// ConvCode is the rate-1/2 code of constraint length k with generators g0 and g1 (octal taps,
// most significant bit on the current input).
func ConvCode(k, g0, g1 int) *Convolutional {
	c := &Convolutional{K: k, G: [2]int{g0, g1}}
	switch {
	case k < 3 || k > 7:
		c.err = fmt.Errorf("fec.ConvCode: K = %d must lie in 3…7", k)
	case g0 <= 0 || g0 >= 1<<k || g1 <= 0 || g1 >= 1<<k:
		c.err = fmt.Errorf("fec.ConvCode: generators %o, %o (octal) must be nonzero and have at most K = %d bits", g0, g1, k)
	case (g0|g1)&(1<<(k-1)) == 0 || (g0|g1)&1 == 0:
		c.err = fmt.Errorf("fec.ConvCode: generators %o, %o (octal) do not use the whole constraint length K = %d", g0, g1, k)
	}
	return c
}

// Puncturing masks over the mother-code bits A0 B0 A1 B1 … of the 133/171 code, from IEEE Std
// 802.11-2020: rates 2/3 and 3/4 from §17.3.5.6 (Figure 17-9: 2/3 sends A0 B0 A1; 3/4 sends
// A0 B0 A1 B2), rate 5/6 from §19.3.11.6 (sends A0 B0 A1 B2 A3 B4).
var punctureMasks = map[string][]byte{
	"1/2": nil,
	"2/3": {1, 1, 1, 0},
	"3/4": {1, 1, 1, 0, 0, 1},
	"5/6": {1, 1, 1, 0, 0, 1, 1, 0, 0, 1},
}

// Puncture sets the code rate by the IEEE 802.11 puncturing pattern: "1/2" (none), "2/3",
// "3/4" or "5/6".
func (c *Convolutional) Puncture(rate string) *Convolutional {
	m, ok := punctureMasks[rate]
	if !ok {
		if c.err == nil {
			c.err = fmt.Errorf("fec.Conv: Puncture rate %q is not one of 1/2, 2/3, 3/4, 5/6", rate)
		}
		return c
	}
	c.Keep, c.pattern = m, rate
	return c
}

// PunctureMask sets a puncturing mask of one's own over A0 B0 A1 B1 … (1 = sent). It must cover
// whole bit pairs and send at least one bit of each pair.
func (c *Convolutional) PunctureMask(keep ...byte) *Convolutional {
	c.Keep, c.pattern = append([]byte(nil), keep...), "custom"
	if c.err != nil {
		return c
	}
	if len(keep) == 0 || len(keep)%2 != 0 {
		c.err = fmt.Errorf("fec.Conv: PunctureMask of %d bits must cover whole A, B pairs", len(keep))
		return c
	}
	for i := 0; i < len(keep); i += 2 {
		if keep[i] > 1 || keep[i+1] > 1 {
			c.err = fmt.Errorf("fec.Conv: PunctureMask %v must hold only 0 and 1", keep)
			return c
		}
		if keep[i]|keep[i+1] == 0 {
			c.err = fmt.Errorf("fec.Conv: PunctureMask %v sends neither bit of pair %d", keep, i/2)
			return c
		}
	}
	return c
}

// Err reports bad parameters.
func (c *Convolutional) Err() error { return c.err }

// Rate is the nominal code rate: 1/2, or the punctured rate (tail not counted).
func (c *Convolutional) Rate() float64 {
	if len(c.Keep) == 0 {
		return 0.5
	}
	kept := 0
	for _, k := range c.Keep {
		kept += int(k)
	}
	return float64(len(c.Keep)/2) / float64(kept)
}

func (c *Convolutional) name() string {
	s := fmt.Sprintf("fec.Conv(K=%d, %o/%o)", c.K, c.G[0], c.G[1])
	if c.pattern != "" && c.pattern != "1/2" {
		s += " rate " + c.pattern
	}
	return s
}

// Mother returns the unpunctured, tail-terminated code bits of msg: 2(len(msg) + K − 1) bits.
func (c *Convolutional) Mother(msg []byte) []byte {
	out := make([]byte, 2*(len(msg)+c.K-1))
	m := c.K - 1
	state := 0
	for t := 0; t < len(msg)+m; t++ {
		b := 0
		if t < len(msg) {
			b = int(msg[t] & 1)
		}
		reg := b<<m | state
		out[2*t] = byte(bits.OnesCount(uint(reg&c.G[0])) & 1)
		out[2*t+1] = byte(bits.OnesCount(uint(reg&c.G[1])) & 1)
		state = reg >> 1
	}
	return out
}

// sent is the number of code bits kept from the first n mother-code bits.
func (c *Convolutional) sent(n int) int {
	p := len(c.Keep)
	if p == 0 {
		return n
	}
	kept := 0
	for _, k := range c.Keep {
		kept += int(k)
	}
	s := n / p * kept
	for i := 0; i < n%p; i++ {
		s += int(c.Keep[i])
	}
	return s
}

// Encoder is the block that encodes f.Coded.
func (c *Convolutional) Encoder() *ConvEncoder {
	e := &ConvEncoder{code: c}
	for reg := 0; reg < 1<<c.K; reg++ {
		e.out[reg] = byte(bits.OnesCount(uint(reg&c.G[0]))&1)<<1 | byte(bits.OnesCount(uint(reg&c.G[1]))&1)
	}
	return e
}

// Decoder is the Viterbi decoder of the code.
func (c *Convolutional) Decoder() *Viterbi {
	v := &Viterbi{code: c}
	m := c.K - 1
	top := 1 << m
	v.symmetric = c.G[0]&top != 0 && c.G[1]&top != 0 && c.G[0]&1 != 0 && c.G[1]&1 != 0
	half := 1 << (m - 1)
	v.branch = make([][4]uint8, half)
	for j := range v.branch {
		for i, bp := range [4][2]int{{0, 2 * j}, {0, 2*j + 1}, {1, 2 * j}, {1, 2*j + 1}} {
			reg := bp[0]<<m | bp[1]
			v.branch[j][i] = uint8(bits.OnesCount(uint(reg&c.G[0]))&1)<<1 | uint8(bits.OnesCount(uint(reg&c.G[1]))&1)
		}
		v.first = append(v.first, v.branch[j][0])
	}
	return v
}

// ConvEncoder is the encoding block of a convolutional code.
type ConvEncoder struct {
	code *Convolutional
	out  [128]byte // A<<1 | B per register value
	buf  []byte
}

// Name names the block in messages.
func (e *ConvEncoder) Name() string { return e.code.name() + " encoder" }

// Err reports bad parameters.
func (e *ConvEncoder) Err() error { return e.code.err }

// Rate is the nominal code rate.
func (e *ConvEncoder) Rate() float64 { return e.code.Rate() }

// Process encodes f.Coded, terminates it and punctures it.
func (e *ConvEncoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := e.code
	in := f.Coded
	if len(in) == 0 {
		return fmt.Errorf("empty frame")
	}
	m := c.K - 1
	steps := len(in) + m
	e.buf = link.GrowBytes(e.buf, c.sent(2*steps))
	out := e.buf
	keep, p := c.Keep, len(c.Keep)
	state, k, j := 0, 0, 0 // j: position in the puncturing mask
	for t := 0; t < steps; t++ {
		b := 0
		if t < len(in) {
			b = int(in[t] & 1)
		}
		reg := b<<m | state
		ab := e.out[reg]
		state = reg >> 1
		if p == 0 {
			out[k], out[k+1] = ab>>1, ab&1
			k += 2
			continue
		}
		if keep[j] != 0 {
			out[k] = ab >> 1
			k++
		}
		if keep[j+1] != 0 {
			out[k] = ab & 1
			k++
		}
		if j += 2; j == p {
			j = 0
		}
	}
	f.CodeRate *= float64(len(in)) / float64(len(out))
	f.Coded = out
	return nil
}

// Input says what a Viterbi decoder decodes.
type Input int

// The decoder's inputs.
const (
	AutoInput Input = iota // f.LLR when the demodulator gave it, else f.Hard
	SoftInput              // f.LLR, an error when missing
	HardInput              // f.Hard, as ±1
)

// Viterbi is the decoding block of a convolutional code.
type Viterbi struct {
	code      *Convolutional
	Input     Input      // soft or hard input
	branch    [][4]uint8 // per butterfly j: code bits of (input 0, from 2j), (0, 2j+1), (1, 2j), (1, 2j+1)
	symmetric bool       // both generators tap the first and last register bits
	first     []uint8    // branch[j][0], for the symmetric case
	metric    []int64    // depunctured, quantised input, two per trellis step
	dec       []uint64   // survivor bits, one word per step, bit s for state s
	out       []byte
}

// Hard makes the decoder use the hard decisions even when LLRs are there.
func (v *Viterbi) Hard() *Viterbi { v.Input = HardInput; return v }

// Soft makes the decoder require LLRs.
func (v *Viterbi) Soft() *Viterbi { v.Input = SoftInput; return v }

// Name names the block in messages.
func (v *Viterbi) Name() string { return v.code.name() + " decoder" }

// Err reports bad parameters.
func (v *Viterbi) Err() error { return v.code.err }

// Process decodes the frame to f.Out.
func (v *Viterbi) Process(f *link.Frame, _ *rng.Stream) error {
	c := v.code
	var soft []float64
	var hard []byte
	switch {
	case f.Out != nil: // an inner decoder has run
		hard = f.Out
	case v.Input == HardInput:
		hard = f.Hard
	case v.Input == SoftInput || len(f.LLR) > 0:
		if len(f.LLR) == 0 {
			return fmt.Errorf("soft input asked but the frame has no LLRs (ask the demodulator for them, or use Hard)")
		}
		soft = f.LLR
	default:
		hard = f.Hard
	}
	n := len(soft) + len(hard)
	mother, err := c.motherLength(n)
	if err != nil {
		return err
	}
	m := c.K - 1
	steps := mother / 2
	info := steps - m
	v.metric = growInt64s(v.metric, mother)
	x := v.metric
	// Soft input is quantised to integers with the largest finite |LLR| at 2^20, far finer than
	// any noise, so integer sums are exact; an infinite LLR (a noiseless channel) counts 2^22.
	// Path metrics grow by less than 2^24 per step.
	scale := 1.0
	if soft != nil {
		peak := 0.0
		for i, l := range soft {
			if l != l {
				return fmt.Errorf("LLR %d is NaN", i)
			}
			if !math.IsInf(l, 0) {
				peak = max(peak, math.Abs(l))
			}
		}
		if peak > 0 {
			scale = 1 << 20 / peak
		}
	}
	keep, p := c.Keep, len(c.Keep)
	k := 0
	for i := range x {
		if p != 0 && keep[i%p] == 0 {
			x[i] = 0
			continue
		}
		switch {
		case soft == nil:
			x[i] = int64(1 - 2*int(hard[k]&1))
		case math.IsInf(soft[k], 0):
			x[i] = int64(math.Copysign(1<<22, soft[k]))
		default:
			x[i] = int64(math.Round(soft[k] * scale))
		}
		k++
	}
	v.dec = growUints(v.dec, steps)
	v.acs(x, steps)
	v.out = link.GrowBytes(v.out, info)
	// Traceback from the zero state the tail forces. State s' = (u << (m−1)) | (s >> 1): the
	// input bit is the top bit of the state reached, the survivor bit the dropped bottom bit.
	mask := 1<<m - 1
	s := 0
	for t := steps - 1; t >= 0; t-- {
		if t < info {
			v.out[t] = byte(s >> (m - 1))
		}
		s = (s<<1)&mask | int(v.dec[t]>>uint(s)&1)
	}
	f.Out = v.out
	return nil
}

// motherLength finds the mother-code length whose punctured length is n.
func (c *Convolutional) motherLength(n int) (int, error) {
	p := len(c.Keep)
	var mother int
	if p == 0 {
		mother = n
	} else {
		kept := c.sent(p)
		mother = n / kept * p
		rem := n % kept
		for q := 0; rem > 0; q += 2 { // each pair sends a bit, so the count rises with q
			if c.sent(q) == rem {
				mother += q
				break
			}
			if q > p {
				return 0, fmt.Errorf("%d code bits do not make a punctured frame", n)
			}
		}
	}
	if mother%2 != 0 || mother/2 <= c.K-1 {
		return 0, fmt.Errorf("%d code bits do not make a frame (2 per step, %d tail steps)", n, c.K-1)
	}
	return mother, nil
}

// acs runs add-compare-select over the trellis on integer metrics, storing the survivor bits.
// The survivor bit is the sign of the metric difference; the compiler turns the selection into
// a conditional move, so the loop has no data-dependent branch.
func (v *Viterbi) acs(x []int64, steps int) {
	m := v.code.K - 1
	half := 1 << (m - 1)
	var ma, mb [64]int64
	old, nu := &ma, &mb
	const unreachable = -1 << 60
	for s := range old[:2*half] {
		old[s] = unreachable
	}
	old[0] = 0
	br := v.branch[:half]
	dec := v.dec[:steps]
	sym := v.symmetric
	for t := range dec {
		a, b := x[2*t], x[2*t+1]
		// Correlation of the received pair with the code bits A<<1|B (0 ↦ +, 1 ↦ −).
		bm := [4]int64{a + b, a - b, -a + b, -a - b}
		var d uint64
		if sym {
			// Both generators tap the first and the last register bit, so the four branches of a
			// butterfly carry c, c̄, c̄, c: metrics ±bm[c].
			lo, hi := old[:2*half:2*half], nu[:2*half:2*half]
			var dl, dh uint64
			for j, tb := range v.first[:half] {
				p0, p1 := lo[2*j], lo[2*j+1]
				c := bm[tb&3]
				u0, u1 := p0+c, p1-c
				w0, w1 := p0-c, p1+c
				dl |= uint64(u0-u1) >> 63 << uint(j&63)
				dh |= uint64(w0-w1) >> 63 << uint(j&63)
				if u1 > u0 {
					u0 = u1
				}
				if w1 > w0 {
					w0 = w1
				}
				hi[j], hi[j+half] = u0, w0
			}
			d = dl | dh<<uint(half)
		} else {
			for j, tb := range br {
				p0, p1 := old[(2*j)&63], old[(2*j+1)&63]
				u0, u1 := p0+bm[tb[0]&3], p1+bm[tb[1]&3]
				w0, w1 := p0+bm[tb[2]&3], p1+bm[tb[3]&3]
				d |= uint64(u0-u1)>>63<<uint(j) | uint64(w0-w1)>>63<<uint(j+half)
				if u1 > u0 {
					u0 = u1
				}
				if w1 > w0 {
					w0 = w1
				}
				nu[j&63], nu[(j+half)&63] = u0, w0
			}
		}
		dec[t] = d
		old, nu = nu, old
	}
}

// Nature declares the decoder to the estimators, which refuse it after the noise.
func (v *Viterbi) Nature() link.Kind { return link.Decoder }
