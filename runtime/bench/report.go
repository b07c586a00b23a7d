package bench

import (
	"context"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"
	"sync"
	"time"

	"tally/blocks/stats"
)

// Options are tally bench's settings.
type Options struct {
	Bits    int64 // bits per case and path
	Workers int   // workers for the scaling lines (0: all cores)
	Rounds  int   // each path runs this many times, interleaved; the fastest round counts
}

// Report writes tally bench's figures to w:
//
//   - every case on every path with one worker on one core (GOMAXPROCS 1, like the reference
//     loop), Rounds times interleaved so the paths share the machine's mood, the fastest round
//     of each counting; throughput per CPU second (steady on a shared machine) and per wall
//     second, and the ratios script/reference and script/compiled;
//   - the compiled path with one worker on all cores, which adds the engine's hand-over of
//     frames between goroutines;
//   - the script and compiled paths on Workers workers against one worker (wall clock);
//   - the custom-block case (combiner.go): a block the script writes itself, as a per-sample
//     loop and with the vector helpers, interpreted, on CombinerBits(Bits) bits;
//   - the peak heap at a quarter of the bits and at all of them (flat in bits).
//
// The script and compiled paths run the same link on the same streams, so they must count
// the same errors; Report fails if they do not, or if a round counts differently from another.
func Report(ctx context.Context, o Options, w io.Writer) error {
	if o.Bits < FrameBits {
		return fmt.Errorf("bench: -bits %d is less than one frame (%d bits)", o.Bits, FrameBits)
	}
	o.Rounds = max(o.Rounds, 1)
	workers := o.Workers
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	procs := runtime.GOMAXPROCS(0)
	_, cpuOK := cpuTime()
	fmt.Fprintf(w, "tally bench: %s %s/%s, %d CPUs%s; %d bits per link and path, frames of %d bits, fastest of %d round%s\n",
		runtime.Version(), runtime.GOOS, runtime.GOARCH, runtime.NumCPU(), loadAverage(), o.Bits, FrameBits, o.Rounds, plural(o.Rounds))
	unit := "Mbit/s per CPU second"
	if !cpuOK {
		unit = "Mbit/s (wall clock; CPU time not measured on this system)"
	}
	fmt.Fprintf(w, "\none worker on one core (GOMAXPROCS 1), %s:\n", unit)

	one := map[string]Result{} // by case and path: the least CPU and the least wall time seen
	var setup time.Duration
	runtime.GOMAXPROCS(1)
	err := func() error {
		defer runtime.GOMAXPROCS(procs)
		for round := 0; round < o.Rounds; round++ {
			rs, wall, err := ScriptRun(ctx, o.Bits, 1)
			if err != nil {
				return err
			}
			var engine time.Duration
			for _, r := range rs {
				engine += r.Wall
			}
			if round == 0 || wall-engine < setup {
				setup = wall - engine
			}
			for _, c := range Cases {
				r, err := Compiled(ctx, c, o.Bits, 1)
				if err != nil {
					return err
				}
				rs = append(rs, r, Reference(c, o.Bits))
			}
			for _, r := range rs {
				if err := keep(one, r); err != nil {
					return err
				}
			}
		}
		return nil
	}()
	if err != nil {
		return err
	}
	for _, c := range Cases {
		s, cp, ref := one[c.Name+" script"], one[c.Name+" compiled"], one[c.Name+" reference"]
		if s.Bits != cp.Bits || s.Errors != cp.Errors {
			return fmt.Errorf("bench: %s: the script counted %d errors in %d bits, the compiled link %d in %d (they run the same link and must agree)",
				c.Name, s.Errors, s.Bits, cp.Errors, cp.Bits)
		}
		for _, r := range []Result{s, cp, ref} {
			line(w, r, c)
		}
		fmt.Fprintf(w, "%-11s ratios       script/reference=%.2f  script/compiled=%.3f  (wall clock: %.2f, %.3f)\n", c.Name,
			s.Rate()/ref.Rate(), s.Rate()/cp.Rate(), s.WallRate()/ref.WallRate(), s.WallRate()/cp.WallRate())
	}
	fmt.Fprintf(w, "script setup  %.0f ms per run (interpreting the script, writing its outputs; outside the figures)\n", setup.Seconds()*1e3)

	if procs > 1 {
		fmt.Fprintf(w, "\none worker, GOMAXPROCS %d (the engine hands frames between goroutines on two threads):\n", procs)
		for _, c := range Cases {
			var b Result
			for round := 0; round < o.Rounds; round++ {
				r, err := Compiled(ctx, c, o.Bits, 1)
				if err != nil {
					return err
				}
				if round == 0 || r.Wall < b.Wall {
					b = r
				}
			}
			ref := one[c.Name+" compiled"]
			fmt.Fprintf(w, "%-11s %-9s    Mbit/s=%-7.1f wall clock, %.0f %% of one worker on one core (%.1f)\n",
				c.Name, "compiled", b.WallRate(), 100*b.WallRate()/ref.WallRate(), ref.WallRate())
		}
	}
	if workers > 1 {
		fmt.Fprintf(w, "\n%d workers, GOMAXPROCS %d, wall clock, against one worker on one core:\n", workers, procs)
		if err := scaling(ctx, o, workers, one, w); err != nil {
			return err
		}
	}
	if err := combinerReport(ctx, o, w); err != nil {
		return err
	}
	fmt.Fprintln(w)
	return memory(ctx, o, w)
}

