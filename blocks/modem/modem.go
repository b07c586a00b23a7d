// Package modem holds the modulators and detectors: bits to complex baseband symbols and back.
//
// A Modem is one modulation scheme, made by its constructor (BPSK, QPSK, PSK, QAM, PAM, OOK,
// DBPSK, DQPSK, DEBPSK, DEQPSK, BFSK, BFSKNoncoherent). Its Mod block maps the frame's coded
// bits to symbols and its Demod block decides them again, giving hard decisions and, when
// asked, soft outputs:
//
//	m := modem.QAM(16)
//	link.Chain(source.Random(4096), m.Mod(), channel.AWGN(ebn0), m.Demod())
//	link.Chain(source.Random(4096), m.Mod(), channel.AWGN(ebn0), m.Demod().MaxLog())
//
// Conventions:
//   - Bits enter a symbol most significant first: the first of k = log2(M) bits is the top bit
//     of the symbol's label, and Points()[label] is the point sent for it.
//   - Labels are Gray codes (binary reflected) wherever the trade uses Gray: around the circle
//     for PSK, along each axis for PAM and square QAM (the first k/2 bits on I, the rest on Q).
//     Bit 0 maps to the positive side of an axis, so BPSK sends 0 → +1, 1 → −1.
//   - Every constellation has unit average symbol energy, Es = 1, with equiprobable symbols.
//   - Soft outputs are LLRs, log P(b=0 | y)/P(b=1 | y), from the N0 the channel reports in the
//     frame; with CSI the detector also uses the channel gain f.Gain (see Detector).
package modem

import (
	"fmt"
	"math"
)

// kind selects the mapping and detection code of a scheme.
type kind int

const (
	kindAxis   kind = iota // BPSK, M-PAM (one real axis) and square M-QAM, QPSK (two axes)
	kindPSK                // M-PSK, M ≥ 8
	kindOOK                // on-off keying
	kindDBPSK              // differential BPSK
	kindDQPSK              // differential QPSK
	kindFSK                // coherent binary FSK
	kindNCFSK              // noncoherent binary FSK
	kindDEBPSK             // differentially encoded BPSK, coherent detection
	kindDEQPSK             // differentially encoded QPSK, coherent detection
)

// Modem is a modulation scheme: its labelled constellation and the blocks that use it.
type Modem struct {
	Scheme string // "BPSK", "QPSK", "PSK", "QAM", "PAM", "OOK", "DBPSK", "DQPSK", "DEBPSK", "DEQPSK", "BFSK", "BFSK-NC"
	M      int    // number of symbols
	Bits   int    // bits per symbol, log2(M)

	kind   kind
	name   string       // "modem.QAM(16)", for messages
	points []complex128 // by label
	axes   int          // kindAxis: 1 (real) or 2 (I and Q)
	axis   axis         // kindAxis: one axis, shared by I and Q
	ring   []uint16     // kindPSK: label of circle position i (angle 2πi/M)
	err    error
}

// Points is the constellation indexed by label (a copy): Points()[l] is the point sent for the
// bits of l, most significant first. For DBPSK and DQPSK it is the phase change a label causes
// (the factor the previous symbol is multiplied by); for DEBPSK and DEQPSK it is BPSK's and
// QPSK's alphabet, the points on the wire, whose labels are not the data (see DEQPSK); BFSK
// has no single complex point per symbol (two tones, see BFSK) and gives nil.
func (m *Modem) Points() []complex128 { return append([]complex128(nil), m.points...) }

// Err reports a parameter the constructor could not accept.
func (m *Modem) Err() error { return m.err }

// Name is the constructor call, for example "modem.QAM(16)".
func (m *Modem) Name() string { return m.name }

// Real reports whether the constellation lies on the real axis.
func (m *Modem) Real() bool {
	switch m.kind {
	case kindAxis, kindDEBPSK:
		return m.axes == 1
	case kindOOK, kindDBPSK, kindFSK, kindNCFSK:
		return true
	}
	return false
}

// gray is the binary reflected Gray code of i.
func gray(i int) int { return i ^ (i >> 1) }

// log2 returns log2(M) for a power of two M ≥ 2, else 0.
func log2(M int) int {
	if M < 2 || M&(M-1) != 0 {
		return 0
	}
	k := 0
	for 1<<k < M {
		k++
	}
	return k
}

