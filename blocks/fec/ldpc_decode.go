package fec

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// LDPCRule is the check-node rule of an LDPC decoder.
type LDPCRule int

// The check-node rules.
const (
	SumProduct   LDPCRule = iota // belief propagation, the tanh rule
	MinSum                       // normalised min-sum: the smallest other |LLR| times a factor
	OffsetMinSum                 // offset min-sum: the smallest other |LLR| less an offset, not below 0
)

// LDPCDecoder is the message-passing decoding block of an LDPC code, on the channel LLRs f.LLR
// (log P(0)/P(1), the demodulator's).
//
// Each iteration sends, along every edge of the Tanner graph, the variable's belief less what
// the check told it last time, x = L_v − m_cv, and the check answers with
//
//	sum-product:  m_cv = 2·atanh(Π tanh(x_u/2)) over the check's other variables u
//	min-sum:      m_cv = (Π sign x_u)·α·min |x_u|
//	offset:       m_cv = (Π sign x_u)·max(min |x_u| − β, 0)
//
// (Richardson and Urbanke, Modern Coding Theory, 2008, §2.5 and §5.4; Chen and Fossorier,
// Near optimum universal belief propagation based decoding of LDPC codes, IEEE Trans. Commun.,
// 2002, for the normalised and offset forms). L_v is the channel LLR plus every check's
// message. The flooding schedule (default) updates all checks from the beliefs of the last
// iteration; the layered schedule (Layered) updates L_v after each check, so later checks see
// fresh beliefs and decoding converges in about half the iterations (Hocevar, A reduced
// complexity decoder architecture via layered decoding of LDPC codes, IEEE SiPS, 2004).
// Decoding stops as soon as the hard decisions satisfy every check (early stopping), or after
// MaxIter iterations (default 50, set by Iterations); the decisions at the message positions go
// to f.Out. Without LLRs from the demodulator it decodes the hard decisions as LLRs of ±1
// (min-sum then works as on soft input; sum-product is not at its best).
//
// Three counters (link.Link.Count) report the frame just decoded: Failures, the codewords left
// with an unsatisfied check (detected errors); Undetected, those that satisfied every check but
// differ from the source bits (a wrong codeword; counted when the LDPC code is the outermost
// code, its message the source bits); and IterationsUsed, the iterations used out of the
// maximum.
type LDPCDecoder struct {
	code    *LDPCCode
	Rule    LDPCRule
	Factor  float64 // α of min-sum (default 0.75), β of offset min-sum (default 0.5)
	Layered bool
	MaxIter int

	c2v, xs, ts       []float64 // per edge: check-to-variable messages; per row: inputs
	total, next, chLL []float64
	hard, out         []byte
	words, failed     int64
	wrong, iters      int64
	checkWrong        bool
	err               error
}

// Decoder is the sum-product decoder with the flooding schedule and 50 iterations.
func (c *LDPCCode) Decoder() *LDPCDecoder {
	return &LDPCDecoder{code: c, MaxIter: 50}
}

// SumProduct selects belief propagation (the default).
func (d *LDPCDecoder) SumProduct() *LDPCDecoder { d.Rule = SumProduct; return d }

// MinSum selects normalised min-sum with factor alpha in (0, 1] (0.75 when 0).
func (d *LDPCDecoder) MinSum(alpha float64) *LDPCDecoder {
	if alpha == 0 {
		alpha = 0.75
	}
	d.Rule, d.Factor = MinSum, alpha
	if !(alpha > 0 && alpha <= 1) && d.err == nil {
		d.err = fmt.Errorf("%s: MinSum factor %v must lie in (0, 1]", d.Name(), alpha)
	}
	return d
}

// OffsetMinSum selects offset min-sum with offset beta ≥ 0 in LLR units (0.5 when 0).
func (d *LDPCDecoder) OffsetMinSum(beta float64) *LDPCDecoder {
	if beta == 0 {
		beta = 0.5
	}
	d.Rule, d.Factor = OffsetMinSum, beta
	if !(beta >= 0 && beta < 10) && d.err == nil {
		d.err = fmt.Errorf("%s: OffsetMinSum offset %v must lie in [0, 10)", d.Name(), beta)
	}
	return d
}

