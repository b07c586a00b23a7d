package equalize

import (
	"strings"
	"testing"
)

// An equaliser length beyond the bound is refused at construction with the limit named;
// before, equalize.ZF(h, 1<<20) tried to design a million-tap equaliser at once.
func TestLengthBounded(t *testing.T) {
	h := []complex128{1, 0.5}
	for name, err := range map[string]error{
		"equalize.ZF":   ZF(h, 1<<20).Err(),
		"equalize.MMSE": MMSE(h, 1<<20).Err(),
		"equalize.LMS":  LMS(1<<20, 0.05).Err(),
	} {
		if err == nil || !strings.Contains(err.Error(), name) || !strings.Contains(err.Error(), "1048576") || !strings.Contains(err.Error(), "limit of 1024") {
			t.Errorf("%s with 2^20 taps: %v, want a refusal naming the block, the value and the limit", name, err)
		}
	}
}
