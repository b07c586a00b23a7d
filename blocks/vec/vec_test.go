package vec

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/cmplxs"
	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/floats"
)

// The checks compare every helper with a plain loop written with math/cmplx (the standard
// library's complex functions), and with gonum's cmplxs and floats packages where they have
// the same operation (gonum.org/v1/gonum v0.17.0). Inputs are random with a fixed seed and
// include zeros, so the corners (0 gain, 0 magnitude) are met.

const n = 257 // odd, not a power of two

func samples(seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 7))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	x[3], x[100] = 0, complex(0, -2)
	return x
}

func reals(seed uint64) []float64 {
	r := rand.New(rand.NewPCG(seed, 9))
	x := make([]float64, n)
	for i := range x {
		x[i] = 4 * r.NormFloat64()
	}
	x[5] = 0
	return x
}

// near reports whether a and b agree to a few ulps of their size.
func near(a, b complex128) bool {
	return cmplx.Abs(a-b) <= 1e-13*(1+cmplx.Abs(a)+cmplx.Abs(b))
}

func nearF(a, b float64) bool { return math.Abs(a-b) <= 1e-13*(1+math.Abs(a)+math.Abs(b)) }

func same(t *testing.T, what string, got, want []complex128) {
	t.Helper()
	for i := range want {
		if !near(got[i], want[i]) {
			t.Fatalf("%s[%d] = %v, want %v", what, i, got[i], want[i])
		}
	}
}

func sameF(t *testing.T, what string, got, want []float64) {
	t.Helper()
	for i := range want {
		if !nearF(got[i], want[i]) {
			t.Fatalf("%s[%d] = %v, want %v", what, i, got[i], want[i])
		}
	}
}

func TestArithmeticAgainstLoopsAndGonum(t *testing.T) {
	x, y := samples(1), samples(2)
	a := complex(0.3, -1.7)
	dst := make([]complex128, n)
	want := make([]complex128, n)

	Scale(dst, x, a)
	for i := range x {
		want[i] = a * x[i]
	}
	same(t, "Scale", dst, want)
	same(t, "Scale vs cmplxs.ScaleTo", dst, cmplxs.ScaleTo(make([]complex128, n), a, x))

	ScaleReal(dst, x, -2.5)
	same(t, "ScaleReal vs cmplxs.ScaleRealTo", dst, cmplxs.ScaleRealTo(make([]complex128, n), -2.5, x))

	Add(dst, x, y)
	same(t, "Add vs cmplxs.AddTo", dst, cmplxs.AddTo(make([]complex128, n), x, y))
	Sub(dst, x, y)
	same(t, "Sub vs cmplxs.SubTo", dst, cmplxs.SubTo(make([]complex128, n), x, y))
	AddScaled(dst, x, a, y)
	same(t, "AddScaled vs cmplxs.AddScaledTo", dst, cmplxs.AddScaledTo(make([]complex128, n), x, a, y))
	Mul(dst, x, y)
	same(t, "Mul vs cmplxs.MulTo", dst, cmplxs.MulTo(make([]complex128, n), x, y))
	MulConj(dst, x, y)
	same(t, "MulConj vs cmplxs.MulConjTo", dst, cmplxs.MulConjTo(make([]complex128, n), x, y))
	for i := range x {
		want[i] = x[i] * cmplx.Conj(y[i])
	}
	same(t, "MulConj", dst, want)
	y[7] = 0
	Div(dst, x, y)
	for i := range x {
		if i == 7 || (cmplx.IsNaN(dst[i]) && cmplx.IsNaN(x[i]/y[i])) {
			continue
		}
		if !near(dst[i], x[i]/y[i]) {
			t.Fatalf("Div[%d] = %v, want %v", i, dst[i], x[i]/y[i])
		}
	}
	if !cmplx.IsNaN(dst[7]) && !cmplx.IsInf(dst[7]) {
		t.Errorf("Div by 0 = %v, want Inf or NaN as Go's division gives", dst[7])
	}
	Conj(dst, x)
	for i := range x {
		want[i] = cmplx.Conj(x[i])
	}
	same(t, "Conj", dst, want)
	Fill(dst, a)
	for i := range dst {
		if dst[i] != a {
			t.Fatalf("Fill[%d] = %v", i, dst[i])
		}
	}
}

