package symbols

import (
	"bytes"
	"compress/gzip"
	_ "embed" // for exportData
	"io"
	"sync"
)

// exportData is exportdata.bin: the export data, gzip-compressed (a quarter of the size).
//
//go:embed exportdata.bin
var exportData []byte

// ExportData is the type information of every package a script can import (tally's
// script-facing packages and the standard packages the interpreter carries), written by
// exportgen.go; the host type-checks a script against it as the Go compiler would.
// TestExportDataFresh fails when it is stale. It is unpacked once, when first asked for.
var ExportData = sync.OnceValue(func() []byte {
	b, err := Unpack(exportData)
	if err != nil {
		panic("symbols: exportdata.bin is damaged: " + err.Error())
	}
	return b
})

// Unpack undoes the compression exportgen.go applies.
func Unpack(packed []byte) ([]byte, error) {
	r, err := gzip.NewReader(bytes.NewReader(packed))
	if err != nil {
		return nil, err
	}
	return io.ReadAll(r)
}

//go:generate go run exportgen.go
