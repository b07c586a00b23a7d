package fec_test

import (
	"math"
	"math/bits"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

// spectrum enumerates the error events of a rate-1/2 feedforward code from its definition
// (register = input bit above the K−1 previous ones, output = parity of register & generator):
// paths leaving the zero state and first returning to it, by output weight up to dmax, with
// their number a[d] and total input weight b[d].
func spectrum(k, g0, g1, dmax int) (a, b []float64) {
	m := k - 1
	states := 1 << m
	a, b = make([]float64, dmax+1), make([]float64, dmax+1)
	type cell struct{ n, info float64 }
	cur := make([][]cell, states)
	next := make([][]cell, states)
	for s := range cur {
		cur[s], next[s] = make([]cell, dmax+1), make([]cell, dmax+1)
	}
	out := func(reg int) int { return bits.OnesCount(uint(reg&g0))&1 + bits.OnesCount(uint(reg&g1))&1 }
	// Leave the zero state with a 1.
	if w := out(1 << m); w <= dmax {
		cur[1<<m>>1][w] = cell{1, 1}
	}
	for live := true; live; {
		live = false
		for s := range next {
			clear(next[s])
		}
		for s := 1; s < states; s++ {
			for w, c := range cur[s] {
				if c.n == 0 {
					continue
				}
				for in := 0; in < 2; in++ {
					reg := in<<m | s
					nw, ns := w+out(reg), reg>>1
					if nw > dmax {
						continue
					}
					if ns == 0 {
						a[nw] += c.n
						b[nw] += c.info
						continue
					}
					next[ns][nw].n += c.n
					next[ns][nw].info += c.info + float64(in)*c.n
					live = true
				}
			}
		}
		cur, next = next, cur
	}
	return a, b
}

func TestConvMotherMatchesDefinition(t *testing.T) {
	// The encoder against the register definition used by spectrum (Proakis, Digital
	// Communications, 4th ed., 2001, §8.2: generator MSB taps the current input).
	c := fec.Conv()
	r := rng.New(1)
	msg := make([]byte, 200)
	r.Bits(msg)
	got := c.Mother(msg)
	state := 0
	for i := 0; i < len(msg)+6; i++ {
		in := 0
		if i < len(msg) {
			in = int(msg[i])
		}
		reg := in<<6 | state
		a := byte(bits.OnesCount(uint(reg&0o133)) & 1)
		b := byte(bits.OnesCount(uint(reg&0o171)) & 1)
		if got[2*i] != a || got[2*i+1] != b {
			t.Fatalf("step %d: encoder gives %d%d, definition %d%d", i, got[2*i], got[2*i+1], a, b)
		}
		state = reg >> 1
	}
	// Impulse response: weights of the generators, 5 + 5 = 10 = free distance.
	w := 0
	for _, x := range c.Mother([]byte{1}) {
		w += int(x)
	}
	if w != 10 {
		t.Errorf("impulse response weight %d, want 10", w)
	}
}

func TestConvK7Spectrum(t *testing.T) {
	// Free distance 10 of the K = 7, 133/171 code: Proakis, Digital Communications, 4th ed.,
	// 2001, Table 8.2-1. The event counts and bit weights: theory.ConvK7 (from memory).
	a, b := spectrum(7, 0o133, 0o171, 22)
	free := 0
	for d := range a {
		if a[d] > 0 {
			free = d
			break
		}
	}
	if free != 10 {
		t.Fatalf("free distance %d, want 10", free)
	}
	for i := range theory.ConvK7.A {
		d := 10 + i
		if d >= len(a) {
			break
		}
		if a[d] != theory.ConvK7.A[i] || b[d] != theory.ConvK7.B[i] {
			t.Errorf("d = %d: %v events of bit weight %v, table %v, %v", d, a[d], b[d], theory.ConvK7.A[i], theory.ConvK7.B[i])
		}
	}
}

func TestConvK3Spectrum(t *testing.T) {
	// The K = 3, (5, 7) code has transfer function T(D, N) = D⁵N/(1 − 2DN) (Viterbi, "Convolutional
	// codes and their performance in communication systems", IEEE Trans. Commun. Technol., 1971;
	// Proakis §8.2-1): a_d = 2^(d−5) events, bit weight b_d = (d − 4)·2^(d−5).
	a, b := spectrum(3, 0o5, 0o7, 16)
	for d := 0; d <= 16; d++ {
		wa, wb := 0.0, 0.0
		if d >= 5 {
			wa, wb = float64(int(1)<<(d-5)), float64((d-4)*(1<<(d-5)))
		}
		if a[d] != wa || b[d] != wb {
			t.Errorf("d = %d: %v events, bit weight %v; want %v, %v", d, a[d], b[d], wa, wb)
		}
	}
}

// decodeHard runs the decoder on one frame of hard decisions.
func decodeHard(t testing.TB, dec *fec.Viterbi, hard []byte) []byte {
	f := &link.Frame{Hard: hard, CodeRate: 1}
	if err := dec.Process(f, nil); err != nil {
		t.Fatal(err)
	}
	return f.Out
}

func TestViterbiCorrectsFourErrors(t *testing.T) {
	// Free distance 10 (Proakis Table 8.2-1): a maximum-likelihood decoder of the terminated
	// code corrects every pattern of up to ⌊(10−1)/2⌋ = 4 errors. Exhaustive on 10 bits (32 code
	// bits, 41 449 patterns), with messages drawn at random.
	c := fec.Conv()
	dec := c.Decoder()
	r := rng.New(7)
	msg := make([]byte, 10)
	hard := make([]byte, 32)
	var pat []int
	var rec func(start, left int)
	count := 0
	rec = func(start, left int) {
		r.Bits(msg)
		cw := c.Mother(msg)
		copy(hard, cw)
		for _, p := range pat {
			hard[p] ^= 1
		}
		out := decodeHard(t, dec, hard)
		count++
		for i := range msg {
			if out[i] != msg[i] {
				t.Fatalf("errors at %v: decoded %v, sent %v", pat, out, msg)
			}
		}
		if left == 0 {
			return
		}
		for p := start; p < len(hard); p++ {
			pat = append(pat, p)
			rec(p+1, left-1)
			pat = pat[:len(pat)-1]
		}
	}
	rec(0, 4)
	if count != 1+32+496+4960+35960 {
		t.Fatalf("tried %d patterns", count)
	}
	// And the bound is sharp: six errors on the impulse response's ten ones make the weight-10
	// codeword the nearer one.
	zero := make([]byte, 10)
	cw := c.Mother([]byte{1, 0, 0, 0, 0, 0, 0, 0, 0, 0})
	copy(hard, c.Mother(zero))
	flipped := 0
	for i, x := range cw {
		if x == 1 && flipped < 6 {
			hard[i] ^= 1
			flipped++
		}
	}
	if out := decodeHard(t, dec, hard); out[0] != 1 {
		t.Errorf("six errors on the impulse response decoded to %v, want the wrong codeword", out)
	}
}

func TestPuncturedRatesAndNoiselessDecoding(t *testing.T) {
	// Rates of the IEEE 802.11 patterns (IEEE Std 802.11-2020 §17.3.5.6, §19.3.11.6, from
	// memory): 2/3 sends A0 B0 A1, 3/4 sends A0 B0 A1 B2, 5/6 sends A0 B0 A1 B2 A3 B4.
	sent := map[string][]int{ // mother-code positions sent in one period (A_i = 2i, B_i = 2i+1)
		"1/2": {0, 1},
		"2/3": {0, 1, 2},
		"3/4": {0, 1, 2, 5},
		"5/6": {0, 1, 2, 5, 6, 9},
	}
	rates := map[string]float64{"1/2": 0.5, "2/3": 2.0 / 3, "3/4": 0.75, "5/6": 5.0 / 6}
	for rate, pos := range sent {
		c := fec.Conv().Puncture(rate)
		if err := c.Err(); err != nil {
			t.Fatal(err)
		}
		if got := c.Rate(); got != rates[rate] {
			t.Errorf("%s: Rate() = %v", rate, got)
		}
		enc, dec := c.Encoder(), c.Decoder()
		for _, n := range []int{1, 2, 3, 5, 17, 600, 601, 602} {
			r := rng.New(uint64(n))
			msg := make([]byte, n)
			r.Bits(msg)
			f := &link.Frame{Bits: msg, Coded: msg, CodeRate: 1}
			if err := enc.Process(f, nil); err != nil {
				t.Fatal(err)
			}
			mother := c.Mother(msg)
			var want []byte
			period := map[string]int{"1/2": 2, "2/3": 4, "3/4": 6, "5/6": 10}[rate]
			for i := range mother {
				for _, p := range pos {
					if i%period == p {
						want = append(want, mother[i])
					}
				}
			}
			if string(f.Coded) != string(want) {
				t.Fatalf("%s, %d bits: sent bits differ from the pattern", rate, n)
			}
			if wantRate := float64(n) / float64(len(want)); f.CodeRate != wantRate {
				t.Errorf("%s, %d bits: CodeRate %v, want %v", rate, n, f.CodeRate, wantRate)
			}
			f.Hard = append([]byte(nil), f.Coded...)
			if err := dec.Process(f, nil); err != nil {
				t.Fatalf("%s, %d bits: %v", rate, n, err)
			}
			if string(f.Out) != string(msg) {
				t.Fatalf("%s, %d bits: noiseless decoding differs from the message", rate, n)
			}
		}
	}
}

func TestConvBadParameters(t *testing.T) {
	for _, c := range []*fec.Convolutional{
		fec.ConvCode(9, 0o133, 0o171),
		fec.ConvCode(7, 0o1133, 0o171),
		fec.ConvCode(7, 0o33, 0o71),
		fec.Conv().Puncture("7/8"),
		fec.Conv().PunctureMask(1, 1, 0),
		fec.Conv().PunctureMask(1, 1, 0, 0),
	} {
		if c.Err() == nil {
			t.Errorf("%+v: no error", c)
		}
	}
	if err := fec.Conv().Puncture("7/8").Err(); err.Error() != `fec.Conv: Puncture rate "7/8" is not one of 1/2, 2/3, 3/4, 5/6` {
		t.Errorf("message %q", err)
	}
	// Soft input without LLRs.
	f := &link.Frame{Hard: make([]byte, 40)}
	if err := fec.Conv().Decoder().Soft().Process(f, nil); err == nil {
		t.Error("soft decoding without LLRs gave no error")
	}
}

// viterbiLink is BPSK over AWGN with the K = 7 code, soft or hard decoding.
func viterbiLink(ebn0 float64, soft bool, n int) *link.Link {
	c := fec.Conv()
	dec := c.Decoder()
	if !soft {
		dec.Hard()
	}
	return link.Chain(&linktest.Source{N: n}, c.Encoder(), &bpsk{}, channel.AWGN(ebn0), &bpskDemod{soft: true}, dec)
}

func TestSoftViterbiUnderUnionBound(t *testing.T) {
	// Union bounds for the K = 7 code (Proakis §8.2-2, spectrum theory.ConvK7). Bit errors come
	// in events, so the bits are not independent trials and a bit interval is optimistic; the
	// frames are independent, so the frame check (L·Pe bound) is the rigorous one.
	const n, frames = 2048, 1500
	ebn0 := 4.0
	got := run(t, viterbiLink(ebn0, true, n), frames, 11)
	ber, fer := got[link.TapBER], got[link.TapFER]
	if ber.Errors < 5 {
		t.Fatalf("only %d bit errors: raise the frame count", ber.Errors)
	}
	bound := theory.ConvK7Soft(ebn0 + theory.ToDB(float64(n)/float64(n+6)))
	e, _ := stats.ClopperPearson(ber.Errors, ber.Trials, 0.99)
	if e.Low > bound {
		t.Errorf("soft BER %.3g [%.3g, %.3g] above the union bound %.3g", e.Rate, e.Low, e.High, bound)
	}
	// Genie lower bound: the bit at a step is wrong at least as often as a binary test between
	// two sequences at the free distance, Q(√(2·10·R·γb)) (common practice, no source).
	if low := theory.Q(math.Sqrt(2 * 10 * 0.5 * theory.FromDB(ebn0))); e.High < low {
		t.Errorf("soft BER %.3g [%.3g, %.3g] below the genie bound %.3g", e.Rate, e.Low, e.High, low)
	}
	fb := float64(n+6) * theory.ConvK7.Event(ebn0+theory.ToDB(float64(n)/float64(n+6)))
	ef, _ := stats.ClopperPearson(fer.Errors, fer.Trials, 0.99)
	if ef.Low > fb {
		t.Errorf("FER %.3g [%.3g, %.3g] above the union bound %.3g", ef.Rate, ef.Low, ef.High, fb)
	}
	t.Logf("Eb/N0 %.1f dB: BER %.3g (%d errors), bound %.3g; FER %.3g, bound %.3g", ebn0, e.Rate, ber.Errors, bound, ef.Rate, fb)
}

func TestHardViterbiUnderUnionBound(t *testing.T) {
	// Hard-decision union bound (Proakis §8.2-3), where soft decoding gains about 2 dB
	// (Proakis §8.2; common practice): soft at 4.5 dB beats hard at 6 dB.
	const n, frames = 2048, 400
	ebn0 := 6.0
	got := run(t, viterbiLink(ebn0, false, n), frames, 12)
	ber := got[link.TapBER]
	bound := theory.ConvK7Hard(ebn0 + theory.ToDB(float64(n)/float64(n+6)))
	e, _ := stats.ClopperPearson(ber.Errors, ber.Trials, 0.99)
	if e.Low > bound || ber.Errors == 0 {
		t.Errorf("hard BER %.3g [%.3g, %.3g] (%d errors) above the union bound %.3g", e.Rate, e.Low, e.High, ber.Errors, bound)
	}
	t.Logf("hard, Eb/N0 %.1f dB: BER %.3g (%d errors), bound %.3g; pre-FEC %.3g", ebn0, e.Rate, ber.Errors, bound,
		float64(got[link.TapPre].Errors)/float64(got[link.TapPre].Trials))
	soft := run(t, viterbiLink(4.5, true, n), frames, 12)[link.TapBER]
	if soft.Errors*ber.Trials > ber.Errors*soft.Trials {
		t.Errorf("soft at 4.5 dB (%d/%d) worse than hard at 6 dB (%d/%d)", soft.Errors, soft.Trials, ber.Errors, ber.Trials)
	}
}

func TestViterbiNoAllocation(t *testing.T) {
	l := viterbiLink(3, true, 1024)
	counts := make([]link.Tally, len(l.Taps()))
	var f link.Frame
	i := 0
	step := func() {
		if err := l.Run(&f, 1, 0, i, counts); err != nil {
			t.Fatal(err)
		}
		i++
	}
	step()
	if a := testing.AllocsPerRun(20, step); a != 0 {
		t.Errorf("%v allocations per frame", a)
	}
}

func BenchmarkViterbiSoft(b *testing.B) {
	const n = 4096
	c := fec.Conv()
	dec := c.Decoder()
	r := rng.New(3)
	msg := make([]byte, n)
	r.Bits(msg)
	cw := c.Mother(msg)
	llr := make([]float64, len(cw))
	for i, x := range cw {
		llr[i] = float64(1-2*int(x))*2 + r.Norm()
	}
	f := &link.Frame{LLR: llr, Hard: cw}
	b.SetBytes(n / 8)
	for b.Loop() {
		f.Out = nil
		if err := dec.Process(f, nil); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/n, "ns/bit")
}

func TestViterbiSoftNoiseless(t *testing.T) {
	// LLRs of a noiseless channel, some infinite, through each puncturing: the message back.
	for _, rate := range []string{"1/2", "2/3", "3/4", "5/6"} {
		c := fec.Conv().Puncture(rate)
		r := rng.New(4)
		msg := make([]byte, 301)
		r.Bits(msg)
		f := &link.Frame{Bits: msg, Coded: msg, CodeRate: 1}
		if err := c.Encoder().Process(f, nil); err != nil {
			t.Fatal(err)
		}
		f.LLR = make([]float64, len(f.Coded))
		for i, b := range f.Coded {
			f.LLR[i] = float64(1-2*int(b)) * (0.5 + r.Float64())
			if i%7 == 0 {
				f.LLR[i] = math.Inf(1 - 2*int(b))
			}
		}
		f.Hard = f.Coded
		if err := c.Decoder().Soft().Process(f, nil); err != nil {
			t.Fatal(err)
		}
		if string(f.Out) != string(msg) {
			t.Errorf("%s: noiseless soft decoding differs from the message", rate)
		}
	}
}
