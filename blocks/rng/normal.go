package rng

// Normal values come from a 256-layer ziggurat (see ziggurat.go). Every normal value takes
// exactly one output of the stream: the n-th output u either gives the value at once (98.5 %
// of draws) or goes to the slow path, which draws what more it needs from an auxiliary
// stream keyed by (key, n). So a value depends on the key and its position only, and the
// filling loops below run without a call: they take the fast path for a chunk of values,
// note the few draws that missed it, and finish those after the chunk.

// Norm returns a standard normal value, N(0, 1).
func (s *Stream) Norm() float64 {
	s.ctr++
	return s.at(s.ctr)
}

// fastNormal is the ziggurat's fast path on the draw u: bits 0–7 pick the layer, bit 8 the
// sign, bits 9–63 the point in the layer. It gives the value and whether it is valid (the
// point fell in the layer's core), or 0 and false.
func fastNormal(u uint64) (float64, bool) {
	m := u >> (64 - zigBits)
	if m < zigK[u&(zigLayers-1)] {
		return float64(int64(m)) * zigW[u&(2*zigLayers-1)], true
	}
	return 0, false
}

// chunk is how many values the filling loops make between finishing the draws that missed
// the fast path (at most chunk misses, indexed by a byte).
const chunk = 256

// misses lists the positions in a chunk whose draws missed the fast path.
type misses struct {
	n int
	i [chunk]uint8
}

// slowAt is the normal value of output c of the stream with key k, by the slow path.
func slowAt(k, c uint64) float64 { return slowNormal(k, c, mix(k+c*golden)) }

// The per-chunk kernels are separate functions with few live values, so the compiler keeps
// the loop in registers. w is key + γ·(counter before the chunk); a missed draw leaves 0.

func normalsFast(d []float64, w uint64, sigma float64, m *misses) {
	n := 0
	for i := range d {
		w += golden
		z, ok := fastNormal(mix(w))
		if !ok {
			m.i[n&(chunk-1)] = uint8(i)
			n++
		}
		d[i] = sigma * z
	}
	m.n = n
}

func realFast(d []complex128, w uint64, sigma float64, m *misses) {
	n := 0
	for i := range d {
		w += golden
		z, ok := fastNormal(mix(w))
		if !ok {
			m.i[n&(chunk-1)] = uint8(i)
			n++
		}
		d[i] = complex(real(d[i])+sigma*z, imag(d[i]))
	}
	m.n = n
}

func imagFast(d []complex128, w uint64, sigma float64, m *misses) {
	n := 0
	for i := range d {
		w += golden
		z, ok := fastNormal(mix(w))
		if !ok {
			m.i[n&(chunk-1)] = uint8(i)
			n++
		}
		d[i] = complex(real(d[i]), imag(d[i])+sigma*z)
	}
	m.n = n
}

func complexFast(d []complex128, w uint64, sigma float64, m *misses) {
	const g2 = 2 * golden % (1 << 64)
	n := 0
	for i := range d {
		a, ok1 := fastNormal(mix(w + golden))
		b, ok2 := fastNormal(mix(w + g2))
		w += g2
		if !(ok1 && ok2) {
			a, b = 0, 0 // both finished after the chunk
			m.i[n&(chunk-1)] = uint8(i)
			n++
		}
		d[i] += complex(sigma*a, sigma*b)
	}
	m.n = n
}

// Normals fills dst with independent N(0, σ²) values.
func (s *Stream) Normals(dst []float64, sigma float64) {
	var m misses
	for len(dst) > 0 {
		d := dst[:min(len(dst), chunk)]
		c := s.ctr
		normalsFast(d, s.key+c*golden, sigma, &m)
		for _, i := range m.i[:m.n] {
			d[i] = sigma * slowAt(s.key, c+1+uint64(i))
		}
		s.ctr += uint64(len(d))
		dst = dst[len(d):]
	}
}

// AddNoise adds independent N(0, σ²) noise to both parts of every element of x: circular
// complex Gaussian noise of total variance 2σ² (the real part's value first in the stream).
func (s *Stream) AddNoise(x []complex128, sigma float64) {
	var m misses
	for len(x) > 0 {
		d := x[:min(len(x), chunk)]
		c := s.ctr
		complexFast(d, s.key+c*golden, sigma, &m)
		// A missed pair got 0 for both parts; add both values now (x + 0 + v is exactly x + v).
		for _, i := range m.i[:m.n] {
			ci := c + 1 + 2*uint64(i)
			d[i] += complex(sigma*s.at(ci), sigma*s.at(ci+1))
		}
		s.ctr += 2 * uint64(len(d))
		x = x[len(d):]
	}
}

// at is the normal value of output c of s, by either path.
func (s *Stream) at(c uint64) float64 {
	u := mix(s.key + c*golden)
	if z, ok := fastNormal(u); ok {
		return z
	}
	return slowNormal(s.key, c, u)
}

// AddRealNoise adds N(0, σ²) noise to the real part of every element of x.
func (s *Stream) AddRealNoise(x []complex128, sigma float64) {
	var m misses
	for len(x) > 0 {
		d := x[:min(len(x), chunk)]
		c := s.ctr
		realFast(d, s.key+c*golden, sigma, &m)
		for _, i := range m.i[:m.n] {
			d[i] = complex(real(d[i])+sigma*slowAt(s.key, c+1+uint64(i)), imag(d[i]))
		}
		s.ctr += uint64(len(d))
		x = x[len(d):]
	}
}

// AddImagNoise adds N(0, σ²) noise to the imaginary part of every element of x.
func (s *Stream) AddImagNoise(x []complex128, sigma float64) {
	var m misses
	for len(x) > 0 {
		d := x[:min(len(x), chunk)]
		c := s.ctr
		imagFast(d, s.key+c*golden, sigma, &m)
		for _, i := range m.i[:m.n] {
			d[i] = complex(real(d[i]), imag(d[i])+sigma*slowAt(s.key, c+1+uint64(i)))
		}
		s.ctr += uint64(len(d))
		x = x[len(d):]
	}
}
