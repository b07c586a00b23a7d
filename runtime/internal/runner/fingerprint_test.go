package runner

import (
	"reflect"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/fec"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
	"tally/blocks/stop"
)

func point(i int, ebn0 float64) Point {
	return Point{Index: i, Names: []string{"ebn0_db"}, Values: []float64{ebn0}, Labels: [][]string{nil}}
}

// counts runs frames of a link and keeps each frame's own counts.
func perFrame(t *testing.T, l *link.Link, seed uint64, pt, frames int) [][]link.Tally {
	t.Helper()
	var out [][]link.Tally
	var f link.Frame
	for k := range frames {
		c := make([]link.Tally, len(l.Taps()))
		if err := l.Run(&f, seed, pt, k, c); err != nil {
			t.Fatal(err)
		}
		out = append(out, c)
	}
	return out
}

// A link of tally's blocks built twice the same way has one fingerprint, judged from its values
// alone (not the script); any parameter, the seed or the point changes it. Links with one
// fingerprint give the same counts frame by frame (the engine's contract: streams keyed by
// seed, point, frame and block).
func TestLinkFingerprint(t *testing.T) {
	builds := map[string]func(db float64, n int) *link.Link{
		"bpsk": func(db float64, n int) *link.Link {
			m := modem.BPSK()
			return link.Chain(source.Random(n), m.Mod(), channel.AWGN(db), m.Demod())
		},
		"conv+qam": func(db float64, n int) *link.Link {
			c, m := fec.Conv().Puncture("3/4"), modem.QAM(16)
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.Rayleigh(), channel.AWGN(db), m.Demod().LogMAP(), c.Decoder())
		},
		"ldpc": func(db float64, n int) *link.Link {
			c, m := fec.LDPCPEG(256, 128, 3), modem.BPSK()
			return link.Chain(source.Random(n), c.Encoder(), m.Mod(), channel.AWGN(db), m.Demod().LogMAP(), c.Decoder().MinSum(0.75))
		},
	}
	for name, build := range builds {
		a, whole := linkFingerprint(build(3, 384), point(2, 3), 1, "script")
		if whole {
			t.Errorf("%s: a link of tally's blocks fingerprinted by its script", name)
		}
		if b, _ := linkFingerprint(build(3, 384), point(2, 3), 1, "another script"); b != a {
			t.Errorf("%s: two builds of one link differ: %s, %s", name, a, b)
		}
		for what, other := range map[string]string{
			"Eb/N0":      first(linkFingerprint(build(3.5, 384), point(2, 3), 1, "script")),
			"frame size": first(linkFingerprint(build(3, 768), point(2, 3), 1, "script")),
			"seed":       first(linkFingerprint(build(3, 384), point(2, 3), 2, "script")),
			"point":      first(linkFingerprint(build(3, 384), point(3, 3), 1, "script")),
		} {
			if other == a {
				t.Errorf("%s: another %s, the same fingerprint", name, what)
			}
		}
		if x, y := perFrame(t, build(3, 384), 1, 2, 20), perFrame(t, build(3, 384), 1, 2, 20); !reflect.DeepEqual(x, y) {
			t.Errorf("%s: one fingerprint, different frames", name)
		}
	}
}

func first(s string, _ bool) string { return s }

// A block of the script's own, a tap of its own or a decoder's counter (a method value) cannot
// be judged from values: the fingerprint then covers the whole script, and changes with it.
func TestLinkFingerprintCustom(t *testing.T) {
	m := modem.BPSK()
	custom := link.Chain(source.Random(64), m.Mod(), link.Func("flip", func(f *link.Frame, r *rng.Stream) {}), m.Demod())
	a, whole := linkFingerprint(custom, point(0, 1), 1, "script v1")
	b, _ := linkFingerprint(custom, point(0, 1), 1, "script v2")
	if !whole || a == b {
		t.Errorf("a custom block: whole script %v, fingerprints %s, %s", whole, a, b)
	}
	c := fec.LDPCPEG(64, 32, 3)
	dec := c.Decoder()
	l := link.Chain(source.Random(32), c.Encoder(), m.Mod(), channel.AWGN(2), m.Demod().LogMAP(), dec)
	l.Count("failed", dec.Failures)
	if _, whole := linkFingerprint(l, point(0, 1), 1, "s"); !whole {
		t.Error("a tap counted by a method value judged from values")
	}
	tap := link.Chain(source.Random(64), m.Mod(), m.Demod()).Count("mine", func(f *link.Frame) (int64, int64) { return 1, 0 })
	if _, whole := linkFingerprint(tap, point(0, 1), 1, "s"); !whole {
		t.Error("a tap of the script's own judged from values")
	}
}

// The rules' fingerprint changes with any rule and with the interval they are judged at.
func TestRulesFingerprint(t *testing.T) {
	a := rulesFingerprint([]stop.Rule{stop.Errors(100), stop.Bits(1e8)}, 0.95, "clopper-pearson", "s")
	if b := rulesFingerprint([]stop.Rule{stop.Errors(100), stop.Bits(1e8)}, 0.95, "clopper-pearson", "t"); b != a {
		t.Error("the same rules, another fingerprint")
	}
	for _, other := range []string{
		rulesFingerprint([]stop.Rule{stop.Errors(200), stop.Bits(1e8)}, 0.95, "clopper-pearson", "s"),
		rulesFingerprint([]stop.Rule{stop.Errors(100)}, 0.95, "clopper-pearson", "s"),
		rulesFingerprint([]stop.Rule{stop.Errors(100), stop.Bits(1e8)}, 0.99, "clopper-pearson", "s"),
	} {
		if other == a {
			t.Error("other rules, the same fingerprint")
		}
	}
}

// The fingerprint of a large code's link: read once per point, before its frames.
func BenchmarkLinkFingerprintLDPC(b *testing.B) {
	c, m := fec.LDPCPEG(8160, 4080, 3), modem.BPSK()
	l := link.Chain(source.Random(4080), c.Encoder(), m.Mod(), channel.AWGN(2), m.Demod().LogMAP(), c.Decoder())
	for b.Loop() {
		linkFingerprint(l, point(0, 2), 1, "s")
	}
}
