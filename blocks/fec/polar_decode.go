package fec

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// PolarDecoder is the decoding block of a polar code on the channel LLRs f.LLR: successive
// cancellation (list size 1, the default) or successive-cancellation list decoding with List(L).
//
// SC decides u_0, u_1, … in turn, each from the LLR the polar tree gives it under the decisions
// before it, frozen bits set to 0 (Arıkan 2009). List decoding keeps the L most likely paths: at
// every message bit each path splits into u = 0 and u = 1, and the L of smallest path metric
// survive (Tal and Vardy, List decoding of polar codes, IEEE Trans. Inf. Theory, 2015, with
// their lazy copying of the shared arrays, so a step costs O(L·N log N) in all). Work is in the
// LLR domain (Balatsoukas-Stimming, Bastani Parizi and Burg, LLR-based successive cancellation
// list decoding of polar codes, IEEE Trans. Signal Process., 2015): the check-node rule is the
// min-sum form f(a, b) = sign(a)·sign(b)·min(|a|, |b|), the variable-node rule
// g(a, b, u) = b + (1 − 2u)·a, and a path's metric grows by ln(1 + e^(−(1−2u)·L)) for each bit
// u it decides against the LLR L. With a CRC (PolarCode.CRC) the decoder returns the most likely
// path whose CRC checks (CA-SCL, Niu and Chen, CRC-aided decoding of polar codes, IEEE Commun.
// Lett., 2012), else the most likely path, and counts the word in CRCFailures. Without LLRs from
// the demodulator it decodes the hard decisions as LLRs of ±1.
type PolarDecoder struct {
	code *PolarCode
	L    int // list size

	ch       []float64
	p        [][][]float64 // p[λ][s]: LLRs of array s at layer λ (λ ≥ 1)
	c        [][][]byte    // c[λ][s]: bit pairs of array s at layer λ
	pathArr  [][]int       // pathArr[λ][ℓ]: array of path ℓ at layer λ
	refs     [][]int       // refs[λ][s]
	freeArr  [][]int       // unused arrays per layer
	freePath []int
	active   []bool
	metric   []float64
	u        [][]byte
	cand     []polarCand
	msg      []byte
	out      []byte

	words, crcFail int64
	err            error
}

type polarCand struct {
	path int
	bit  byte
	m    float64
}

// Decoder is the successive-cancellation decoder of the code.
func (c *PolarCode) Decoder() *PolarDecoder { return &PolarDecoder{code: c, L: 1} }

// List sets the list size (1 = SC; 2…256), for CRC-aided list decoding when the code has a CRC.
func (d *PolarDecoder) List(size int) *PolarDecoder {
	d.L = size
	if (size < 1 || size > 256) && d.err == nil {
		d.err = fmt.Errorf("%s: List(%d) must lie in 1…256", d.Name(), size)
	}
	d.p = nil
	return d
}

// Name names the block in messages.
func (d *PolarDecoder) Name() string {
	if d.L > 1 {
		s := fmt.Sprintf("%s SC list decoder (L = %d", d.code.name, d.L)
		if d.code.CRCBits > 0 {
			s += fmt.Sprintf(", CRC-%d", d.code.CRCBits)
		}
		return s + ")"
	}
	return d.code.name + " SC decoder"
}

// Err reports bad parameters.
func (d *PolarDecoder) Err() error {
	if d.code.err != nil {
		return d.code.err
	}
	return d.err
}

// CRCFailures is a link counter: the codewords of the last frame, and those for which no path
// of the list passed the CRC (detected errors; 0 without a CRC).
func (d *PolarDecoder) CRCFailures(_ *link.Frame) (words, failed int64) { return d.words, d.crcFail }

func (d *PolarDecoder) alloc() {
	c := d.code
	m, L := c.m, d.L
	d.p = make([][][]float64, m+1)
	d.c = make([][][]byte, m+1)
	d.pathArr = make([][]int, m+1)
	d.refs = make([][]int, m+1)
	d.freeArr = make([][]int, m+1)
	for l := 0; l <= m; l++ {
		size := 1 << (m - l)
		d.p[l] = make([][]float64, L)
		d.c[l] = make([][]byte, L)
		for s := 0; s < L; s++ {
			if l > 0 {
				d.p[l][s] = make([]float64, size)
			}
			d.c[l][s] = make([]byte, 2*size)
		}
		d.pathArr[l] = make([]int, L)
		d.refs[l] = make([]int, L)
		d.freeArr[l] = make([]int, 0, L)
	}
	d.freePath = make([]int, 0, L)
	d.active = make([]bool, L)
	d.metric = make([]float64, L)
	d.u = make([][]byte, L)
	for i := range d.u {
		d.u[i] = make([]byte, c.N)
	}
	d.cand = make([]polarCand, 0, 2*L)
	d.msg = make([]byte, c.K)
}

