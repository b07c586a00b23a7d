package sim

import (
	"strconv"
	"testing"
)

// Range yields the decimals a person typed: every value prints in its shortest form
// (strconv 'g' −1) as the same digits as from + i·step worked out by hand in decimal
// (common practice, no source).
func TestRangeDecimal(t *testing.T) {
	for _, c := range []struct {
		from, to, step float64
		want           []string
	}{
		{0, 0.4, 0.05, []string{"0", "0.05", "0.1", "0.15", "0.2", "0.25", "0.3", "0.35", "0.4"}},
		{0, 1, 0.1, []string{"0", "0.1", "0.2", "0.3", "0.4", "0.5", "0.6", "0.7", "0.8", "0.9", "1"}},
		{-1, 1, 0.3, []string{"-1", "-0.7", "-0.4", "-0.1", "0.2", "0.5", "0.8"}},
		{0, 10, 2.5, []string{"0", "2.5", "5", "7.5", "10"}},
		{1e-7, 5e-7, 1e-7, []string{"1e-07", "2e-07", "3e-07", "4e-07", "5e-07"}},
		{0.001, 0.004, 0.001, []string{"0.001", "0.002", "0.003", "0.004"}},
		{0, 10, 1, []string{"0", "1", "2", "3", "4", "5", "6", "7", "8", "9", "10"}},
	} {
		got := Range(c.from, c.to, c.step)
		var s []string
		for _, v := range got {
			s = append(s, strconv.FormatFloat(v, 'g', -1, 64))
		}
		if len(s) != len(c.want) {
			t.Errorf("Range(%v, %v, %v) = %v, want %v", c.from, c.to, c.step, s, c.want)
			continue
		}
		for i := range s {
			if s[i] != c.want[i] {
				t.Errorf("Range(%v, %v, %v) = %v, want %v", c.from, c.to, c.step, s, c.want)
				break
			}
		}
	}
}
