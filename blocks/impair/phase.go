package impair

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// PhaseOffset rotates every sample by a constant carrier phase: y = x·e^{jθ}.
type PhaseOffset struct {
	Degrees float64 // θ, degrees
}

// Phase is a constant carrier phase offset of deg degrees.
func Phase(deg float64) *PhaseOffset { return &PhaseOffset{Degrees: deg} }

// Name is "impair.Phase".
func (b *PhaseOffset) Name() string { return "impair.Phase" }

// Err reports an offset that is not a finite number.
func (b *PhaseOffset) Err() error {
	if !finite(b.Degrees) {
		return fmt.Errorf("impair.Phase: offset %v degrees is not a finite number", b.Degrees)
	}
	return nil
}

// Process rotates the frame; a zero offset leaves it untouched.
func (b *PhaseOffset) Process(f *link.Frame, r *rng.Stream) error {
	if b.Degrees == 0 {
		return nil
	}
	f.MakeComplex(r)
	s, c := math.Sincos(rad(b.Degrees))
	rot := complex(c, s)
	for i := range f.Samples {
		f.Samples[i] *= rot
	}
	return nil
}

// FrequencyOffset is a residual carrier frequency offset: sample n (of SPS per symbol) is
// rotated by 2π·(f·T)·n/SPS, so the phase advances 2π·f·T per symbol. The phase is zero at the
// first sample of each frame; a constant phase is PhaseOffset's job.
type FrequencyOffset struct {
	FT float64 // offset normalised to the symbol rate, f·T (cycles per symbol)
}

// Frequency is a carrier frequency offset of fT cycles per symbol (offset × symbol period).
func Frequency(fT float64) *FrequencyOffset { return &FrequencyOffset{FT: fT} }

// Name is "impair.Frequency".
func (b *FrequencyOffset) Name() string { return "impair.Frequency" }

// Err reports an offset that is not a finite number.
func (b *FrequencyOffset) Err() error {
	if !finite(b.FT) {
		return fmt.Errorf("impair.Frequency: f·T = %v is not a finite number", b.FT)
	}
	return nil
}

// Process rotates the frame by the growing phase; a zero offset leaves it untouched.
func (b *FrequencyOffset) Process(f *link.Frame, r *rng.Stream) error {
	if b.FT == 0 {
		return nil
	}
	f.MakeComplex(r)
	sps := max(f.SPS, 1)
	w := 2 * math.Pi * b.FT / float64(sps)
	for n := range f.Samples {
		// Each phase from n directly (not by a running product) so rounding does not grow.
		s, c := math.Sincos(w * float64(n))
		f.Samples[n] *= complex(c, s)
	}
	return nil
}

// Wiener is carrier phase noise modelled as a Wiener process (a random walk of the phase),
// the usual model of an oscillator or laser with a Lorentzian line of full width Δν at half
// maximum: the phase increment over one symbol period T is Gaussian with variance
//
//	σ² = 2π·Δν·T   (rad², per symbol)
//
// and over one of the SPS samples of a symbol it has variance σ²/SPS, the increments
// independent. The sample is rotated by its phase, y = x·e^{jθ_n}.
//
// The phase starts at zero on every frame (by default): a frame stands for the stretch of
// signal between two phase references (a preamble, pilots), at which a receiver knows the
// carrier phase, so the simulation measures how the phase wanders away from the reference —
// what tracking (blocks/carrier) must follow — and not acquisition. The frame length therefore
// is a model parameter: it is the distance between references. RandomStart draws the
// starting phase uniformly on [0, 2π) instead, for receivers that need no reference
// (differential detection) or resolve the ambiguity themselves.
type Wiener struct {
	Linewidth float64 // Δν·T, linewidth times symbol period (dimensionless)
	Uniform   bool    // starting phase uniform on [0, 2π) rather than zero
}

// PhaseNoise is Wiener phase noise of linewidth × symbol period lwT (Δν·T).
func PhaseNoise(lwT float64) *Wiener { return &Wiener{Linewidth: lwT} }

// RandomStart draws each frame's starting phase uniformly on [0, 2π).
func (b *Wiener) RandomStart() *Wiener { b.Uniform = true; return b }

// Name is "impair.PhaseNoise".
func (b *Wiener) Name() string { return "impair.PhaseNoise" }

// Err reports a negative or non-finite linewidth.
func (b *Wiener) Err() error {
	if !finite(b.Linewidth) || b.Linewidth < 0 {
		return fmt.Errorf("impair.PhaseNoise: Δν·T = %v must be a finite number ≥ 0", b.Linewidth)
	}
	return nil
}

// Increment is the variance of the phase change over one symbol, 2π·Δν·T (rad²).
func (b *Wiener) Increment() float64 { return 2 * math.Pi * b.Linewidth }

// Process rotates each sample by the frame's phase path; zero linewidth with a zero start
// leaves the frame untouched.
func (b *Wiener) Process(f *link.Frame, r *rng.Stream) error {
	if b.Linewidth == 0 && !b.Uniform {
		return nil
	}
	f.MakeComplex(r)
	sps := max(f.SPS, 1)
	sigma := math.Sqrt(b.Increment() / float64(sps))
	theta := 0.0
	if b.Uniform {
		theta = 2 * math.Pi * r.Float64()
	}
	g := r.Rand()
	for n := range f.Samples {
		s, c := math.Sincos(theta)
		f.Samples[n] *= complex(c, s)
		theta += sigma * g.NormFloat64()
	}
	return nil
}

// Nature declares the rotation memoryless to the estimators.
func (b *PhaseOffset) Nature() link.Kind { return link.PerSample }

// NoiseUnchanged says the rotation is linear and keeps the noise variance per dimension.
func (b *PhaseOffset) NoiseUnchanged() {}