func TestMagnitudesAgainstMathCmplx(t *testing.T) {
	x := samples(3)
	d := make([]float64, n)
	want := make([]float64, n)

	Abs(d, x)
	for i := range x {
		want[i] = cmplx.Abs(x[i])
	}
	sameF(t, "Abs", d, want)
	g := make([]float64, n)
	cmplxs.Abs(g, x)
	sameF(t, "Abs vs cmplxs.Abs", d, g)

	Power(d, x)
	for i := range x {
		want[i] = cmplx.Abs(x[i]) * cmplx.Abs(x[i])
	}
	sameF(t, "Power", d, want)

	Phase(d, x)
	for i := range x {
		want[i] = cmplx.Phase(x[i])
	}
	sameF(t, "Phase", d, want)

	Real(d, x)
	sameF(t, "Real vs cmplxs.Real", d, cmplxs.Real(make([]float64, n), x))
	Imag(d, x)
	sameF(t, "Imag vs cmplxs.Imag", d, cmplxs.Imag(make([]float64, n), x))
}

// Clip keeps the phase and limits the magnitude: the plain loop is cmplx.Rect(min(|x|, l), arg x).
func TestClip(t *testing.T) {
	x := samples(4)
	const limit = 1.1
	dst := make([]complex128, n)
	Clip(dst, x, limit)
	clipped := 0
	for i, v := range x {
		want := v
		if cmplx.Abs(v) > limit {
			want = cmplx.Rect(limit, cmplx.Phase(v))
			clipped++
		}
		if !near(dst[i], want) {
			t.Fatalf("Clip[%d] = %v, want %v", i, dst[i], want)
		}
	}
	if clipped < n/4 || clipped == n {
		t.Fatalf("the test clips %d of %d samples; it should clip some and pass some", clipped, n)
	}
	Clip(x, x, 0) // in place, to zero
	if MaxAbs(x) != 0 {
		t.Errorf("Clip to 0 left a peak of %v", MaxAbs(x))
	}
	defer func() {
		if recover() == nil {
			t.Error("Clip with a negative limit did not panic")
		}
	}()
	Clip(dst, dst, -1)
}

// Rotate and Ramp against x·cmplx.Exp(jθ).
func TestRotations(t *testing.T) {
	x := samples(5)
	dst := make([]complex128, n)
	Rotate(dst, x, 0.7)
	want := make([]complex128, n)
	for i := range x {
		want[i] = x[i] * cmplx.Exp(complex(0, 0.7))
	}
	same(t, "Rotate", dst, want)

	const phase, step = -1.3, 2 * math.Pi * 0.013
	Ramp(dst, x, phase, step)
	for i := range x {
		want[i] = x[i] * cmplx.Exp(complex(0, phase+float64(i)*step))
	}
	same(t, "Ramp", dst, want)
	// A ramp and its reverse give x back; magnitudes never change.
	Ramp(dst, dst, -phase, -step)
	same(t, "Ramp undone", dst, x)
}

// FIR against the direct sum and against a convolution by gonum's FFT (zero-padded to the
// full length, so circular convolution equals linear convolution there).
func TestFIR(t *testing.T) {
	x := samples(6)
	h := []complex128{1, complex(0.5, -0.2), 0, complex(-0.1, 0.3), 0.05}
	dst := make([]complex128, n)
	FIR(dst, x, h)
	want := make([]complex128, n)
	for i := range x {
		for k := range h {
			if i-k >= 0 {
				want[i] += h[k] * x[i-k]
			}
		}
	}
	same(t, "FIR", dst, want)

	m := n + len(h) - 1
	fft := fourier.NewCmplxFFT(m)
	xp, hp := make([]complex128, m), make([]complex128, m)
	copy(xp, x)
	copy(hp, h)
	X, H := fft.Coefficients(nil, xp), fft.Coefficients(nil, hp)
	for i := range X {
		X[i] *= H[i]
	}
	conv := fft.Sequence(nil, X)
	for i := range conv {
		conv[i] /= complex(float64(m), 0) // gonum's inverse is unnormalised
	}
	for i := range n {
		if cmplx.Abs(dst[i]-conv[i]) > 1e-12 {
			t.Fatalf("FIR[%d] = %v, FFT convolution %v", i, dst[i], conv[i])
		}
	}

	in := append([]complex128(nil), x...)
	FIR(in, in, h)
	same(t, "FIR in place", in, dst)

	hr := []float64{0.25, 0.5, 0.25}
	FIRReal(dst, x, hr)
	FIR(want, x, []complex128{0.25, 0.5, 0.25})
	same(t, "FIRReal", dst, want)
	copy(in, x)
	FIRReal(in, in, hr)
	same(t, "FIRReal in place", in, want)

	FIR(dst, x, nil)
	if Energy(dst) != 0 {
		t.Error("FIR with no taps is not zero")
	}
}

