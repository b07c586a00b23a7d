package fec_test

import (
	"math"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/stats"
	"tally/blocks/theory"
)

func TestHamming74Generator(t *testing.T) {
	// Lin and Costello, Error Control Coding, 2nd ed., 2004, Example 3.1 (from memory): the
	// systematic generator of the (7,4) cyclic code with g(x) = 1 + x + x³.
	want := [4]string{"1101000", "0110100", "1110010", "1010001"}
	h := fec.Hamming74()
	for i, w := range want {
		msg := make([]byte, 4)
		msg[i] = 1
		got := ""
		for _, b := range h.Codeword(msg) {
			got += string('0' + b)
		}
		if got != w {
			t.Errorf("row %d: %s, want %s", i, got, w)
		}
	}
}

// decodeWord runs a Hamming decoder on one received word.
func decodeWord(t *testing.T, d *fec.HammingDecoder, r []byte) ([]byte, int64) {
	t.Helper()
	f := &link.Frame{Hard: r}
	if err := d.Process(f, nil); err != nil {
		t.Fatal(err)
	}
	_, det := d.Detected(f)
	return f.Out, det
}

func TestHammingCorrectsEverySingleError(t *testing.T) {
	// Minimum distance 3 (7,4) and 4 (8,4): every single error is corrected; the (8,4) decoder
	// detects every double error (Lin and Costello §4.1, §4.3; exhaustive).
	for _, h := range []*fec.Hamming{fec.Hamming74(), fec.Hamming84()} {
		d := h.Decoder()
		for u := 0; u < 16; u++ {
			msg := []byte{byte(u & 1), byte(u >> 1 & 1), byte(u >> 2 & 1), byte(u >> 3 & 1)}
			cw := h.Codeword(msg)
			for i := -1; i < h.N; i++ {
				r := append([]byte(nil), cw...)
				if i >= 0 {
					r[i] ^= 1
				}
				out, det := decodeWord(t, d, r)
				if string(out) != string(msg) || det != 0 {
					t.Fatalf("%d-bit code, message %v, error at %d: decoded %v (detected %d)", h.N, msg, i, out, det)
				}
			}
			if h.N != 8 {
				continue
			}
			for i := 0; i < 8; i++ {
				for j := i + 1; j < 8; j++ {
					r := append([]byte(nil), cw...)
					r[i] ^= 1
					r[j] ^= 1
					if _, det := decodeWord(t, d, r); det != 1 {
						t.Fatalf("(8,4), message %v, errors at %d, %d: not detected", msg, i, j)
					}
				}
			}
		}
	}
}

func TestHammingWeightDistribution(t *testing.T) {
	// The codewords' weights against the Hamming weight enumerator (Lin and Costello §4.1):
	// (7,4): A3 = A4 = 7, A7 = 1; the extension by even parity moves A3 to A4: A4 = 14, A8 = 1.
	a := theory.HammingWeights(3)
	want84 := map[int]float64{0: 1, 4: a[3] + a[4], 8: a[7]}
	for _, h := range []*fec.Hamming{fec.Hamming74(), fec.Hamming84()} {
		got := make([]float64, h.N+1)
		for u := 0; u < 16; u++ {
			w := 0
			for _, b := range h.Codeword([]byte{byte(u & 1), byte(u >> 1 & 1), byte(u >> 2 & 1), byte(u >> 3 & 1)}) {
				w += int(b)
			}
			got[w]++
		}
		for w := range got {
			want := 0.0
			if h.N == 7 {
				want = a[w]
			} else {
				want = want84[w]
			}
			if got[w] != want {
				t.Errorf("(%d,4): %v codewords of weight %d, want %v", h.N, got[w], w, want)
			}
		}
	}
}

