// Command tally runs Monte Carlo bit-error-rate experiments written as Go files, and answers
// the lab's questions about error counts.
//
//	tally run FILE.go        run an experiment in the embedded interpreter
//	tally watch PATH...      re-run experiments on every save
//	tally bench              measure the standard links' throughput
//	tally plan               bits a tester must run to claim a BER
//	tally interval           estimate and interval for a measured count
//	tally merge              combine shard results
//	tally version            the version, the Go version and the modules built in
package main

import (
	"fmt"
	"io"
	"os"
	"strings"

	"tally/runtime/isolate"
)

type command struct {
	name, args, help string
	run              func(args []string, stdout, stderr io.Writer) int
}

var commands []command

func register(c command) { commands = append(commands, c) }

func usage(w io.Writer) {
	fmt.Fprintln(w, "tally: Monte Carlo bit-error-rate experiments for digital links")
	fmt.Fprintln(w, "\nusage: tally <command> [flags] [arguments]   (tally <command> -h for its flags)")
	fmt.Fprintln(w)
	for _, c := range commands {
		fmt.Fprintf(w, "  %-9s %-22s %s\n", c.name, c.args, c.help)
	}
}

func main() {
	if isolate.Child() {
		// A run's own process, started by tally run or tally watch (see runtime/isolate).
		os.Exit(isolate.Serve())
	}
	os.Exit(dispatch(os.Args[1:], os.Stdout, os.Stderr))
}

// dispatch runs a subcommand: 0 success, 1 a failed run or script, 2 a usage error.
func dispatch(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	switch args[0] {
	case "-h", "-help", "--help", "help":
		usage(stdout)
		return 0
	}
	for _, c := range commands {
		if c.name == args[0] {
			return c.run(args[1:], stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "tally: unknown command %q\n\n", args[0])
	usage(stderr)
	return 2
}

// complain prints "tally NAME: message" for err, without a second "NAME: " when the package
// that made err already named itself so ("tally merge: merge: no shard files").
func complain(w io.Writer, name string, err error) {
	fmt.Fprintf(w, "tally %s: %s\n", name, strings.TrimPrefix(err.Error(), name+": "))
}
