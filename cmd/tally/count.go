package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"time"

	"tally/blocks/stats"
	"tally/runtime/capture"
	"tally/runtime/output"
)

func init() {
	register(command{name: "count", args: "[flags] FILE|-", help: "count bit errors in a lab capture against a PRBS or a reference", run: countCmd})
}

const countAbout = `Counts the bit errors in a capture of received bits (FILE, or - for standard input)
against an ITU-T O.150 PRBS (-prbs N, locked by self-synchronisation, normal or inverted)
or a reference file (-ref FILE, aligned by a search for the offset, repeated cyclically).
Slips and losses of alignment are found, re-locked and counted apart from bit errors.
Prints the BER with its interval and one-sided upper limit, a verdict against -ber,
burst statistics, and with -rate the ITU-T G.821 figures (with -block, G.826's).
Exit 1 when the capture is not in the declared format, is empty or never locks.`

// bitsFlag is a count of bits typed as an integer or in floating-point notation (1e6).
type bitsFlag struct{ v int64 }

func (b *bitsFlag) String() string { return strconv.FormatInt(b.v, 10) }

func (b *bitsFlag) Set(s string) error {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || v < 1 || v != math.Trunc(v) || v > 1<<62 {
		return errors.New("not a whole number of bits ≥ 1")
	}
	b.v = int64(v)
	return nil
}

// rateFlag is a line rate with an SI prefix (10G, 2.048M).
type rateFlag struct{ v int64 }

func (r *rateFlag) String() string { return strconv.FormatInt(r.v, 10) }

func (r *rateFlag) Set(s string) error {
	v, err := capture.ParseRate(s)
	if err != nil {
		return err
	}
	r.v = v
	return nil
}