// newModem fills the common fields, or records why M is not acceptable.
func newModem(scheme string, M, lo, hi int, square bool) *Modem {
	m := &Modem{Scheme: scheme, M: M, name: fmt.Sprintf("modem.%s(%d)", scheme, M)}
	k := log2(M)
	switch {
	case k == 0 && square:
		m.err = fmt.Errorf("modem.%s: M = %d is not a square power of two (4, 16, 64, 256, 1024)", scheme, M)
	case k == 0:
		m.err = fmt.Errorf("modem.%s: M = %d is not a power of two", scheme, M)
	case square && k%2 != 0:
		m.err = fmt.Errorf("modem.%s: M = %d is not a square power of two (4, 16, 64, 256, 1024)", scheme, M)
	case M < lo || M > hi:
		m.err = fmt.Errorf("modem.%s: M = %d is outside %d … %d", scheme, M, lo, hi)
	}
	if m.err != nil {
		m.name = "modem." + scheme
		return m
	}
	m.Bits = k
	return m
}

// fixed makes a scheme with a fixed order (BPSK, QPSK, …), named without its M.
func fixed(scheme string, M int) *Modem {
	return &Modem{Scheme: scheme, M: M, Bits: log2(M), name: "modem." + scheme}
}

// BPSK is binary phase shift keying: bit 0 → +1, bit 1 → −1.
func BPSK() *Modem {
	m := fixed("BPSK", 2)
	m.setAxes(1, 2)
	return m
}

// QPSK is Gray-labelled QPSK, the points (±1 ± j)/√2: the first bit on I, the second on Q
// (the same as QAM(4)).
func QPSK() *Modem {
	m := fixed("QPSK", 4)
	m.setAxes(2, 2)
	return m
}

// PAM is Gray-labelled M-PAM on the real axis (M = 2 … 64, a power of two): levels
// d·(M−1−2i), i = 0 … M−1 from the most positive, with label gray(i) and
// d = √(3/(M²−1)) for unit average energy.
func PAM(M int) *Modem {
	m := newModem("PAM", M, 2, 64, false)
	if m.err == nil {
		m.setAxes(1, M)
	}
	return m
}

// QAM is square Gray-labelled M-QAM (M = 4 … 1024, a power of four): the first log2(M)/2
// bits pick the I level and the rest the Q level of a Gray √M-PAM on each axis, levels
// d·(√M−1−2i) with d = √(3/(2(M−1))) for unit average energy.
func QAM(M int) *Modem {
	m := newModem("QAM", M, 4, 1024, true)
	if m.err == nil {
		m.setAxes(2, int(math.Round(math.Sqrt(float64(M)))))
	}
	return m
}

// setAxes builds a one- or two-axis constellation of L levels per axis.
func (m *Modem) setAxes(axes, L int) {
	m.kind, m.axes = kindAxis, axes
	e := float64(L*L-1) / 3 // mean energy of levels ±1, ±3, … per axis
	d := math.Sqrt(1 / (float64(axes) * e))
	m.axis = newAxis(L, d)
	if axes == 1 {
		m.points = make([]complex128, L)
		for i, lv := range m.axis.levels {
			m.points[m.axis.labels[i]] = complex(lv, 0)
		}
		return
	}
	b := m.axis.bits
	m.points = make([]complex128, L*L)
	for i, re := range m.axis.levels {
		for q, im := range m.axis.levels {
			m.points[int(m.axis.labels[i])<<b|int(m.axis.labels[q])] = complex(re, im)
		}
	}
}

// PSK is Gray-labelled M-PSK (M = 2 … 64, a power of two): circle position i at angle 2πi/M
// carries label gray(i). PSK(2) is BPSK and PSK(4) is QPSK (whose points sit at odd multiples
// of π/4, so each axis carries one bit).
func PSK(M int) *Modem {
	m := newModem("PSK", M, 2, 64, false)
	if m.err != nil {
		return m
	}
	switch M {
	case 2:
		m.setAxes(1, 2)
		return m
	case 4:
		m.setAxes(2, 2)
		return m
	}
	m.kind = kindPSK
	m.ring = make([]uint16, M)
	m.points = make([]complex128, M)
	for i := range M {
		m.ring[i] = uint16(gray(i))
		s, c := math.Sincos(2 * math.Pi * float64(i) / float64(M))
		m.points[gray(i)] = complex(c, s)
	}
	return m
}

// OOK is on-off keying: bit 0 → 0 (off), bit 1 → √2 (on), so the average symbol energy is 1
// and the "on" symbol carries 2. The detector's threshold is the midpoint √2/2, the maximum
// likelihood threshold for equiprobable bits.
func OOK() *Modem {
	m := fixed("OOK", 2)
	m.kind = kindOOK
	m.points = []complex128{0, complex(math.Sqrt2, 0)}
	return m
}