// keep merges r into best: the least CPU and the least wall time of its case and path. Every
// round must count the same.
func keep(best map[string]Result, r Result) error {
	k := r.Case + " " + r.Path
	b, ok := best[k]
	if !ok {
		best[k] = r
		return nil
	}
	if b.Bits != r.Bits || b.Errors != r.Errors {
		return fmt.Errorf("bench: %s counted %d errors in %d bits, then %d in %d: not deterministic", k, b.Errors, b.Bits, r.Errors, r.Bits)
	}
	if r.CPU > 0 && r.CPU < b.CPU {
		b.CPU = r.CPU
	}
	b.Wall = min(b.Wall, r.Wall)
	best[k] = b
	return nil
}

func line(w io.Writer, r Result, c Case) {
	lo, hi := interval(r)
	fmt.Fprintf(w, "%-11s %-9s    Mbit/s=%-6.1f (wall %5.1f)  errors=%-7d bits=%-9d ber=%.3e  99%% CI %.3e…%.3e  theory %.3e\n",
		r.Case, r.Path, r.Rate(), r.WallRate(), r.Errors, r.Bits, r.BER(), lo, hi, c.Theory(c.EbN0))
}

func interval(r Result) (float64, float64) {
	e, err := stats.ClopperPearson(r.Errors, r.Bits, 0.99)
	if err != nil {
		return 0, 1
	}
	return e.Low, e.High
}

// loadAverage is ", load average X" where the system tells it (Linux), so a reader can judge
// how busy the machine was.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return ""
	}
	f := strings.Fields(string(b))
	if len(f) == 0 {
		return ""
	}
	return ", load average " + f[0]
}

// scaling runs the script and compiled paths on workers workers and reports them against
// their one-worker figures: the speed-up and parallel efficiency (speed-up / workers) by wall
// clock, and the CPU efficiency, bits per CPU second against one worker's (the speed-up an
// idle machine with that many free cores would give is at most workers times it).
func scaling(ctx context.Context, o Options, workers int, one map[string]Result, w io.Writer) error {
	best := map[string]Result{}
	for round := 0; round < o.Rounds; round++ {
		rs, _, err := ScriptRun(ctx, o.Bits, workers)
		if err != nil {
			return err
		}
		for _, c := range Cases {
			r, err := Compiled(ctx, c, o.Bits, workers)
			if err != nil {
				return err
			}
			rs = append(rs, r)
		}
		for _, r := range rs {
			if err := keep(best, r); err != nil {
				return err
			}
		}
	}
	for _, c := range Cases {
		for _, path := range []string{"script", "compiled"} {
			k := c.Name + " " + path
			r, r1 := best[k], one[k]
			if r.Errors != r1.Errors || r.Bits != r1.Bits {
				return fmt.Errorf("bench: %s on %d workers counted %d errors in %d bits, on one %d in %d", k, workers, r.Errors, r.Bits, r1.Errors, r1.Bits)
			}
			fmt.Fprintf(w, "%-11s %-9s    Mbit/s=%-7.1f one worker %.1f: speed-up %.2f, efficiency %.0f %%",
				c.Name, path, r.WallRate(), r1.WallRate(), r.WallRate()/r1.WallRate(), 100*r.WallRate()/r1.WallRate()/float64(workers))
			if r.CPU > 0 && r1.CPU > 0 {
				// Bits per CPU second against one worker's: what the workers' coordination
				// costs, which a busy machine's wall clock hides.
				fmt.Fprintf(w, "; CPU efficiency %.0f %%", 100*r.Rate()/r1.Rate())
			}
			fmt.Fprintln(w)
		}
	}
	return nil
}

// memory runs the first case compiled at a quarter of the bits and at all of them while a
// sampler watches the heap, and reports the peak heap in use and the bytes allocated per
// frame: neither may grow with the bits.
func memory(ctx context.Context, o Options, w io.Writer) error {
	c := Cases[0]
	for _, bits := range []int64{max(o.Bits/4, FrameBits), o.Bits} {
		peak, before, after, alloc, r, err := watchHeap(func() (Result, error) { return Compiled(ctx, c, bits, 1) })
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "memory      %-9s    bits=%-10d heap in use: before %.1f MiB, peak %.1f MiB, after %.1f MiB; allocated %.0f B/frame\n",
			c.Name, r.Bits, mib(before), mib(peak), mib(after), float64(alloc)/float64(r.Bits/FrameBits))
	}
	return nil
}

// watchHeap runs f while sampling runtime.MemStats.HeapInuse every 20 ms.
func watchHeap(f func() (Result, error)) (peak, before, after, alloc uint64, r Result, err error) {
	runtime.GC()
	var m0 runtime.MemStats
	runtime.ReadMemStats(&m0)
	peak = m0.HeapInuse
	stopc := make(chan struct{})
	var wg sync.WaitGroup
	var mu sync.Mutex
	wg.Add(1)
	go func() {
		defer wg.Done()
		t := time.NewTicker(20 * time.Millisecond)
		defer t.Stop()
		var m runtime.MemStats
		for {
			select {
			case <-stopc:
				return
			case <-t.C:
				runtime.ReadMemStats(&m)
				mu.Lock()
				peak = max(peak, m.HeapInuse)
				mu.Unlock()
			}
		}
	}()
	r, err = f()
	close(stopc)
	wg.Wait()
	var m1 runtime.MemStats
	runtime.ReadMemStats(&m1)
	return max(peak, m1.HeapInuse), m0.HeapInuse, m1.HeapInuse, m1.TotalAlloc - m0.TotalAlloc, r, err
}

func plural(n int) string {
	if n == 1 {
		return ""
	}
	return "s"
}

func mib(b uint64) float64 { return float64(b) / (1 << 20) }
