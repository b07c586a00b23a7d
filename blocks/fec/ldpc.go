package fec

import (
	"fmt"
	"math/bits"
	"sync"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// LDPCCode is a binary low-density parity-check code: the codewords c of length N with
// H·cᵀ = 0 over GF(2) for a sparse M × N parity-check matrix H (Gallager, Low-density
// parity-check codes, 1963), decoded by message passing on its Tanner graph (LDPCDecoder).
//
// H comes from a published matrix in the alist format (LDPCAlist), from progressive edge growth
// (LDPCPEG, Hu, Eleftheriou and Arnold 2005) or from the quasi-cyclic lifting of a base matrix
// (LDPCLifted). K = N − rank(H) message bits go into each codeword:
//
//   - When the last M columns of H are lower triangular with ones on the diagonal (the
//     triangular PEG codes, and lifted codes whose parity part is a staircase of identities),
//     the message fills positions 0…K−1 and parity bit j follows from row j of H by
//     back-substitution, in time linear in the number of edges.
//   - Otherwise the encoder is found once by Gauss–Jordan elimination of H over GF(2) (rows packed
//     64 bits a word): the pivot columns carry parity, the others, in increasing order, the
//     message, and each parity bit is the parity of the message bits its reduced row selects.
//     The elimination costs about M²·N/64 word operations (a fraction of a second for N = 4000,
//     minutes for N = 20 000: give long codes a triangular parity part).
//
// Graphs and encoders are kept per construction for the life of the process, so the link
// function may make the code once per worker and point at no cost.
//
// Puncture(p) leaves the first p codeword bits unsent (the decoder treats them as erasures,
// LLR 0), which raises the rate to K/(N − p). Frames must hold a multiple of K bits (encoder)
// and of N − p coded bits (decoder).
type LDPCCode struct {
	N, K, M int // length, message bits, rows of H
	Punct   int // leading codeword bits not sent

	g    *ldpcGraph
	name string
	err  error
}

// ldpcGraph is the Tanner graph of H and its encoder, shared by all codes made from the same
// construction.
type ldpcGraph struct {
	n, m, k  int
	rowStart []int32 // edges of row i: rowStart[i] … rowStart[i+1]−1
	edgeVar  []int32 // variable (column) of each edge, in row order
	maxRow   int     // largest row weight

	triangular bool    // last m columns lower triangular, unit diagonal: back-substitution
	info       []int32 // codeword positions of the message bits, increasing
	// Elimination encoder: parity position pivot[i] = parity of (rowInfo[i] AND packed message).
	pivot   []int32
	rowInfo []uint64 // len(pivot) rows of kw words
	kw      int
}

var ldpcCache = struct {
	sync.Mutex
	m map[string]*ldpcEntry
}{m: map[string]*ldpcEntry{}}

type ldpcEntry struct {
	once sync.Once
	g    *ldpcGraph
	err  error
}

// cachedGraph returns the graph made by build for key, building it once per process.
func cachedGraph(key string, build func() (*ldpcGraph, error)) (*ldpcGraph, error) {
	ldpcCache.Lock()
	e, ok := ldpcCache.m[key]
	if !ok {
		e = &ldpcEntry{}
		ldpcCache.m[key] = e
	}
	ldpcCache.Unlock()
	e.once.Do(func() { e.g, e.err = build() })
	return e.g, e.err
}

// newLDPC wraps a graph (or an error) as a code named name.
func newLDPC(name string, g *ldpcGraph, err error) *LDPCCode {
	c := &LDPCCode{name: name}
	if err != nil {
		c.err = fmt.Errorf("%s: %v", name, err)
		return c
	}
	c.g, c.N, c.M, c.K = g, g.n, g.m, g.k
	return c
}

// graphFromRows builds the graph of an n-column matrix given by the columns of each row, and
// its encoder.
func graphFromRows(n int, rows [][]int32) (*ldpcGraph, error) {
	m := len(rows)
	if m == 0 || n <= m {
		return nil, fmt.Errorf("%d rows and %d columns make no code (need 0 < M < N)", m, n)
	}
	g := &ldpcGraph{n: n, m: m, rowStart: make([]int32, m+1)}
	used := make([]bool, n)
	for i, r := range rows {
		if len(r) == 0 {
			return nil, fmt.Errorf("row %d of H is empty", i+1)
		}
		for _, v := range r {
			if v < 0 || int(v) >= n {
				return nil, fmt.Errorf("row %d of H has column %d outside 1…%d", i+1, v+1, n)
			}
			used[v] = true
		}
		g.edgeVar = append(g.edgeVar, r...)
		g.rowStart[i+1] = int32(len(g.edgeVar))
		g.maxRow = max(g.maxRow, len(r))
	}
	for v, u := range used {
		if !u {
			return nil, fmt.Errorf("column %d of H is empty (a bit no check protects)", v+1)
		}
	}
	g.triangular = g.isTriangular()
	if g.triangular {
		g.k = n - m
		g.info = make([]int32, g.k)
		for i := range g.info {
			g.info[i] = int32(i)
		}
		return g, nil
	}
	return g, g.eliminate()
}

// isTriangular reports whether column n−m+j holds row j and no row above it, for every j.
func (g *ldpcGraph) isTriangular() bool {
	p := g.n - g.m
	for i := 0; i < g.m; i++ {
		diag := false
		for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
			if int(v) >= p {
				j := int(v) - p
				if j > i {
					return false
				}
				if j == i {
					diag = true
				}
			}
		}
		if !diag {
			return false
		}
	}
	return true
}

