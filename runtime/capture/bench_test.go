package capture

import (
	"bytes"
	"encoding/binary"
	"io"
	"math/bits"
	"runtime"
	"syscall"
	"testing"
	"time"
)

// cpuTime is the process's user and system time: on a shared machine the wall clock of a
// benchmark counts other processes' time, so throughput per core is judged on this.
func cpuTime() time.Duration {
	var u syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &u); err != nil {
		return 0
	}
	return time.Duration(u.Utime.Nano() + u.Stime.Nano())
}

// reportRate reports Gbit/s of capture by the wall clock and per CPU second.
func reportRate(b *testing.B, bits int64, cpu time.Duration) {
	b.ReportMetric(float64(bits)*float64(b.N)/b.Elapsed().Seconds()/1e9, "Gbit/s")
	if cpu > 0 {
		b.ReportMetric(float64(bits)*float64(b.N)/cpu.Seconds()/1e9, "Gbit/cpu-s")
	}
}

// prbsReader streams n bytes of a packed PRBS (first bit most significant) with one bit
// error every `every` bits, without holding the capture.
type prbsReader struct {
	p          *prbs
	s          uint64
	left       int64
	pos, every int64
	word       [8]byte
	have       int
}

func newPRBSReader(order int, n, every int64) *prbsReader {
	p, _ := newPRBS(order)
	return &prbsReader{p: p, s: p.mask, left: n, every: every}
}

func (r *prbsReader) Read(b []byte) (int, error) {
	if r.left == 0 {
		return 0, io.EOF
	}
	n := 0
	for n < len(b) && r.left > 0 {
		if r.have == 0 {
			w, s := r.p.word(r.s)
			r.s = s
			if r.every > 0 && (r.pos/r.every) != ((r.pos+64)/r.every) {
				w ^= 1 << uint(r.every-r.pos%r.every-1)
			}
			r.pos += 64
			binary.BigEndian.PutUint64(r.word[:], bits.Reverse64(w))
			r.have = 8
		}
		b[n] = r.word[8-r.have]
		r.have--
		r.left--
		n++
	}
	return n, nil
}

// Counting memory does not grow with the capture: the heap allocated to count 64 MiB is
// within 1 MiB of that for 8 MiB (rows are the only thing that grows, a few bytes a row).
func TestMemoryFlat(t *testing.T) {
	if testing.Short() {
		t.Skip("counts 72 MiB")
	}
	alloc := func(n int64) uint64 {
		var a, b runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&a)
		c, err := Count(newPRBSReader(31, n, 1_000_003), Options{PRBS: 31})
		if err != nil {
			t.Fatal(err)
		}
		runtime.ReadMemStats(&b)
		if want := n * 8 / 1_000_003; c.Errors != want {
			t.Errorf("%d bytes: %d errors, want %d", n, c.Errors, want)
		}
		return b.TotalAlloc - a.TotalAlloc
	}
	small, large := alloc(8<<20), alloc(64<<20)
	if large > small+1<<20 {
		t.Errorf("allocated %d bytes for 8 MiB, %d for 64 MiB", small, large)
	}
}

// BenchmarkCountPRBS counts a packed capture of PRBS 2^31−1 with a BER of 1e-6 from memory:
// bit/s of capture per core is the figure to read (target ≥ 1 Gbit/s).
func BenchmarkCountPRBS(b *testing.B) {
	const size = 16 << 20
	data, err := io.ReadAll(newPRBSReader(31, size, 1_000_000))
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(size)
	b.ResetTimer()
	t0 := cpuTime()
	for range b.N {
		if _, err := Count(bytes.NewReader(data), Options{PRBS: 31}); err != nil {
			b.Fatal(err)
		}
	}
	reportRate(b, size*8, cpuTime()-t0)
}

// BenchmarkCountReference is the same against a 1 Mbit reference file that the capture
// repeats, with a BER of 1e-6.
func BenchmarkCountReference(b *testing.B) {
	const size = 16 << 20
	ref, _ := io.ReadAll(newPRBSReader(31, 1<<17, 0))
	data := bytes.Repeat(ref, size/len(ref))
	for i := 100_003; i < len(data); i += 125_000 {
		data[i] ^= 0x10
	}
	b.SetBytes(size)
	b.ResetTimer()
	t0 := cpuTime()
	for range b.N {
		c, err := Count(bytes.NewReader(data), Options{Ref: bytes.NewReader(ref), RefName: "ref"})
		if err != nil || c.NSlips != 0 {
			b.Fatal(err, c.NSlips)
		}
	}
	reportRate(b, size*8, cpuTime()-t0)
}
