// Package lab answers the lab's questions about error counts, for the tally plan and tally
// interval commands: how many bits a tester must run to claim a BER, and what a measured
// count says. Each command parses its own flags, prints readable text (or JSON with -json)
// and returns an exit code: 0 done, 2 bad input or usage.
package lab

import (
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

const (
	exitOK    = 0
	exitUsage = 2
)

// maxCount bounds counts so that they convert to int64 exactly.
const maxCount = 1 << 62

// count is a flag holding a whole number of bits or errors, typed as an integer or in
// floating-point notation (3e12).
type count struct {
	v   int64
	set bool
}

func (c *count) String() string {
	if c == nil || !c.set {
		return ""
	}
	return strconv.FormatInt(c.v, 10)
}

func (c *count) Set(s string) error {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	switch {
	case err != nil:
		return errors.New("not a number")
	case math.IsNaN(v) || math.IsInf(v, 0):
		return errors.New("not a finite number")
	case v < 0:
		return errors.New("negative")
	case v != math.Trunc(v):
		return errors.New("not a whole number")
	case v > maxCount:
		return errors.New("too large")
	}
	c.v, c.set = int64(v), true
	return nil
}

// command is the flag set of one subcommand with its usage text.
type command struct {
	name, synopsis, about string
	fs                    *flag.FlagSet
	stdout, stderr        io.Writer
}

func newCommand(name, synopsis, about string, stdout, stderr io.Writer) *command {
	fs := flag.NewFlagSet("tally "+name, flag.ContinueOnError)
	fs.SetOutput(io.Discard) // parse errors are printed by parse, with the command's name
	c := &command{name: name, synopsis: synopsis, about: about, fs: fs, stdout: stdout, stderr: stderr}
	fs.Usage = func() {} // printed by parse, to the right stream
	return c
}

func (c *command) usage(w io.Writer) {
	fmt.Fprintf(w, "usage: tally %s %s\n\n%s\n\nflags:\n", c.name, c.synopsis, c.about)
	c.fs.SetOutput(w)
	c.fs.PrintDefaults()
	c.fs.SetOutput(io.Discard)
}

// parse reads args; done reports that the command is over (help shown or bad flags), with
// its exit code.
func (c *command) parse(args []string) (code int, done bool) {
	err := c.fs.Parse(args)
	switch {
	case errors.Is(err, flag.ErrHelp):
		c.usage(c.stdout)
		return exitOK, true
	case err != nil:
		fmt.Fprintf(c.stderr, "tally %s: %v\nrun 'tally %s -h' for its flags\n", c.name, err, c.name)
		return exitUsage, true
	case c.fs.NArg() > 0:
		return c.fail("unexpected argument %q", c.fs.Arg(0)), true
	}
	return exitOK, false
}

// given reports whether the flag was on the command line.
func (c *command) given(name string) bool {
	found := false
	c.fs.Visit(func(f *flag.Flag) { found = found || f.Name == name })
	return found
}

// fail prints a message about bad input and returns the usage exit code.
func (c *command) fail(format string, a ...any) int {
	fmt.Fprintf(c.stderr, "tally %s: %s\n", c.name, fmt.Sprintf(format, a...))
	return exitUsage
}

func (c *command) printJSON(v any) int {
	b, err := json.MarshalIndent(v, "", "  ")
	if err != nil { // only for non-finite numbers, which the checks keep out
		fmt.Fprintf(c.stderr, "tally %s: %v\n", c.name, err)
		return exitUsage
	}
	fmt.Fprintln(c.stdout, string(b))
	return exitOK
}

func checkBER(v float64) error {
	if !(v > 0 && v < 1) {
		return fmt.Errorf("-ber %v must lie strictly between 0 and 1", v)
	}
	return nil
}

// guard runs a computation and turns a panic of the numerical routines (gonum panics on
// some extreme arguments) into an error; the panic's own words are not shown to a user.
func guard(f func() error) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = errNoAnswer
		}
	}()
	return f()
}

// rate is a flag holding a line rate in bit/s, typed as a number (10e9) or with an SI
// prefix (10G, 2.5G, 100M, 64k), optionally followed by "bit/s", "b/s" or "bps".
type rate struct {
	v   float64
	set bool
}

func (r *rate) String() string {
	if r == nil || !r.set {
		return ""
	}
	return strconv.FormatFloat(r.v, 'g', -1, 64)
}

func (r *rate) Set(s string) error {
	v, err := Rate(s)
	if err != nil {
		return errors.New("not a line rate (bits per second: 10e9, 10G, 2.5G, 100M)")
	}
	r.v, r.set = v, true
	return nil
}

// Rate reads a line rate in bit/s with an optional SI prefix (k, M, G, T) and an optional
// unit: 10e9, 10G, 2.5G, 155.52M, 64k, "100 Mbit/s". It says nothing of whether the rate makes
// sense; the caller bounds it.
func Rate(s string) (float64, error) {
	t := strings.TrimSpace(s)
	for _, unit := range []string{"bit/s", "b/s", "bps"} {
		if len(t) > len(unit) && strings.EqualFold(t[len(t)-len(unit):], unit) {
			t = strings.TrimSpace(t[:len(t)-len(unit)])
			break
		}
	}
	scale := 1.0
	if n := len(t); n > 0 {
		switch t[n-1] {
		case 'k', 'K':
			scale = 1e3
		case 'M':
			scale = 1e6
		case 'G':
			scale = 1e9
		case 'T':
			scale = 1e12
		}
		if scale != 1 {
			t = strings.TrimSpace(t[:n-1])
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a line rate", s)
	}
	return v * scale, nil
}