// eliminate finds the systematic encoder by Gauss–Jordan elimination over GF(2), choosing
// pivots from the last column backwards so the message sits in the leading columns.
func (g *ldpcGraph) eliminate() error {
	n, m := g.n, g.m
	w := (n + 63) / 64
	rows := make([]uint64, m*w)
	for i := 0; i < m; i++ {
		for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
			rows[i*w+int(v)/64] ^= 1 << (uint(v) % 64)
		}
	}
	row := func(i int) []uint64 { return rows[i*w : (i+1)*w] }
	isPivot := make([]bool, n)
	r := 0
	for c := n - 1; c >= 0 && r < m; c-- {
		wi, b := c/64, uint(c%64)
		p := -1
		for i := r; i < m; i++ {
			if rows[i*w+wi]>>b&1 != 0 {
				p = i
				break
			}
		}
		if p < 0 {
			continue
		}
		if p != r {
			a, bb := row(p), row(r)
			for j := range a {
				a[j], bb[j] = bb[j], a[j]
			}
		}
		pr := row(r)
		for i := 0; i < m; i++ {
			if i != r && rows[i*w+wi]>>b&1 != 0 {
				ri := row(i)
				for j := range ri {
					ri[j] ^= pr[j]
				}
			}
		}
		g.pivot = append(g.pivot, int32(c))
		isPivot[c] = true
		r++
	}
	g.k = n - r
	if g.k <= 0 {
		return fmt.Errorf("H has full column rank: no message bits")
	}
	pos := make([]int32, n) // info index of each non-pivot column
	for v := 0; v < n; v++ {
		if !isPivot[v] {
			pos[v] = int32(len(g.info))
			g.info = append(g.info, int32(v))
		}
	}
	g.kw = (g.k + 63) / 64
	g.rowInfo = make([]uint64, r*g.kw)
	for i := 0; i < r; i++ {
		ri := row(i)
		out := g.rowInfo[i*g.kw : (i+1)*g.kw]
		for wi, x := range ri {
			for x != 0 {
				b := bits.TrailingZeros64(x)
				x &= x - 1
				v := wi*64 + b
				if !isPivot[v] {
					j := pos[v]
					out[j/64] |= 1 << (uint(j) % 64)
				}
			}
		}
	}
	return nil
}

