package modem

import (
	"fmt"
	"math"
	"math/cmplx"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// LLRMethod says which soft output a detector gives.
type LLRMethod int

// The soft outputs.
const (
	NoLLR     LLRMethod = iota // hard decisions only
	LogMAPLLR                  // exact: log of sums of the likelihoods of all points
	MaxLogLLR                  // max-log: each sum replaced by its largest term
)

// Detector is a modem's demodulator block. It sets f.Hard, one decision per coded bit, and
// with a soft output f.LLR = log P(b=0 | y)/P(b=1 | y) from the frame's N0.
//
// Hard decisions are maximum likelihood per symbol: nearest point, found by slicing each axis
// for PAM and QAM, by the phase sector for PSK. With a soft output the hard decisions are the
// signs of the LLRs (LLR < 0 → 1): for max-log these are the same nearest-point decisions, for
// log-MAP the bitwise MAP decisions, which may differ in rare low-SNR cases.
//
// LLRs of the coherent schemes: with points s and likelihoods exp(−|y − s|²/N0) (complex noise
// of variance N0/2 per dimension; the same per axis for real schemes),
//
//	log-MAP  LLR = log Σ_{s: b=0} e^{−|y−s|²/N0} − log Σ_{s: b=1} e^{−|y−s|²/N0},
//	max-log  LLR = (min_{s: b=1} |y−s|² − min_{s: b=0} |y−s|²) / N0,
//
// per axis for PAM and square QAM (exact, since the likelihood factors over I and Q); for BPSK
// both are 4y/N0 = 2y/σ². The noncoherent schemes (DBPSK, DQPSK, BFSKNoncoherent) average over
// an unknown phase, which gives log I0(2|⟨y, u⟩|/N0) per hypothesis u (log-MAP) or 2|⟨y, u⟩|/N0
// (max-log, log I0(x) ≈ x).
//
// With CSI the coherent detectors use f.Gain[i], the complex gain a fading channel applied to
// symbol i (blocks/channel's convention, one gain per symbol): the observation y = g·s + n is
// derotated and scaled, z = y/g, whose noise has density N0/|g|², and the LLRs use that
// density (a symbol with g = 0 gives LLR 0). Use it instead of channel.KnownGain, which
// divides the samples but leaves f.N0 as it was. BFSK takes one gain per symbol (both tones)
// or one per tone sample, and weighs the tones by their gains: the LLR is
// (2Re(y0·g0*) − |g0|² − 2Re(y1·g1*) + |g1|²)/N0.
type Detector struct {
	m    *Modem
	Soft LLRMethod // soft output; NoLLR by default
	// UseGain makes the detector use the channel gain f.Gain (perfect channel knowledge).
	UseGain bool

	err  error
	hard []byte
	llr  []float64
	flip []float64    // semi-analytic flip probabilities (estimate.go)
	z    []complex128 // derotated samples (CSI)
	n0s  []float64    // per-sample noise density (CSI)
	m1   []float64    // metric scratch, one per point
	m2   []float64
}

// Demod is the modem's detector, hard decisions only by default.
func (m *Modem) Demod() *Detector {
	n := max(m.M, 4)
	return &Detector{m: m, m1: make([]float64, n), m2: make([]float64, n)}
}

// LogMAP asks for exact LLRs.
func (d *Detector) LogMAP() *Detector { d.Soft = LogMAPLLR; return d }

// MaxLog asks for max-log LLRs.
func (d *Detector) MaxLog() *Detector { d.Soft = MaxLogLLR; return d }

// CSI makes a coherent detector use the channel gain the channel reports in f.Gain (perfect
// channel state information). The noncoherent detectors do not offer it.
func (d *Detector) CSI() *Detector {
	d.UseGain = true
	switch d.m.kind {
	case kindDBPSK, kindDQPSK, kindNCFSK:
		d.err = fmt.Errorf("%s.Demod: CSI is for coherent detectors; %s detects without the channel phase", d.m.name, d.m.Scheme)
	}
	return d
}

// Name is the modem's name with ".Demod", for example "modem.QAM(16).Demod".
func (d *Detector) Name() string { return d.m.name + ".Demod" }

// Err reports the modem's parameter error or an option it does not offer.
func (d *Detector) Err() error {
	if d.m.err != nil {
		return d.m.err
	}
	return d.err
}

// Process decides the frame's samples.
func (d *Detector) Process(f *link.Frame, r *rng.Stream) error {
	if err := d.Err(); err != nil {
		return err
	}
	m := d.m
	sps := 1
	if m.kind == kindFSK || m.kind == kindNCFSK {
		sps = 2
	}
	if f.SPS != sps || len(f.Samples)%sps != 0 {
		return fmt.Errorf("expects %d sample(s) per symbol, the frame has SPS = %d (a matched filter and sampler belong before the detector)", sps, f.SPS)
	}
	ns := len(f.Samples) / sps
	nb := ns * m.Bits
	if m.kind == kindDBPSK || m.kind == kindDQPSK || m.kind == kindDEBPSK || m.kind == kindDEQPSK {
		if ns == 0 {
			return fmt.Errorf("no reference symbol in an empty frame")
		}
		nb = (ns - 1) * m.Bits
	}
	soft := d.Soft != NoLLR
	if soft && !(f.N0 > 0) {
		return fmt.Errorf("soft output needs the noise density N0 of a channel (the frame has N0 = %v)", f.N0)
	}
	d.hard = link.GrowBytes(d.hard, nb)
	if soft {
		d.llr = link.GrowFloats(d.llr, nb)
	} else {
		d.llr = d.llr[:0]
	}
	y := f.Samples
	switch {
	case d.UseGain && sps == 2:
		// BFSK: one gain per tone sample, or one per symbol for both tones.
		if len(f.Gain) != len(y) && len(f.Gain) != ns {
			return fmt.Errorf("CSI needs one channel gain per symbol or per sample (f.Gain has %d for %d symbols; is a fading channel in the link?)", len(f.Gain), ns)
		}
	case d.UseGain:
		if err := d.derotate(f, r); err != nil {
			return err
		}
		y = d.z
	}
	exact := d.Soft == LogMAPLLR
	switch m.kind {
	case kindAxis:
		d.axisDetect(f, y, soft, exact)
	case kindPSK:
		d.pskDetect(f, y, soft, exact)
	case kindOOK:
		d.ookDetect(f, y, soft)
	case kindFSK:
		d.fskDetect(f, soft)
	case kindDEBPSK, kindDEQPSK:
		d.deDetect(f, y, soft, exact)
	case kindDBPSK, kindDQPSK, kindNCFSK:
		f.MakeComplex(r) // these detectors use both dimensions of a real signal's noise
		switch m.kind {
		case kindDBPSK:
			d.dbpskDetect(f.Samples, f.N0, soft, exact)
		case kindDQPSK:
			d.dqpskDetect(f.Samples, f.N0, soft, exact)
		default:
			d.ncfskDetect(f.Samples, f.N0, soft, exact)
		}
	}
	f.Hard = d.hard
	if soft {
		f.LLR = d.llr
	}
	if f.Estimator == link.SemiAnalytic && m.kind == kindAxis {
		return d.flips(f, y)
	}
	return nil
}

// derotate divides each sample by its gain into d.z and records the per-sample noise density
// N0/|g|² in d.n0s. (BFSK does not come here: its detector uses the gains directly.)
func (d *Detector) derotate(f *link.Frame, r *rng.Stream) error {
	n := len(f.Samples)
	if len(f.Gain) != n {
		return fmt.Errorf("CSI needs one channel gain per sample (f.Gain has %d for %d samples; is a fading channel in the link?)", len(f.Gain), n)
	}
	f.MakeComplex(r) // derotation mixes I and Q
	d.z = link.GrowComplex(d.z, n)
	d.n0s = link.GrowFloats(d.n0s, n)
	for i, g := range f.Gain {
		p := real(g)*real(g) + imag(g)*imag(g)
		if p == 0 {
			d.z[i], d.n0s[i] = 0, math.Inf(1)
			continue
		}
		d.z[i] = f.Samples[i] / g
		d.n0s[i] = f.N0 / p
	}
	return nil
}

// n0At is the noise density of sample i: per sample with CSI, else the frame's.
func (d *Detector) n0At(f *link.Frame, i int) float64 {
	if d.UseGain {
		return d.n0s[i]
	}
	return f.N0
}

func (d *Detector) axisDetect(f *link.Frame, y []complex128, soft, exact bool) {
	m := d.m
	a := &m.axis
	h, k := a.bits, m.Bits
	switch {
	case !soft && m.axes == 1 && a.L == 2: // BPSK, branch-free
		for i, v := range y {
			d.hard[i] = sign(real(v))
		}
	case !soft && m.axes == 2 && a.L == 2: // QPSK
		for i, v := range y {
			d.hard[2*i] = sign(real(v))
			d.hard[2*i+1] = sign(imag(v))
		}
	case !soft && m.axes == 2 && a.L == 4: // 16-QAM, branch-free: per axis the sign, then |x| against 2d
		t := 2 * a.d
		for i, v := range y {
			b := d.hard[4*i : 4*i+4 : 4*i+4]
			b[0], b[1] = sign(real(v)), sign(math.Abs(real(v))-t)
			b[2], b[3] = sign(imag(v)), sign(math.Abs(imag(v))-t)
		}
	case !soft && a.L == 8: // 64-QAM, 8-PAM
		c := (*[7]float64)(a.cuts)
		for i, v := range y {
			decide8(real(v), c, d.hard[i*k:i*k+h])
			if m.axes == 2 {
				decide8(imag(v), c, d.hard[i*k+h:i*k+k])
			}
		}
	case !soft && a.L == 16: // 256-QAM, 16-PAM
		c := (*[15]float64)(a.cuts)
		for i, v := range y {
			decide16(real(v), c, d.hard[i*k:i*k+h])
			if m.axes == 2 {
				decide16(imag(v), c, d.hard[i*k+h:i*k+k])
			}
		}
	case !soft:
		for i, v := range y {
			a.decide(real(v), d.hard[i*k:i*k+h])
			if m.axes == 2 {
				a.decide(imag(v), d.hard[i*k+h:i*k+k])
			}
		}
	default:
		for i, v := range y {
			n0 := d.n0At(f, i)
			if math.IsInf(n0, 1) {
				clear(d.llr[i*k : i*k+k])
				continue
			}
			a.llr(real(v), n0, d.llr[i*k:i*k+h], d.m1, d.m2, exact)
			if m.axes == 2 {
				a.llr(imag(v), n0, d.llr[i*k+h:i*k+k], d.m1, d.m2, exact)
			}
		}
		hardFromLLR(d.hard, d.llr)
	}
}

// hardFromLLR sets each decision to 1 where the LLR is negative.
func hardFromLLR(hard []byte, llr []float64) {
	for i, v := range llr {
		hard[i] = sign(v)
	}
}

func (d *Detector) pskDetect(f *link.Frame, y []complex128, soft, exact bool) {
	m := d.m
	k, M := m.Bits, m.M
	step := float64(M) / (2 * math.Pi)
	if !soft {
		for i, v := range y {
			p := int(math.Floor(math.Atan2(imag(v), real(v))*step+0.5)) & (M - 1) // M is a power of two
			putLabel(d.hard[i*k:i*k+k], int(m.ring[p]))
		}
		return
	}
	met := d.m1[:M]
	for i, v := range y {
		n0 := d.n0At(f, i)
		if math.IsInf(n0, 1) {
			clear(d.llr[i*k : i*k+k])
			continue
		}
		// −|y − s|²/N0 up to a constant: 2·Re(y·conj(s))/N0, |s| = 1.
		for l, s := range m.points {
			met[l] = 2 * (real(v)*real(s) + imag(v)*imag(s)) / n0
		}
		bitLLRs(met, d.m2[:M], identity[:M], k, d.llr[i*k:i*k+k], exact)
	}
	hardFromLLR(d.hard, d.llr)
}

// identity[l] = l: the labels of a constellation indexed by label.
var identity = func() []uint16 {
	v := make([]uint16, 1024)
	for i := range v {
		v[i] = uint16(i)
	}
	return v
}()

func (d *Detector) ookDetect(f *link.Frame, y []complex128, soft bool) {
	const a = math.Sqrt2
	if !soft {
		for i, v := range y {
			d.hard[i] = sign(a/2 - real(v)) // 1 above the midpoint
		}
		return
	}
	for i, v := range y {
		n0 := d.n0At(f, i)
		if math.IsInf(n0, 1) {
			d.llr[i] = 0
			continue
		}
		// log(e^{−x²/N0} / e^{−(x−a)²/N0}) = (a² − 2ax)/N0, exact.
		d.llr[i] = (a*a - 2*a*real(v)) / n0
	}
	hardFromLLR(d.hard, d.llr)
}

func (d *Detector) fskDetect(f *link.Frame, soft bool) {
	y := f.Samples
	ns := len(y) / 2
	if !d.UseGain && !soft {
		for i := range ns {
			d.hard[i] = sign(real(y[2*i]) - real(y[2*i+1]))
		}
		return
	}
	for i := range ns {
		y0, y1 := y[2*i], y[2*i+1]
		g0, g1 := complex(1, 0), complex(1, 0)
		switch {
		case d.UseGain && len(f.Gain) == ns:
			g0, g1 = f.Gain[i], f.Gain[i]
		case d.UseGain:
			g0, g1 = f.Gain[2*i], f.Gain[2*i+1]
		}
		// log p(y | 0)/p(y | 1) with p(y | b) ∝ exp(−|y0 − g0·[b=0]|²/N0 − |y1 − g1·[b=1]|²/N0).
		l := (2*real(y0*cmplx.Conj(g0)) - abs2(g0) - 2*real(y1*cmplx.Conj(g1)) + abs2(g1)) / f.N0
		if soft {
			d.llr[i] = l
		}
		d.hard[i] = sign(l)
	}
}

func abs2(c complex128) float64 { return real(c)*real(c) + imag(c)*imag(c) }

// metricNC is the noncoherent log-likelihood of a hypothesis whose correlation with the
// observation is c: log I0(2|c|/N0) for log-MAP, 2|c|/N0 for max-log.
func metricNC(c complex128, n0 float64, exact bool) float64 {
	x := 2 * cmplx.Abs(c) / n0
	if exact {
		return logI0(x)
	}
	return x
}

func (d *Detector) dbpskDetect(y []complex128, n0 float64, soft, exact bool) {
	for i := range d.hard {
		a, b := y[i], y[i+1]
		if !soft {
			d.hard[i] = sign(real(b)*real(a) + imag(b)*imag(a)) // Re(b·conj(a))
			continue
		}
		// Hypotheses over the pair: (1, 1) for bit 0 and (1, −1) for bit 1, unknown phase.
		d.llr[i] = metricNC(a+b, n0, exact) - metricNC(a-b, n0, exact)
	}
	if soft {
		hardFromLLR(d.hard, d.llr)
	}
}

// rot45 is e^{jπ/4}.
var rot45 = complex(math.Sqrt2/2, math.Sqrt2/2)

func (d *Detector) dqpskDetect(y []complex128, n0 float64, soft, exact bool) {
	ns := len(y) - 1
	met := d.m1[:4]
	for i := range ns {
		a, b := y[i], y[i+1]
		if !soft {
			z := b * cmplx.Conj(a) * rot45
			d.hard[2*i] = sign(imag(z))
			d.hard[2*i+1] = sign(real(z))
			continue
		}
		// Hypothesis with label l: (1, j^q), q = grayInv[l]; correlation a + b·j^{−q}.
		for l := range 4 {
			met[l] = metricNC(a+b*cmplx.Conj(quarter[grayInv[l]]), n0, exact)
		}
		bitLLRs(met, d.m2[:4], identity[:4], 2, d.llr[2*i:2*i+2], exact)
	}
	if soft {
		hardFromLLR(d.hard, d.llr)
	}
}

func (d *Detector) ncfskDetect(y []complex128, n0 float64, soft, exact bool) {
	for i := range d.hard {
		y0, y1 := y[2*i], y[2*i+1]
		if !soft {
			d.hard[i] = sign(abs2(y0) - abs2(y1))
			continue
		}
		d.llr[i] = metricNC(y0, n0, exact) - metricNC(y1, n0, exact)
	}
	if soft {
		hardFromLLR(d.hard, d.llr)
	}
}