func TestMasksAndSelect(t *testing.T) {
	a, b := reals(1), reals(2)
	b[11] = a[11] // a tie is not greater
	mask := make([]byte, n)
	Greater(mask, a, b)
	x, y := samples(7), samples(8)
	dst := make([]complex128, n)
	Select(dst, mask, x, y)
	fd := make([]float64, n)
	SelectFloats(fd, mask, a, b)
	ones := 0
	for i := range mask {
		want, wantF := y[i], b[i]
		if a[i] > b[i] {
			want, wantF = x[i], a[i]
			ones++
		}
		if dst[i] != want || fd[i] != wantF || (mask[i] == 1) != (a[i] > b[i]) {
			t.Fatalf("at %d: mask %d, Select %v (want %v), SelectFloats %v (want %v)", i, mask[i], dst[i], want, fd[i], wantF)
		}
	}
	if Count(mask) != ones || mask[11] != 0 {
		t.Errorf("Count = %d, want %d; tie mask %d", Count(mask), ones, mask[11])
	}
	Above(mask, a, 1)
	if got, want := Count(mask), floats.Count(func(v float64) bool { return v > 1 }, a); got != want {
		t.Errorf("Above counts %d, floats.Count %d", got, want)
	}
}

func TestReductionsAgainstGonum(t *testing.T) {
	x, y := samples(9), samples(10)
	if got, want := Sum(x), cmplxs.Sum(x); !near(got, want) {
		t.Errorf("Sum = %v, cmplxs.Sum %v", got, want)
	}
	if got, want := Dot(x, y), cmplxs.Dot(x, y); !near(got, want) {
		t.Errorf("Dot = %v, cmplxs.Dot %v", got, want)
	}
	if got, want := Norm(x), cmplxs.Norm(x, 2); !nearF(got, want) {
		t.Errorf("Norm = %v, cmplxs.Norm %v", got, want)
	}
	if got, want := Energy(x), real(cmplxs.Dot(x, x)); !nearF(got, want) {
		t.Errorf("Energy = %v, Dot(x, x) %v", got, want)
	}
	if got, want := MeanPower(x), Energy(x)/n; got != want || MeanPower(nil) != 0 {
		t.Errorf("MeanPower = %v, want %v", got, want)
	}
	if got, want := MaxAbs(x), cmplx.Abs(cmplxs.MaxAbs(x)); !nearF(got, want) {
		t.Errorf("MaxAbs = %v, cmplxs.MaxAbs %v", got, want)
	}
}

func TestFloatsAgainstGonum(t *testing.T) {
	a, b := reals(3), reals(4)
	d := make([]float64, n)
	ScaleFloats(d, a, -0.75)
	sameF(t, "ScaleFloats vs floats.ScaleTo", d, floats.ScaleTo(make([]float64, n), -0.75, a))
	AddFloats(d, a, b)
	sameF(t, "AddFloats vs floats.AddTo", d, floats.AddTo(make([]float64, n), a, b))
	MulFloats(d, a, b)
	sameF(t, "MulFloats vs floats.MulTo", d, floats.MulTo(make([]float64, n), a, b))
	if got, want := SumFloats(a), floats.Sum(a); !nearF(got, want) {
		t.Errorf("SumFloats = %v, floats.Sum %v", got, want)
	}
	if got, want := NormFloats(a), floats.Norm(a, 2); !nearF(got, want) {
		t.Errorf("NormFloats = %v, floats.Norm %v", got, want)
	}
	ClipFloats(d, a, 3)
	for i, v := range a {
		if want := math.Max(-3, math.Min(3, v)); d[i] != want {
			t.Fatalf("ClipFloats[%d] = %v, want %v", i, d[i], want)
		}
	}
	bits := make([]byte, n)
	Signs(bits, a)
	for i, v := range a {
		if (bits[i] == 1) != (v < 0) || bits[i] > 1 {
			t.Fatalf("Signs[%d] = %d for LLR %v", i, bits[i], v)
		}
	}
}

