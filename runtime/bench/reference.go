package bench

import (
	"math"
	"math/rand/v2"
)

// The reference loops are the link written the way most people write it first: one generator
// (math/rand/v2's PCG), one draw per bit, NormFloat64 for the noise, a branch per decision.
// They are what the compiled blocks are measured against.

// refBPSK sends bits BPSK symbols (0 → +1, 1 → −1) through noise of standard deviation sigma
// and counts the wrong decisions.
func refBPSK(bits int64, sigma float64, seed uint64) int64 {
	r := rand.New(rand.NewPCG(seed, 0x7265666572656e63))
	var errs int64
	for range bits {
		b := r.IntN(2)
		x := 1.0
		if b == 1 {
			x = -1
		}
		y := x + sigma*r.NormFloat64()
		d := 0
		if y < 0 {
			d = 1
		}
		if d != b {
			errs++
		}
	}
	return errs
}

// level16 is a Gray 4-PAM axis of 16-QAM: the level of a 2-bit label (00 → +3, 01 → +1,
// 11 → −1, 10 → −3), in units of d = 1/√10 for unit symbol energy.
var level16 = [4]float64{3, 1, -3, -1}

// refQAM16 sends bits/4 Gray 16-QAM symbols through complex noise of standard deviation
// sigma per dimension and counts the wrong bits.
func refQAM16(bits int64, sigma float64, seed uint64) int64 {
	r := rand.New(rand.NewPCG(seed, 0x7265666572656e63))
	d := 1 / math.Sqrt(10)
	var errs int64
	for range bits / 4 {
		b0, b1, b2, b3 := r.IntN(2), r.IntN(2), r.IntN(2), r.IntN(2)
		x := complex(d*level16[b0<<1|b1], d*level16[b2<<1|b3])
		y := x + complex(sigma*r.NormFloat64(), sigma*r.NormFloat64())
		c0, c1 := slice4(real(y) / d)
		c2, c3 := slice4(imag(y) / d)
		if c0 != b0 {
			errs++
		}
		if c1 != b1 {
			errs++
		}
		if c2 != b2 {
			errs++
		}
		if c3 != b3 {
			errs++
		}
	}
	return errs
}

// slice4 decides a 4-PAM axis at thresholds −2, 0, 2 and returns the label's two bits.
func slice4(y float64) (int, int) {
	switch {
	case y > 2:
		return 0, 0
	case y > 0:
		return 0, 1
	case y > -2:
		return 1, 1
	default:
		return 1, 0
	}
}
