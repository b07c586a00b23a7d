//go:build ignore

// snapgen writes snapshot.zip: module tally's sources that the packages a script can import
// need (run by go generate in this folder).
package main

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"tally/runtime/compile"
	"tally/runtime/host/symbols"
)

func main() {
	root, err := filepath.Abs("../..")
	check(err)
	var pkgs []string
	for k := range symbols.Symbols {
		pkgs = append(pkgs, k[:strings.LastIndex(k, "/")])
	}
	files, err := compile.SnapshotFiles(root, pkgs)
	check(err)
	b, err := compile.PackSnapshot(files)
	check(err)
	check(os.WriteFile("snapshot.zip", b, 0o644))
	fmt.Printf("snapshot.zip: %d files, %d bytes\n", len(files), len(b))
}

func check(err error) {
	if err != nil {
		fmt.Fprintln(os.Stderr, "snapgen:", err)
		os.Exit(1)
	}
}
