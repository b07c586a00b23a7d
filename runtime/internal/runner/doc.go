// Package runner runs what a script declared through package sim: the options a run is made
// with (command line or host), the points on the engine, long runs through runtime/longrun,
// targets and the scatter frame, the outputs through runtime/output, and what a mistake does to
// the process (a panic the host turns into file:line:col, or a message and exit 1 compiled).
//
// It is internal on purpose: no script can import it (the Go toolchain refuses, and the host's
// sandbox and symbol tables never offer it), so a script can choose neither where its outputs
// go, nor what its run record says, nor how the process ends.
package runner