// encode writes the codeword of msg (K bits) to cw (N bits); pack is scratch of kw words.
func (g *ldpcGraph) encode(msg, cw []byte, pack []uint64) {
	if g.triangular {
		copy(cw, msg[:g.k])
		p := g.k
		for i := 0; i < g.m; i++ {
			var s byte
			for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
				if int(v) != p+i {
					s ^= cw[v]
				}
			}
			cw[p+i] = s & 1
		}
		return
	}
	clear(pack)
	for j, u := range msg[:g.k] {
		pack[j/64] |= uint64(u&1) << (uint(j) % 64)
		cw[g.info[j]] = u & 1
	}
	for i, pc := range g.pivot {
		ri := g.rowInfo[i*g.kw : (i+1)*g.kw]
		var x uint64
		for j, a := range ri {
			x ^= a & pack[j]
		}
		cw[pc] = byte(bits.OnesCount64(x) & 1)
	}
}

// Puncture leaves the first p codeword bits unsent.
func (c *LDPCCode) Puncture(p int) *LDPCCode {
	c.Punct = p
	if c.err == nil && (p < 0 || p >= c.N-c.M) {
		c.err = fmt.Errorf("%s: Puncture(%d) must lie in 0…%d", c.name, p, c.N-c.M-1)
	}
	return c
}

// Err reports a bad matrix or parameter.
func (c *LDPCCode) Err() error { return c.err }

// Rate is K/(N − punctured bits).
func (c *LDPCCode) Rate() float64 {
	if c.N == 0 {
		return 1
	}
	return float64(c.K) / float64(c.N-c.Punct)
}

// Edges is the number of ones in H.
func (c *LDPCCode) Edges() int {
	if c.g == nil {
		return 0
	}
	return len(c.g.edgeVar)
}

// Encode writes the N-bit codeword of the K-bit message msg (one bit per byte) to cw
// (punctured bits included).
func (c *LDPCCode) Encode(msg, cw []byte) {
	c.g.encode(msg, cw, make([]uint64, c.g.kw))
}

// Syndrome is the number of rows of H that the N-bit word cw does not satisfy.
func (c *LDPCCode) Syndrome(cw []byte) int {
	g := c.g
	bad := 0
	for i := 0; i < g.m; i++ {
		var s byte
		for _, v := range g.edgeVar[g.rowStart[i]:g.rowStart[i+1]] {
			s ^= cw[v]
		}
		bad += int(s & 1)
	}
	return bad
}

// Message extracts the K message bits of the N-bit codeword cw into msg.
func (c *LDPCCode) Message(cw, msg []byte) {
	for j, v := range c.g.info {
		msg[j] = cw[v]
	}
}

// Encoder is the block that encodes each K bits of f.Coded.
func (c *LDPCCode) Encoder() *LDPCEncoder { return &LDPCEncoder{code: c} }

// LDPCEncoder is the encoding block of an LDPC code.
type LDPCEncoder struct {
	code *LDPCCode
	cw   []byte
	pack []uint64
	out  []byte
}

// Name names the block in messages.
func (e *LDPCEncoder) Name() string { return e.code.name + " encoder" }

// Err reports a bad code.
func (e *LDPCEncoder) Err() error { return e.code.err }

// Rate is the code's rate, punctured bits not counted.
func (e *LDPCEncoder) Rate() float64 { return e.code.Rate() }

// Process encodes f.Coded.
func (e *LDPCEncoder) Process(f *link.Frame, _ *rng.Stream) error {
	c := e.code
	if err := multiple(len(f.Coded), c.K, "bits"); err != nil {
		return err
	}
	words := len(f.Coded) / c.K
	sent := c.N - c.Punct
	e.cw = link.GrowBytes(e.cw, c.N)
	e.pack = growUints(e.pack, c.g.kw)
	e.out = link.GrowBytes(e.out, words*sent)
	for w := 0; w < words; w++ {
		c.g.encode(f.Coded[w*c.K:(w+1)*c.K], e.cw, e.pack)
		copy(e.out[w*sent:(w+1)*sent], e.cw[c.Punct:])
	}
	f.Coded = e.out
	f.CodeRate *= c.Rate()
	return nil
}
