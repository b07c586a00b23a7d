package capture

import (
	"errors"
	"fmt"
	"io"
)

// Options say what a capture holds and how to count it.
type Options struct {
	Name   string // the capture's name in reports (a file name, or "-")
	Format Format
	LSB    bool // packed bytes carry their first bit in the least significant place

	PRBS    int    // O.150 order, or 0 with a reference
	RefName string // the reference file's name
	Ref     io.Reader

	Interval int64 // bits per row of table.csv (0: one second with Rate, else 2^20)
	Rate     int64 // line rate in bit/s (0: no time-based figures)
	Block    int64 // G.826 block size in bits (0: no block figures)
	Guard    int64 // burst guard in bits (0: DefaultGuard)

	// Loss of alignment: Threshold or more errors among the last Window bits (0: defaults).
	Window    int64
	Threshold int64
}

// Defaults of Options.
const (
	DefaultGuard     = 64
	DefaultWindow    = 1024
	DefaultThreshold = 128 // an error ratio of 1/8 over the window
	defaultInterval  = 1 << 20
)

// Slip is a change of alignment between the pattern and the capture.
type Slip struct {
	Bit      int64 `json:"bit"`       // first capture bit not compared against the old alignment
	Lost     int64 `json:"lost_bits"` // bits from there compared with neither alignment
	Shift    int64 `json:"shift"`     // bits the pattern moved: +1 a bit missing from the capture, −1 a bit repeated
	Known    bool  `json:"shift_known"`
	Spread   int64 `json:"spread"` // bits over which the change could lie equally well (the bits agree with both)
	Inverted bool  `json:"inverted"`
	Polarity bool  `json:"polarity_changed"`
	Regained bool  `json:"regained"` // false: not regained before the end of the capture
}

// Counts is what counting a capture found, before any statistics.
type Counts struct {
	Name      string
	SHA256    string
	Bytes     int64
	Format    Format
	LSB       bool
	Pattern   string
	PRBS      int
	RefName   string
	RefSHA256 string
	RefBits   int64
	Offset    int64 // reference bit aligned with the capture's first bit at the first lock
	Bits      int64 // capture bits
	Compared  int64
	Errors    int64
	Lost      int64 // bits not compared after the first lock
	Before    int64 // bits before the first lock, not compared
	LockBit   int64 // first bit compared
	Inverted  bool  // the pattern was received inverted at the first lock
	Slips     []Slip
	NSlips    int64
	Rows      []Row
	Interval  int64 // bits a row (the last may be shorter)
	Bursts    *bursts
	Guard     int64
	Window    int64
	Thresh    int64
	Rate      int64
	Block     int64
	G821      *G821
	G826      *G826
	Blocks    int64 // whole blocks (with a block size)
	EBlocks   int64 // errored blocks among them
}

// RefError is a reference file that cannot serve.
type RefError struct {
	Name string
	Err  error
}

func (e *RefError) Error() string {
	if errors.Is(e.Err, ErrEmpty) {
		return fmt.Sprintf("reference %s: it holds no bits", e.Name)
	}
	return fmt.Sprintf("reference %s: %v", e.Name, e.Err)
}

func (e *RefError) Unwrap() error { return e.Err }

// ErrEmpty and ErrNoLock are the two ways a capture can hold nothing to count.
var (
	ErrEmpty  = errors.New("the capture holds no bits")
	ErrNoLock = errors.New("the pattern was not found in the capture")
)

// NoLockError says how far the search for the pattern went.
type NoLockError struct {
	Bits  int64
	Bytes int64
	Need  int64 // the fewest bits a lock can be found in
}

func (e *NoLockError) Error() string {
	return fmt.Sprintf("the pattern was not found in %d bits (%d bytes)", e.Bits, e.Bytes)
}

func (e *NoLockError) Unwrap() error { return ErrNoLock }
