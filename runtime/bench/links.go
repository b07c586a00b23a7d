// Package bench measures tally's throughput on two standard links — BPSK and Gray 16-QAM over
// AWGN with hard decisions — three ways: through an experiment script run by the interpreter
// host, through the same blocks run by the engine from compiled code, and through a plain
// reference loop of the kind most people write first (math/rand/v2 PCG, NormFloat64, one bit
// per draw). Every path runs the real link: bits drawn, mapped, Gaussian noise added, decided
// and counted.
package bench

import (
	"math"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
)

// FrameBits is the frame size of the standard links: large enough that the per-frame costs
// (keys, the engine's hand-over) vanish, small enough that a frame's buffers stay in the
// cache. The embedded script uses the same.
const FrameBits = 8192

// Case is one standard link.
type Case struct {
	Name   string  // "bpsk-awgn" or "qam16-awgn"
	EbN0   float64 // dB
	Point  int     // its point index in the embedded script (keys the streams)
	Modem  func() *modem.Modem
	Theory func(ebn0DB float64) float64 // exact BER, for the sanity of the counts
	ref    func(bits int64, sigma float64, seed uint64) int64
}

// Cases are the standard links, in the order of the embedded script's sweep.
var Cases = []Case{
	{Name: "bpsk-awgn", EbN0: 6, Point: 0, Modem: modem.BPSK, Theory: bpskBER, ref: refBPSK},
	{Name: "qam16-awgn", EbN0: 10, Point: 1, Modem: func() *modem.Modem { return modem.QAM(16) }, Theory: qam16BER, ref: refQAM16},
}

// Link is the case's link, as the script builds it.
func (c Case) Link() *link.Link {
	m := c.Modem()
	return link.Chain(source.Random(FrameBits), m.Mod(), channel.AWGN(c.EbN0), m.Demod())
}

// q is the Gaussian tail probability Q(x) = ½ erfc(x/√2).
func q(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }

// bpskBER is ½ erfc(√(Eb/N0)) (e.g. Proakis, Digital Communications, 4th ed., 2001, eq. 5-2-5).
func bpskBER(db float64) float64 { return 0.5 * math.Erfc(math.Sqrt(math.Pow(10, db/10))) }

// qam16BER is the exact BER of Gray 16-QAM, ¼[3Q(a) + 2Q(3a) − Q(5a)] with a = √(4γb/5)
// (Cho and Yoon, "On the general BER expression of one- and two-dimensional amplitude
// modulations", IEEE Trans. Commun. 50(7), 2002, M = 16).
func qam16BER(db float64) float64 {
	a := math.Sqrt(0.8 * math.Pow(10, db/10))
	return (3*q(a) + 2*q(3*a) - q(5*a)) / 4
}
