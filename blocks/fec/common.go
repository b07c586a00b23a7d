package fec

import (
	"fmt"

	"tally/blocks/link"
)

// hardInput is what a hard decoder decodes: the output of an inner decoder when one has run
// (f.Out is set), else the demodulator's decisions.
func hardInput(f *link.Frame) []byte {
	if f.Out != nil {
		return f.Out
	}
	return f.Hard
}

// multiple checks that a frame of n bits splits into blocks of k.
func multiple(n, k int, what string) error {
	if n == 0 {
		return fmt.Errorf("empty frame (%s)", what)
	}
	if n%k != 0 {
		return fmt.Errorf("frame of %d %s is not a multiple of %d (choose a frame length that is)", n, what, k)
	}
	return nil
}

func growUints(s []uint64, n int) []uint64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]uint64, n)
}

func growInts(s []int32, n int) []int32 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]int32, n)
}

func growInt64s(s []int64, n int) []int64 {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]int64, n)
}
