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

func checkConfidence(v float64) error {
	if !(v > 0 && v < 1) {
		return fmt.Errorf("-confidence %v must lie strictly between 0 and 1 (0.95 is 95 %%)", v)
	}
	return nil
}

func checkBER(v float64) error {
	if !(v > 0 && v < 1) {
		return fmt.Errorf("-ber %v must lie strictly between 0 and 1", v)
	}
	return nil
}

// guard runs a computation and turns a panic of the numerical routines (gonum panics on
// some extreme arguments, e.g. a confidence of 1e-300) into an error.
func guard(f func()) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = fmt.Errorf("cannot compute for these values (%v)", v)
		}
	}()
	f()
	return nil
}
