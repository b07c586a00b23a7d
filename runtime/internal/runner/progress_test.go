package runner

import (
	"bytes"
	"io"
	"strings"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/rng"
	"tally/blocks/stop"
)

// progressLink is BPSK by hand (link.Func) over the AWGN channel.
func progressLink(p Point) *link.Link {
	var bits, hard []byte
	var sym []complex128
	src := link.Func("src", func(f *link.Frame, r *rng.Stream) {
		bits = link.GrowBytes(bits, 512)
		r.Bits(bits)
		f.Bits, f.Coded = bits, bits
	})
	mod := link.Func("bpsk", func(f *link.Frame, r *rng.Stream) {
		sym = link.GrowComplex(sym, len(f.Coded))
		for i, b := range f.Coded {
			sym[i] = complex(1-2*float64(b), 0)
		}
		f.Samples, f.BitsPerSymbol, f.Real, f.Symbols = sym, 1, true, len(sym)
	})
	dem := link.Func("slice", func(f *link.Frame, r *rng.Stream) {
		hard = link.GrowBytes(hard, len(f.Samples))
		for i, s := range f.Samples {
			hard[i] = 0
			if real(s) < 0 {
				hard[i] = 1
			}
		}
		f.Hard = hard
	})
	return link.Chain(src, mod, channel.AWGN(p.Get("ebn0_db")), dem)
}

func progressRun(t *testing.T, o *Options) string {
	t.Helper()
	var log bytes.Buffer
	o.Log = &log
	o.Workers = 1
	x := NewSpec("progress")
	x.Params = []Param{{Name: "ebn0_db", Values: []float64{0, 2}}}
	x.Build = progressLink
	x.Rules = []stop.Rule{stop.Bits(20 * 512)}
	if _, err := Execute(&x, o); err != nil {
		t.Fatal(err)
	}
	return log.String()
}

// Not a terminal: one plain line per finished point, nothing drawn in place.
func TestProgressPlainLog(t *testing.T) {
	out := progressRun(t, &Options{})
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 2 || !strings.HasPrefix(lines[0], "ebn0_db=0 ") || !strings.HasPrefix(lines[1], "ebn0_db=2 ") {
		t.Errorf("log %q: want one line per point", out)
	}
	if strings.Contains(out, "\r") {
		t.Error("a log that is no terminal got a live line")
	}
	if out := progressRun(t, &Options{Quiet: true}); out != "" {
		t.Errorf("-quiet printed %q", out)
	}
}

// On a terminal: the live line of each point, redrawn in place and erased before its
// finished line.
func TestProgressLiveLine(t *testing.T) {
	term, every := isTerminal, progressEvery
	defer func() { isTerminal, progressEvery = term, every }()
	isTerminal = func(io.Writer) bool { return true }
	progressEvery = 0
	out := progressRun(t, &Options{})
	for _, want := range []string{"\r[1/2] ebn0_db=0", "\r[2/2] ebn0_db=2", "bits 5.12k/10.2k", "\r\x1b[Kebn0_db=0  bits=10240"} {
		if !strings.Contains(out, want) {
			t.Errorf("log lacks %q:\n%q", want, out)
		}
	}
}