func countCmd(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("tally count", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	order := fs.Int("prbs", 0, "the pattern is the O.150 PRBS of order `N` (7, 9, 11, 15, 20, 23, 29, 31)")
	ref := fs.String("ref", "", "the pattern is the reference `FILE` (same format and bit order as the capture), repeated")
	format := fs.String("format", "bin", "capture format `F`: bin (packed bytes), ascii (0 and 1), hex (two digits a byte)")
	lsb := fs.Bool("lsb", false, "packed bytes carry their first bit in the least significant place")
	conf := fs.Float64("confidence", 0.95, "confidence `C` of the interval and limits, in (0, 1)")
	method := fs.String("method", stats.Default, "interval method `M`: "+strings.Join(stats.Methods, ", "))
	spec := fs.Float64("ber", 0, "verdict against the specified BER `SPEC` (e.g. 1e-9)")
	var rate rateFlag
	fs.Var(&rate, "rate", "line rate `R` in bit/s (10G, 2.048M): time axis and ITU-T G.821 figures")
	var block, interval, guard bitsFlag
	fs.Var(&block, "block", "block size `N` in bits: ITU-T G.826 block figures (seconds need -rate)")
	fs.Var(&interval, "interval", "bits a row of table.csv (default: one second with -rate, else 2^20)")
	fs.Var(&guard, "guard", "burst guard `G`: errors fewer than G error-free bits apart form one burst (default 64)")
	asJSON := fs.Bool("json", false, "print the figures as JSON")
	dir := fs.String("o", "", "write table.csv, run.json, errors.svg/png and README.md into `DIR`")
	usage := func(w io.Writer) {
		fmt.Fprintf(w, "usage: tally count [flags] FILE|-\n\n%s\n\nflags:\n", countAbout)
		fs.SetOutput(w)
		fs.PrintDefaults()
		fs.SetOutput(io.Discard)
	}
	bad := func(format string, a ...any) int {
		fmt.Fprintf(stderr, "tally count: %s\nrun 'tally count -h' for its flags\n", fmt.Sprintf(format, a...))
		return 2
	}
	err := fs.Parse(args)
	switch {
	case errors.Is(err, flag.ErrHelp):
		usage(stdout)
		return 0
	case err != nil:
		return bad("%v", err)
	case fs.NArg() != 1:
		return bad("give one capture file, or - for standard input")
	case (*order == 0) == (*ref == ""):
		return bad("give the pattern: -prbs N or -ref FILE (one of them)")
	case !(*conf > 0 && *conf < 1):
		return bad("-confidence %v must lie strictly between 0 and 1 (0.95 is 95 %%)", *conf)
	case *spec < 0 || *spec >= 1 || math.IsNaN(*spec):
		return bad("-ber %v must lie strictly between 0 and 1", *spec)
	case block.v > 0 && rate.v > 0 && rate.v%block.v != 0:
		return bad("-block %d does not divide -rate %d: a second must hold a whole number of blocks", block.v, rate.v)
	}
	if _, err := stats.MethodNamed(*method); err != nil {
		return bad("-method: %v", err)
	}
	f, err := capture.ParseFormat(*format)
	if err != nil {
		return bad("-format: %v", err)
	}
	if *order != 0 {
		if !validOrder(*order) {
			return bad("-prbs %d is not one of 7, 9, 11, 15, 20, 23, 29, 31", *order)
		}
	}
	name := fs.Arg(0)
	o := capture.Options{Name: name, Format: f, LSB: *lsb, PRBS: *order, Rate: rate.v, Block: block.v,
		Interval: interval.v, Guard: guard.v}
	var in io.Reader = os.Stdin
	if name == "-" {
		o.Name = "standard input"
	} else {
		fh, err := os.Open(name)
		if err != nil {
			fmt.Fprintf(stderr, "tally count: cannot open the capture %s\n", name)
			return 1
		}
		defer fh.Close()
		in = fh
		if interval.v == 0 && rate.v == 0 {
			if st, err := fh.Stat(); err == nil && st.Size() > 0 {
				o.Interval = rowBits(st.Size(), f)
			}
		}
	}
	if *ref != "" {
		rh, err := os.Open(*ref)
		if err != nil {
			fmt.Fprintf(stderr, "tally count: cannot open the reference %s\n", *ref)
			return 1
		}
		defer rh.Close()
		o.Ref, o.RefName = rh, *ref
	}
	c, err := capture.Count(in, o)
	if err != nil {
		fmt.Fprintf(stderr, "tally count: %s\n", explain(o, err))
		if errors.Is(err, capture.ErrNoLock) && name != "-" && *ref == "" {
			if head, rerr := readHead(name); rerr == nil {
				if g := capture.Guess(head, f); g != "" {
					fmt.Fprintf(stderr, "tally count: %s\n", g)
				}
			}
		}
		return 1
	}
	r, err := capture.Analyse(c, *conf, *method, *spec)
	if err != nil {
		fmt.Fprintf(stderr, "tally count: %v\n", err)
		return 1
	}
	if *dir != "" {
		files, err := capture.Files(r, c, append([]string{"count"}, args...), time.Now())
		if err == nil {
			err = output.WriteFiles(*dir, files)
		}
		if err != nil {
			fmt.Fprintf(stderr, "tally count: writing %s: %v\n", *dir, err)
			return 1
		}
	}
	if *asJSON {
		b, err := capture.JSON(r)
		if err != nil {
			fmt.Fprintf(stderr, "tally count: %v\n", err)
			return 1
		}
		stdout.Write(b)
		return 0
	}
	fmt.Fprint(stdout, capture.Text(r))
	if *dir != "" {
		fmt.Fprintf(stdout, "wrote %s\n", *dir)
	}
	return 0
}

// readHead is the first 64 KiB of a file.
func readHead(name string) ([]byte, error) {
	fh, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer fh.Close()
	b := make([]byte, 1<<16)
	n, err := io.ReadFull(fh, b)
	if err != nil && err != io.ErrUnexpectedEOF {
		return nil, err
	}
	return b[:n], nil
}

func validOrder(n int) bool {
	for _, o := range capture.PRBSOrders {
		if o == n {
			return true
		}
	}
	return false
}

// rowBits picks a table interval for a file of size bytes: about 200 rows, rounded to 1, 2
// or 5 times a power of ten bits.
func rowBits(size int64, f capture.Format) int64 {
	bits := float64(size) * 8
	switch f {
	case capture.ASCII:
		bits = float64(size)
	case capture.Hex:
		bits = float64(size) * 8 / 3
	}
	target := math.Max(64, bits/200)
	p := math.Pow(10, math.Floor(math.Log10(target)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= target {
			return int64(m * p)
		}
	}
	return int64(10 * p)
}

// explain turns a counting error into the sentence a user reads: which problem, and where.
func explain(o capture.Options, err error) string {
	var fe *capture.FormatError
	var nl *capture.NoLockError
	var re *capture.RefError
	what := "the capture " + o.Name
	switch {
	case errors.As(err, &re) && errors.As(err, &fe):
		return fmt.Sprintf("the reference %s is not %s: at byte %d, %s; nothing written", o.RefName, o.Format, fe.Offset, fe.Msg)
	case errors.As(err, &re) && errors.Is(err, capture.ErrEmpty):
		return fmt.Sprintf("the reference %s is empty: it holds no bits; nothing written", o.RefName)
	case errors.As(err, &re):
		return fmt.Sprintf("the reference %s: %v; nothing written", o.RefName, re.Err)
	case errors.As(err, &fe):
		return fmt.Sprintf("%s is not %s: at byte %d, %s; nothing written", what, o.Format, fe.Offset, fe.Msg)
	case errors.Is(err, capture.ErrEmpty):
		return fmt.Sprintf("%s is empty: it holds no bits; nothing written", what)
	case errors.As(err, &nl) && nl.Bits < nl.Need:
		return fmt.Sprintf("%s is too short to lock: it holds %d bits, a lock needs %d; nothing written", what, nl.Bits, nl.Need)
	case errors.As(err, &nl):
		pat := fmt.Sprintf("the PRBS of order %d", o.PRBS)
		if o.RefName != "" {
			pat = "the reference " + o.RefName
		}
		return fmt.Sprintf("%s never locks: %s was not found, normal or inverted, anywhere in its %d bits (%d bytes); check -prbs/-ref, -format and -lsb; nothing written",
			what, pat, nl.Bits, nl.Bytes)
	}
	return fmt.Sprintf("%s: %v; nothing written", what, err)
}