// Combine is Brennan's maximum-ratio combiner; with no noise it returns the sent samples,
// and its output SNR is the sum of the branches' (GainPower).
func TestCombine(t *testing.T) {
	s, g1, g2 := samples(11), samples(12), samples(13)
	g1[20], g2[20] = 0, 0
	g1[21] = 0
	y1, y2 := make([]complex128, n), make([]complex128, n)
	Mul(y1, s, g1)
	Mul(y2, s, g2)
	dst := make([]complex128, n)
	Combine(dst, y1, g1, y2, g2)
	for i := range s {
		want := s[i]
		if i == 20 {
			want = 0
		}
		if !near(dst[i], want) {
			t.Fatalf("Combine[%d] = %v, want %v", i, dst[i], want)
		}
	}
	// Against the formula written with math/cmplx, on noisy branches.
	n1, n2 := samples(14), samples(15)
	Add(y1, y1, n1)
	Add(y2, y2, n2)
	Combine(dst, y1, g1, y2, g2)
	p := make([]float64, n)
	GainPower(p, g1, g2)
	for i := range s {
		pw := cmplx.Abs(g1[i])*cmplx.Abs(g1[i]) + cmplx.Abs(g2[i])*cmplx.Abs(g2[i])
		if !nearF(p[i], pw) {
			t.Fatalf("GainPower[%d] = %v, want %v", i, p[i], pw)
		}
		if pw == 0 {
			continue
		}
		want := (cmplx.Conj(g1[i])*y1[i] + cmplx.Conj(g2[i])*y2[i]) / complex(pw, 0)
		if !near(dst[i], want) {
			t.Fatalf("Combine[%d] = %v, want %v", i, dst[i], want)
		}
	}
	// Selection: the stronger branch, its gain divided out.
	Choose(dst, y1, g1, y2, g2)
	for i := range s {
		var want complex128
		switch {
		case g1[i] == 0 && g2[i] == 0:
		case cmplx.Abs(g2[i]) > cmplx.Abs(g1[i]):
			want = y2[i] / g2[i]
		default:
			want = y1[i] / g1[i]
		}
		if !near(dst[i], want) {
			t.Fatalf("Choose[%d] = %v, want %v", i, dst[i], want)
		}
	}
}

// Every function writes in place when dst is an input.
func TestInPlace(t *testing.T) {
	x, y := samples(16), samples(17)
	want := make([]complex128, n)
	for _, c := range []struct {
		name string
		f    func(dst, x, y []complex128)
	}{
		{"Add", Add}, {"Sub", Sub}, {"Mul", Mul}, {"MulConj", MulConj},
		{"Scale", func(d, x, _ []complex128) { Scale(d, x, 2i) }},
		{"Rotate", func(d, x, _ []complex128) { Rotate(d, x, 1) }},
		{"Ramp", func(d, x, _ []complex128) { Ramp(d, x, 1, 0.1) }},
		{"Clip", func(d, x, _ []complex128) { Clip(d, x, 1) }},
		{"Combine", func(d, x, y []complex128) { Combine(d, x, y, y, x) }},
	} {
		c.f(want, x, y)
		got := append([]complex128(nil), x...)
		c.f(got, got, y)
		same(t, c.name+" in place (dst = x)", got, want)
		got = append([]complex128(nil), y...)
		c.f(want, x, y)
		c.f(got, x, got)
		same(t, c.name+" in place (dst = y)", got, want)
	}
}

func TestLengthMismatchPanicsWithName(t *testing.T) {
	defer func() {
		v := recover()
		if s, _ := v.(string); s != "vec.Mul: an input has 3 values, dst 4 (they must be the same length)" {
			t.Errorf("panic %v", v)
		}
	}()
	Mul(make([]complex128, 4), make([]complex128, 4), make([]complex128, 3))
}

func TestNoAllocation(t *testing.T) {
	x, y := samples(18), samples(19)
	d := make([]complex128, n)
	p := make([]float64, n)
	h := []complex128{1, 0.5}
	if a := testing.AllocsPerRun(10, func() {
		Mul(d, x, y)
		Combine(d, x, y, y, x)
		FIR(d, d, h)
		Ramp(d, d, 0, 0.1)
		Power(p, d)
		_ = Energy(d)
	}); a != 0 {
		t.Errorf("%v allocations per run", a)
	}
}

func BenchmarkCombine(b *testing.B) {
	x, y := make([]complex128, 8192), make([]complex128, 8192)
	for i := range x {
		x[i], y[i] = complex(float64(i), 1), complex(1, float64(i))
	}
	d := make([]complex128, 8192)
	for b.Loop() {
		Combine(d, x, y, y, x)
	}
}
