package impair

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Quantiser is a uniform mid-rise quantiser of Bits bits over [−FullScale, +FullScale]: 2^Bits
// levels a step Δ = 2·FullScale/2^Bits apart at ±Δ/2, ±3Δ/2, …, ±(FullScale − Δ/2). Inputs
// beyond full scale clip to the outermost level. With no overload its error is close to
// uniform on ±Δ/2, of power Δ²/12, so a full-scale sine sees SQNR ≈ 6.02·Bits + 1.76 dB.
// Mid-rise keeps the sign of every input, so sign-only decisions (BPSK, QPSK) are unaffected
// by the quantiser; multi-level constellations (QAM) and soft decoders are not.
type Quantiser struct {
	Bits      int     // resolution, 1 … 30
	FullScale float64 // clipping level, > 0
}

// Step is Δ = 2·FullScale/2^Bits.
func (q Quantiser) Step() float64 { return 2 * q.FullScale / float64(uint64(1)<<q.Bits) }

// Level is the quantised value of x.
func (q Quantiser) Level(x float64) float64 {
	d := q.Step()
	top := float64(uint64(1)<<(q.Bits-1)) - 0.5
	k := math.Floor(x/d) + 0.5
	return math.Max(-top, math.Min(top, k)) * d
}

// Converter is an analogue-to-digital converter: it quantises I and Q separately with the same Quantiser.
//
// Gain ahead of the converter: by default an automatic gain control scales the frame so the
// RMS per rail, measured over the frame (signal plus whatever noise is already in it, I and Q
// pooled), sits Loading dB below full scale — the loading factor 20·log10(FullScale/σ) — and
// scales the converter's output back by the same gain, as a digital gain after it would, so
// later blocks see the input's level. FullScale sets a fixed full scale instead (relative to
// the frame's nominal RMS sample amplitude √(Es/SPS), so 1 clips at the nominal RMS) and turns
// the control off.
//
// Bits = 0 is an ideal converter (the identity).
type Converter struct {
	Bits    int     // resolution per rail; 0 switches the converter off
	Loading float64 // AGC loading factor, dB (default 12)
	Scale   float64 // fixed full scale relative to √(Es/SPS); 0 uses the AGC
}

// ADC is a converter of bits bits per rail with the AGC at 12 dB loading, a common choice for
// Gaussian-like signals (common practice, no source); single-carrier QAM tolerates less.
func ADC(bits int) *Converter { return &Converter{Bits: bits, Loading: 12} }

// Load sets the AGC loading factor FullScale/σ in dB.
func (a *Converter) Load(db float64) *Converter { a.Loading = db; a.Scale = 0; return a }

// FullScale fixes the full scale at fs times the nominal RMS sample amplitude (no AGC).
func (a *Converter) FullScale(fs float64) *Converter { a.Scale = fs; return a }

// Name is "impair.ADC".
func (a *Converter) Name() string { return "impair.ADC" }

// Err reports a resolution outside 0 … 30 bits, a non-finite loading or a bad full scale.
func (a *Converter) Err() error {
	switch {
	case a.Bits < 0 || a.Bits > 30:
		return fmt.Errorf("impair.ADC: bits = %d must lie in 0 … 30 (0 is an ideal converter)", a.Bits)
	case !finite(a.Loading):
		return fmt.Errorf("impair.ADC: loading factor %v dB is not a finite number", a.Loading)
	case !finite(a.Scale) || a.Scale < 0:
		return fmt.Errorf("impair.ADC: full scale %v must be positive (or 0 for the AGC)", a.Scale)
	}
	return nil
}

// Process quantises the frame.
func (a *Converter) Process(f *link.Frame, r *rng.Stream) error {
	if a.Bits == 0 || len(f.Samples) == 0 {
		return nil
	}
	f.MakeComplex(r) // the Q rail must carry its noise before it is quantised
	gain := 1.0
	q := Quantiser{Bits: a.Bits, FullScale: 1}
	if a.Scale > 0 {
		q.FullScale = a.Scale * rmsAmplitude(f)
	} else {
		var p float64
		for _, x := range f.Samples {
			p += real(x)*real(x) + imag(x)*imag(x)
		}
		sigma := math.Sqrt(p / float64(2*len(f.Samples)))
		if sigma == 0 {
			return nil
		}
		gain = math.Pow(10, -a.Loading/20) / sigma // σ at 1/loading of full scale 1
	}
	inv := 1 / gain
	for n, x := range f.Samples {
		f.Samples[n] = complex(q.Level(gain*real(x))*inv, q.Level(gain*imag(x))*inv)
	}
	return nil
}

// Nature declares the converter to the estimators: memoryless with a fixed full scale (or
// switched off), adaptive under its gain control, which sets the scale from the noisy frame.
func (a *Converter) Nature() link.Kind {
	if a.Bits == 0 || a.Scale > 0 {
		return link.PerSample
	}
	return link.Adaptive
}
