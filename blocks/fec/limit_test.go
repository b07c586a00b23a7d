package fec

import (
	"strings"
	"testing"
)

// An interleaver larger than a frame may be is refused at construction, with the limit
// named, and rows × cols cannot overflow past the check.
func TestInterleaverBounded(t *testing.T) {
	for _, rc := range [][2]int{{1 << 20, 1 << 20}, {1 << 40, 1 << 40}, {1 << 62, 4}} {
		err := BlockInterleaver(rc[0], rc[1]).Err()
		if err == nil || !strings.Contains(err.Error(), "fec.BlockInterleaver") || !strings.Contains(err.Error(), "limit of 4194304") {
			t.Errorf("BlockInterleaver(%d, %d): %v, want a refusal naming the limit", rc[0], rc[1], err)
		}
	}
	if err := BlockInterleaver(2048, 2048).Err(); err != nil {
		t.Errorf("an interleaver at the limit is refused: %v", err)
	}
}
