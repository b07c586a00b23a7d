package symbols

import _ "embed" // for ExportData

// ExportData is the type information of every package a script can import (tally's
// script-facing packages and the standard packages the interpreter carries), written by
// exportgen.go; the host type-checks a script against it as the Go compiler would.
// TestExportDataFresh fails when it is stale.
//
//go:embed exportdata.bin
var ExportData []byte

//go:generate go run exportgen.go