func TestHamming74ExactBER(t *testing.T) {
	// Decoding all 128 error patterns, weighted by their BSC probabilities, gives the decoder's
	// exact message-bit error rate; it must equal the weight-distribution expression
	// theory.HammingBSC (Lin and Costello's enumerator, perfect-code argument in its doc).
	h := fec.Hamming74()
	d := h.Decoder()
	msg := []byte{1, 0, 1, 1}
	cw := h.Codeword(msg)
	wrong := make([]int, 128) // message bits wrong after decoding, per error pattern
	for e := 0; e < 128; e++ {
		r := append([]byte(nil), cw...)
		for i := range r {
			r[i] ^= byte(e >> i & 1)
		}
		out, _ := decodeWord(t, d, r)
		for i := range out {
			if out[i] != msg[i] {
				wrong[e]++
			}
		}
	}
	for _, p := range []float64{1e-4, 1e-3, 0.01, 0.05, 0.1, 0.3, 0.5} {
		pb := 0.0
		for e, n := range wrong {
			w := popcount(e)
			pb += float64(n) * math.Pow(p, float64(w)) * math.Pow(1-p, float64(7-w))
		}
		pb /= 4
		if want := theory.HammingBSC(3, p); math.Abs(pb-want) > 1e-12*want {
			t.Errorf("p = %g: exhaustive %.15g, formula %.15g", p, pb, want)
		}
	}
}

func popcount(x int) int {
	n := 0
	for ; x != 0; x &= x - 1 {
		n++
	}
	return n
}

// firstBit counts only the first message bit of every 4: one bit per codeword, so the trials
// are independent (errors within a codeword are not) and a binomial interval is valid. Every
// position has the same error rate (theory.HammingBSC).
func firstBit(f *link.Frame) (int64, int64) {
	var n, e int64
	for i := 0; i < len(f.Bits); i += 4 {
		n++
		if f.Bits[i] != f.Out[i] {
			e++
		}
	}
	return n, e
}

func TestHamming74MonteCarlo(t *testing.T) {
	// Through a BSC and through BPSK + AWGN with hard decisions: 99 % Clopper–Pearson interval
	// on independent bits around theory.HammingBSC / theory.Hamming74.
	cases := []struct {
		name string
		l    func() *link.Link
		want float64
	}{
		{"bsc p=0.02", func() *link.Link {
			h := fec.Hamming74()
			return link.Chain(&linktest.Source{N: 4000}, h.Encoder(), &bsc{p: 0.02}, h.Decoder())
		}, theory.HammingBSC(3, 0.02)},
		{"bpsk 5 dB", func() *link.Link {
			h := fec.Hamming74()
			return link.Chain(&linktest.Source{N: 4000}, h.Encoder(), &bpsk{}, channel.AWGN(5), &bpskDemod{}, h.Decoder())
		}, theory.Hamming74(5)},
	}
	for _, c := range cases {
		got := run(t, c.l().Count("first", firstBit), 100, 3)
		first := got["first"]
		e, _ := stats.ClopperPearson(first.Errors, first.Trials, 0.99)
		if !(e.Low <= c.want && c.want <= e.High) {
			t.Errorf("%s: BER %.4g [%.4g, %.4g] (%d errors) excludes theory %.4g", c.name, e.Rate, e.Low, e.High, first.Errors, c.want)
		}
		all := got[link.TapBER]
		t.Logf("%s: first-bit BER %.4g, all bits %.4g, theory %.4g", c.name, e.Rate, float64(all.Errors)/float64(all.Trials), c.want)
	}
}

func TestBlockFrameLength(t *testing.T) {
	// A frame that is not a whole number of messages is an error naming the block.
	l := link.Chain(&linktest.Source{N: 10}, fec.Hamming74().Encoder())
	var f link.Frame
	err := l.Run(&f, 1, 0, 0, make([]link.Tally, 2))
	if err == nil || err.Error() != "fec.Hamming74 encoder: frame of 10 bits is not a multiple of 4 (choose a frame length that is)" {
		t.Errorf("error %v", err)
	}
}
