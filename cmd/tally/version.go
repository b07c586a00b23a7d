package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"runtime"
	"runtime/debug"
	"strings"

	"tally/runtime/host"
)

func init() {
	register(command{name: "version", args: "", help: "tally's version, the Go version and the modules built in", run: versionCmd})
}

// versionCmd prints tally's version (the one run.json records), the Go version that built it,
// the commit when the build knows it, and each module built in with its version and sum, so a
// result can be traced to the exact build that made it.
func versionCmd(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("tally version", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.Usage = func() {
		fmt.Fprintf(stderr, "usage: tally version\n\nPrints tally's version (as run.json records it), the Go version, the commit when\nthe build knows it, and every module built in with its version and sum.\n")
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "tally version: takes no arguments, got %q\n", fs.Arg(0))
		return 2
	}
	fmt.Fprintf(stdout, "tally %s\n", host.Version)
	fmt.Fprintf(stdout, "go    %s %s/%s\n", runtime.Version(), runtime.GOOS, runtime.GOARCH)
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		fmt.Fprintln(stdout, "modules: not recorded in this build")
		return 0
	}
	var rev, modified string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				modified = " (with uncommitted changes)"
			}
		}
	}
	if rev != "" {
		fmt.Fprintf(stdout, "commit %s%s\n", rev, modified)
	}
	fmt.Fprintln(stdout, "modules:")
	fmt.Fprintf(stdout, "  %s\n", moduleLine(&bi.Main))
	for _, m := range bi.Deps {
		fmt.Fprintf(stdout, "  %s\n", moduleLine(m))
	}
	return 0
}

// moduleLine is "path version sum", with " => " and the replacement when there is one.
func moduleLine(m *debug.Module) string {
	s := strings.TrimSpace(m.Path + " " + m.Version + " " + m.Sum)
	if m.Replace != nil {
		s += " => " + moduleLine(m.Replace)
	}
	return s
}