// Layer selects the layered schedule (checks in order, beliefs updated after each).
func (d *LDPCDecoder) Layer() *LDPCDecoder { d.Layered = true; return d }

// Iterations sets the most iterations per codeword (default 50).
func (d *LDPCDecoder) Iterations(n int) *LDPCDecoder {
	d.MaxIter = n
	if (n < 1 || n > 10000) && d.err == nil {
		d.err = fmt.Errorf("%s: Iterations(%d) must lie in 1…10000", d.Name(), n)
	}
	return d
}

// Name names the block in messages.
func (d *LDPCDecoder) Name() string {
	s := []string{"sum-product", "min-sum", "offset min-sum"}[d.Rule]
	if d.Layered {
		s += ", layered"
	}
	return d.code.name + " decoder (" + s + ")"
}

// Err reports a bad code or parameter.
func (d *LDPCDecoder) Err() error {
	if d.code.err != nil {
		return d.code.err
	}
	return d.err
}

// Failures is a link counter: the codewords of the last frame, and those left with an
// unsatisfied check.
func (d *LDPCDecoder) Failures(_ *link.Frame) (words, failed int64) { return d.words, d.failed }

// Undetected is a link counter: the codewords of the last frame that satisfied every check but
// carried a wrong message (0 trials when the source bits are not the code's messages).
func (d *LDPCDecoder) Undetected(_ *link.Frame) (words, wrong int64) {
	if !d.checkWrong {
		return 0, 0
	}
	return d.words, d.wrong
}

// IterationsUsed is a link counter: codewords × MaxIter, and the iterations used; its rate is
// the mean number of iterations over MaxIter.
func (d *LDPCDecoder) IterationsUsed(_ *link.Frame) (budget, used int64) {
	return d.words * int64(d.MaxIter), d.iters
}

// llrClip bounds messages: beyond it a bit is certain to double precision.
const llrClip = 40.0

// Process decodes f.LLR to f.Out.
func (d *LDPCDecoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := d.code
	g := c.g
	if f.Out != nil {
		return fmt.Errorf("an LDPC decoder decodes LLRs: place it right after the demodulator (or its deinterleaver)")
	}
	in := f.LLR
	hardIn := len(in) == 0
	n := len(in)
	if hardIn {
		n = len(f.Hard)
	}
	sent := c.N - c.Punct
	if err := multiple(n, sent, "LLRs"); err != nil {
		return err
	}
	words := n / sent
	e := len(g.edgeVar)
	d.c2v = link.GrowFloats(d.c2v, e)
	d.xs = link.GrowFloats(d.xs, g.maxRow)
	d.ts = link.GrowFloats(d.ts, g.maxRow)
	d.total = link.GrowFloats(d.total, c.N)
	d.next = link.GrowFloats(d.next, c.N)
	d.chLL = link.GrowFloats(d.chLL, c.N)
	d.hard = link.GrowBytes(d.hard, c.N)
	d.out = link.GrowBytes(d.out, words*c.K)
	d.words, d.failed, d.wrong, d.iters = int64(words), 0, 0, 0
	d.checkWrong = len(f.Bits) == words*c.K
	for w := 0; w < words; w++ {
		ch := d.chLL
		for i := 0; i < c.Punct; i++ {
			ch[i] = 0
		}
		for i := 0; i < sent; i++ {
			var l float64
			if hardIn {
				l = 1 - 2*float64(f.Hard[w*sent+i]&1)
			} else {
				l = in[w*sent+i]
				if l != l {
					return fmt.Errorf("LLR %d is NaN", w*sent+i)
				}
			}
			ch[c.Punct+i] = math.Max(-llrClip, math.Min(llrClip, l))
		}
		it, ok := d.decodeWord()
		d.iters += int64(it)
		msg := d.out[w*c.K : (w+1)*c.K]
		for j, v := range g.info {
			msg[j] = d.hard[v]
		}
		if !ok {
			d.failed++
		} else if d.checkWrong {
			src := f.Bits[w*c.K : (w+1)*c.K]
			for j := range msg {
				if msg[j] != src[j] {
					d.wrong++
					break
				}
			}
		}
	}
	f.Out = d.out
	return nil
}

