package source

import (
	"strings"
	"testing"
)

// A frame length beyond the bound is refused at construction, naming the block, the
// parameter, the value and the limit; before, source.Random(1<<40) ran the machine out of
// memory at the first frame.
func TestFrameLengthBounded(t *testing.T) {
	huge := 1 << 40
	for _, c := range []struct {
		err  error
		name string
	}{
		{Random(huge).Err(), "source.Random"},
		{PRBS(23, huge).Err(), "source.PRBS"},
		{Pattern([]byte{1, 0}, huge).Err(), "source.Pattern"},
	} {
		if c.err == nil {
			t.Errorf("%s(%d) accepted", c.name, huge)
			continue
		}
		for _, want := range []string{c.name, "n = 1099511627776", "limit of 4194304"} {
			if !strings.Contains(c.err.Error(), want) {
				t.Errorf("%s: %q does not say %q", c.name, c.err, want)
			}
		}
	}
	if err := Random(1 << 22).Err(); err != nil {
		t.Errorf("a frame at the limit is refused: %v", err)
	}
}
