// Package symbols holds the interpreter's tables of tally's script-facing packages, generated
// by yaegi's extractor (go generate ./...; a test fails when they are stale).
package symbols

import "reflect"

// Symbols maps "import/path/name" to the package's exported symbols.
var Symbols = map[string]map[string]reflect.Value{}

//go:generate go tool yaegi extract -name symbols tally/blocks/link tally/blocks/rng tally/blocks/source tally/blocks/modem tally/blocks/channel tally/blocks/stop tally/blocks/stats tally/blocks/theory tally/blocks/impair tally/blocks/noise tally/blocks/carrier tally/blocks/pulse tally/blocks/equalize tally/blocks/fec tally/blocks/vec tally/runtime/sim