// decodeWord runs message passing on d.chLL, leaving decisions in d.hard; it returns the
// iterations used and whether every check was satisfied.
func (d *LDPCDecoder) decodeWord() (int, bool) {
	g := d.code.g
	clear(d.c2v)
	copy(d.total, d.chLL)
	if d.decide() {
		return 0, true
	}
	for it := 1; it <= d.MaxIter; it++ {
		if d.Layered {
			for i := 0; i < g.m; i++ {
				lo, hi := g.rowStart[i], g.rowStart[i+1]
				vars, msgs := g.edgeVar[lo:hi], d.c2v[lo:hi]
				xs := d.xs[:len(vars)]
				for j, v := range vars {
					xs[j] = d.total[v] - msgs[j]
				}
				d.checkUpdate(xs, msgs)
				for j, v := range vars {
					d.total[v] = xs[j] + msgs[j]
				}
			}
		} else {
			copy(d.next, d.chLL)
			for i := 0; i < g.m; i++ {
				lo, hi := g.rowStart[i], g.rowStart[i+1]
				vars, msgs := g.edgeVar[lo:hi], d.c2v[lo:hi]
				xs := d.xs[:len(vars)]
				for j, v := range vars {
					xs[j] = d.total[v] - msgs[j]
				}
				d.checkUpdate(xs, msgs)
				for j, v := range vars {
					d.next[v] += msgs[j]
				}
			}
			d.total, d.next = d.next, d.total
		}
		if d.decide() {
			return it, true
		}
	}
	return d.MaxIter, false
}

// decide makes hard decisions from the beliefs and reports whether they satisfy every check.
func (d *LDPCDecoder) decide() bool {
	g := d.code.g
	for v, l := range d.total {
		d.hard[v] = 0
		if l < 0 {
			d.hard[v] = 1
		}
	}
	for i := 0; i < g.m; i++ {
		var s byte
		for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
			s ^= d.hard[v]
		}
		if s != 0 {
			return false
		}
	}
	return true
}

// checkUpdate computes the messages of one check to its variables from their inputs xs.
func (d *LDPCDecoder) checkUpdate(xs, msgs []float64) {
	switch d.Rule {
	case SumProduct:
		// Products of tanh(x/2) of the others, by a forward and a backward pass (no division, so
		// an input of 0 is handled).
		ts := d.ts[:len(xs)]
		fwd := 1.0
		for j, x := range xs {
			t := math.Tanh(0.5 * x)
			msgs[j] = fwd // product of those before j
			fwd *= t
			ts[j] = t
		}
		bwd := 1.0
		const top = 1 - 1e-15
		for j := len(xs) - 1; j >= 0; j-- {
			p := msgs[j] * bwd
			bwd *= ts[j]
			p = math.Max(-top, math.Min(top, p))
			msgs[j] = 2 * math.Atanh(p)
		}
	default:
		min1, min2 := math.Inf(1), math.Inf(1)
		at := -1
		neg := false
		for j, x := range xs {
			a := math.Abs(x)
			if x < 0 {
				neg = !neg
			}
			if a < min1 {
				min1, min2, at = a, min1, j
			} else if a < min2 {
				min2 = a
			}
		}
		if d.Rule == MinSum {
			min1, min2 = d.Factor*min1, d.Factor*min2
		} else {
			min1, min2 = math.Max(min1-d.Factor, 0), math.Max(min2-d.Factor, 0)
		}
		for j, x := range xs {
			m := min1
			if j == at {
				m = min2
			}
			if neg != (x < 0) {
				m = -m
			}
			msgs[j] = m
		}
	}
}