// Process decodes f.LLR to f.Out.
func (d *PolarDecoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := d.code
	if f.Out != nil {
		return fmt.Errorf("a polar decoder decodes LLRs: place it right after the demodulator (or its deinterleaver)")
	}
	hardIn := len(f.LLR) == 0
	n := len(f.LLR)
	if hardIn {
		n = len(f.Hard)
	}
	if err := multiple(n, c.Sent, "LLRs"); err != nil {
		return err
	}
	if d.p == nil {
		d.alloc()
	}
	words := n / c.Sent
	d.ch = link.GrowFloats(d.ch, c.N)
	d.out = link.GrowBytes(d.out, words*c.K)
	d.words, d.crcFail = int64(words), 0
	for i, r := range c.removed { // punctured bits: nothing known; shortened: known 0
		d.ch[i] = 0
		if r == removedShortened {
			d.ch[i] = shortLLR
		}
	}
	for w := 0; w < words; w++ {
		for i := 0; i < c.Sent; i++ {
			at := i
			if c.sent != nil {
				at = int(c.sent[i])
			}
			if hardIn {
				d.ch[at] = 1 - 2*float64(f.Hard[w*c.Sent+i]&1)
				continue
			}
			l := f.LLR[w*c.Sent+i]
			if l != l {
				return fmt.Errorf("LLR %d is NaN", w*c.Sent+i)
			}
			d.ch[at] = l
		}
		if !d.decodeWord(d.out[w*c.K : (w+1)*c.K]) {
			d.crcFail++
		}
	}
	f.Out = d.out
	return nil
}

func (d *PolarDecoder) reset() {
	m, L := d.code.m, d.L
	for l := 0; l <= m; l++ {
		d.freeArr[l] = d.freeArr[l][:0]
		for s := L - 1; s >= 0; s-- {
			d.freeArr[l] = append(d.freeArr[l], s)
			d.refs[l][s] = 0
		}
	}
	d.freePath = d.freePath[:0]
	for p := L - 1; p >= 0; p-- {
		d.freePath = append(d.freePath, p)
		d.active[p] = false
	}
}

func pop(s *[]int) int {
	v := (*s)[len(*s)-1]
	*s = (*s)[:len(*s)-1]
	return v
}

func (d *PolarDecoder) newPath() int {
	p := pop(&d.freePath)
	d.active[p] = true
	d.metric[p] = 0
	for l := range d.pathArr {
		s := pop(&d.freeArr[l])
		d.pathArr[l][p] = s
		d.refs[l][s] = 1
	}
	return p
}

func (d *PolarDecoder) clonePath(p int, phi int) int {
	q := pop(&d.freePath)
	d.active[q] = true
	d.metric[q] = d.metric[p]
	for l := range d.pathArr {
		s := d.pathArr[l][p]
		d.pathArr[l][q] = s
		d.refs[l][s]++
	}
	copy(d.u[q][:phi], d.u[p][:phi])
	return q
}

func (d *PolarDecoder) killPath(p int) {
	d.active[p] = false
	d.freePath = append(d.freePath, p)
	for l := range d.pathArr {
		s := d.pathArr[l][p]
		if d.refs[l][s]--; d.refs[l][s] == 0 {
			d.freeArr[l] = append(d.freeArr[l], s)
		}
	}
}

// writable returns the array of path p at layer l, copied first if another path shares it.
func (d *PolarDecoder) writable(l, p int) int {
	s := d.pathArr[l][p]
	if d.refs[l][s] == 1 {
		return s
	}
	t := pop(&d.freeArr[l])
	if l > 0 {
		copy(d.p[l][t], d.p[l][s])
	}
	copy(d.c[l][t], d.c[l][s])
	d.refs[l][s]--
	d.refs[l][t] = 1
	d.pathArr[l][p] = t
	return t
}

// calcP computes the LLRs of layer l for phase phi on every active path.
func (d *PolarDecoder) calcP(l, phi int) {
	if l == 0 {
		return
	}
	psi := phi >> 1
	if phi&1 == 0 {
		d.calcP(l-1, psi)
	}
	size := 1 << (d.code.m - l)
	for p, on := range d.active {
		if !on {
			continue
		}
		s := d.writable(l, p)
		dst, cs := d.p[l][s][:size], d.c[l][s]
		src := d.ch
		if l > 1 {
			src = d.p[l-1][d.pathArr[l-1][p]]
		}
		src = src[:2*size]
		if phi&1 == 0 {
			for b := range dst {
				a, c := src[2*b], src[2*b+1]
				m := math.Min(math.Abs(a), math.Abs(c))
				if (a < 0) != (c < 0) {
					m = -m
				}
				dst[b] = m
			}
		} else {
			for b := range dst {
				a, c := src[2*b], src[2*b+1]
				if cs[2*b] != 0 {
					a = -a
				}
				dst[b] = c + a
			}
		}
	}
}

