package bench

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stats"
)

// The closed forms the counts are judged by, written here from their sources rather than
// taken from the package:
//
//	BPSK: ½ erfc(√(Eb/N0)) (Proakis, Digital Communications, 4th ed., 2001, eq. 5-2-5);
//	Gray 16-QAM: ¼[3Q(a) + 2Q(3a) − Q(5a)], a = √(4Eb/(5N0)), Q(x) = ½ erfc(x/√2)
//	(Cho and Yoon, IEEE Trans. Commun. 50(7), 2002, with M = 16).
func closedForm(name string, db float64) float64 {
	g := math.Pow(10, db/10)
	q := func(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }
	switch name {
	case "bpsk-awgn":
		return 0.5 * math.Erfc(math.Sqrt(g))
	case "qam16-awgn":
		a := math.Sqrt(0.8 * g)
		return (3*q(a) + 2*q(3*a) - q(5*a)) / 4
	}
	return math.NaN()
}

// checkBER fails unless the closed form lies in the 99 % Clopper–Pearson interval of r.
func checkBER(t *testing.T, c Case, r Result) {
	t.Helper()
	ci, err := stats.ClopperPearson(r.Errors, r.Bits, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	if p := closedForm(c.Name, c.EbN0); !ci.Contains(p) {
		t.Errorf("%s %s: %d errors in %d bits, 99%% interval [%.4g, %.4g] misses the closed form %.4g", c.Name, r.Path, r.Errors, r.Bits, ci.Low, ci.High, p)
	}
}

// Both paths the bench times measure real links: their BER agrees with theory.
func TestLinksAgreeWithTheory(t *testing.T) {
	for _, c := range Cases {
		if got, want := c.Theory(c.EbN0), closedForm(c.Name, c.EbN0); math.Abs(got-want) > 1e-12*want {
			t.Errorf("%s: Theory %g, closed form %g", c.Name, got, want)
		}
		r, err := Compiled(t.Context(), c, 10_000_000, 2)
		if err != nil {
			t.Fatal(err)
		}
		checkBER(t, c, r)
		checkBER(t, c, Reference(c, 2_000_000))
	}
}

// The interpreted script builds the same links as Cases: the same bits and errors as the
// compiled path, frame for frame the same streams.
func TestScriptMatchesCompiled(t *testing.T) {
	const bits = 30 * FrameBits
	rs, _, err := ScriptRun(t.Context(), bits, 2)
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range Cases {
		cp, err := Compiled(t.Context(), c, bits, 1)
		if err != nil {
			t.Fatal(err)
		}
		if rs[i].Bits != cp.Bits || rs[i].Errors != cp.Errors || rs[i].Bits < bits {
			t.Errorf("%s: script %d errors in %d bits, compiled %d in %d", c.Name, rs[i].Errors, rs[i].Bits, cp.Errors, cp.Bits)
		}
		if rs[i].CPU < 0 {
			t.Errorf("%s: negative CPU time %v", c.Name, rs[i].CPU)
		}
	}
	if !bytes.Contains(ScriptSource(12345), []byte("\nconst bits = 12345\n")) {
		t.Error("ScriptSource does not set the bit count")
	}
}

// A frame of either link allocates nothing once its buffers exist.
func TestNoAllocationPerFrame(t *testing.T) {
	for _, c := range Cases {
		l := c.Link()
		var f link.Frame
		counts := make([]link.Tally, len(l.Taps()))
		i := 0
		if a := testing.AllocsPerRun(20, func() {
			if err := l.Run(&f, 1, 0, i, counts); err != nil {
				t.Fatal(err)
			}
			i++
		}); a != 0 {
			t.Errorf("%s: %v allocations per frame", c.Name, a)
		}
	}
}

// Report runs end to end on a small count and writes every section.
func TestReport(t *testing.T) {
	var b strings.Builder
	if err := Report(t.Context(), Options{Bits: 20 * FrameBits, Workers: 2, Rounds: 1}, &b); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	for _, want := range []string{"bpsk-awgn   script", "qam16-awgn  reference", "script/reference=", "script/compiled=",
		"efficiency", "CPU efficiency", "memory      bpsk-awgn"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
	if err := Report(t.Context(), Options{Bits: 10}, &b); err == nil {
		t.Error("a bit count below one frame is accepted")
	}
}

// Benchmarks of the hot blocks, one frame of FrameBits bits per op, and of whole frames
// through each link and its reference loop:
//
//	go test -run - -bench . ./runtime/bench
func BenchmarkBlocks(b *testing.B) {
	for _, c := range Cases {
		l := c.Link()
		var f link.Frame
		counts := make([]link.Tally, len(l.Taps()))
		if err := l.Run(&f, 1, 0, 0, counts); err != nil {
			b.Fatal(err)
		}
		blocks := l.Blocks()
		for k, blk := range blocks {
			b.Run(c.Name+"/"+link.NameOf(blk), func(b *testing.B) {
				// Block k runs again and again on the frame the link left; only its stream
				// changes (the channel's noise piles up, which costs the same time).
				g := f
				g.Samples = append([]complex128(nil), f.Samples...)
				var s rng.Stream
				b.SetBytes(FrameBits)
				b.ReportAllocs()
				for i := 0; b.Loop(); i++ {
					s.Reset(rng.Key(1, 0, i, k))
					if err := blk.Process(&g, &s); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

func BenchmarkLink(b *testing.B) {
	for _, c := range Cases {
		b.Run(c.Name, func(b *testing.B) {
			l := c.Link()
			var f link.Frame
			counts := make([]link.Tally, len(l.Taps()))
			b.SetBytes(FrameBits)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				if err := l.Run(&f, 1, 0, i, counts); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkReference(b *testing.B) {
	for _, c := range Cases {
		b.Run(c.Name, func(b *testing.B) {
			b.SetBytes(FrameBits)
			for b.Loop() {
				Reference(c, FrameBits)
			}
		})
	}
}