// calcC propagates the decided pair at layer l for phase phi (odd) on every active path.
func (d *PolarDecoder) calcC(l, phi int) {
	m := d.code.m
	for {
		psi := phi >> 1
		size := 1 << (m - l)
		bit := psi & 1
		for p, on := range d.active {
			if !on {
				continue
			}
			hi := d.c[l][d.pathArr[l][p]]
			lo := d.c[l-1][d.writable(l-1, p)]
			for b := 0; b < size; b++ {
				u0, u1 := hi[2*b], hi[2*b+1]
				lo[2*(2*b)+bit] = u0 ^ u1
				lo[2*(2*b+1)+bit] = u1
			}
		}
		if psi&1 == 0 || l == 1 {
			return
		}
		l--
		phi = psi
	}
}

// pathCost is ln(1 + e^(−(1−2u)·llr)), the metric a path pays for deciding u.
func pathCost(llr float64, u byte) float64 {
	x := llr
	if u != 0 {
		x = -x
	}
	if x > 0 {
		return math.Log1p(math.Exp(-x))
	}
	return -x + math.Log1p(math.Exp(x))
}

// decodeWord decodes d.ch into msg; it reports false when a CRC is used and no path passes it.
func (d *PolarDecoder) decodeWord(msg []byte) bool {
	c := d.code
	m, L := c.m, d.L
	d.reset()
	d.newPath()
	for phi := 0; phi < c.N; phi++ {
		d.calcP(m, phi)
		if c.frozen[phi] {
			for p, on := range d.active {
				if !on {
					continue
				}
				s := d.writable(m, p)
				d.metric[p] += pathCost(d.p[m][s][0], 0)
				d.c[m][s][phi&1] = 0
				d.u[p][phi] = 0
			}
		} else {
			// Every path continues with 0 and with 1; keep the L best.
			d.cand = d.cand[:0]
			for p, on := range d.active {
				if !on {
					continue
				}
				llr := d.p[m][d.pathArr[m][p]][0]
				d.cand = append(d.cand, polarCand{p, 0, d.metric[p] + pathCost(llr, 0)},
					polarCand{p, 1, d.metric[p] + pathCost(llr, 1)})
			}
			cs := d.cand
			for i := 1; i < len(cs); i++ { // insertion sort, ≤ 2L entries
				for j := i; j > 0 && cs[j].m < cs[j-1].m; j-- {
					cs[j], cs[j-1] = cs[j-1], cs[j]
				}
			}
			keep := cs[:min(L, len(cs))]
			var k0, k1 [256]bool
			for _, k := range keep {
				if k.bit == 0 {
					k0[k.path] = true
				} else {
					k1[k.path] = true
				}
			}
			for p, on := range d.active {
				if on && !k0[p] && !k1[p] {
					d.killPath(p)
				}
			}
			for p := 0; p < L; p++ {
				if !d.active[p] || (!k0[p] && !k1[p]) {
					continue
				}
				llr := d.p[m][d.pathArr[m][p]][0]
				base := d.metric[p]
				if k0[p] && k1[p] {
					q := d.clonePath(p, phi)
					d.setBit(q, phi, 1, base+pathCost(llr, 1))
					k0[q], k1[q] = false, false // q is done for this phase
				}
				if k0[p] {
					d.setBit(p, phi, 0, base+pathCost(llr, 0))
				} else {
					d.setBit(p, phi, 1, base+pathCost(llr, 1))
				}
			}
		}
		if phi&1 == 1 {
			d.calcC(m, phi)
		}
	}
	// The most likely path, or with a CRC the most likely that passes it.
	best, bestOK := -1, -1
	for p, on := range d.active {
		if !on {
			continue
		}
		if best < 0 || d.metric[p] < d.metric[best] {
			best = p
		}
		if c.CRCBits > 0 {
			for j, i := range c.info[:c.K] {
				d.msg[j] = d.u[p][i]
			}
			r := c.crcOf(d.msg)
			ok := true
			for j, i := range c.info[c.K:] {
				if d.u[p][i] != byte(r>>uint(c.CRCBits-1-j)&1) {
					ok = false
					break
				}
			}
			if ok && (bestOK < 0 || d.metric[p] < d.metric[bestOK]) {
				bestOK = p
			}
		}
	}
	pick := best
	if bestOK >= 0 {
		pick = bestOK
	}
	for j, i := range c.info[:c.K] {
		msg[j] = d.u[pick][i]
	}
	return c.CRCBits == 0 || bestOK >= 0
}

func (d *PolarDecoder) setBit(p, phi int, u byte, metric float64) {
	m := d.code.m
	s := d.writable(m, p)
	d.c[m][s][phi&1] = u
	d.u[p][phi] = u
	d.metric[p] = metric
}
