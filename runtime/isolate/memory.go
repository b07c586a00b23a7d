package isolate

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// fallbackMemory is the default limit where the machine's memory cannot be read.
const fallbackMemory = 4 << 30

// DefaultMemory is the memory a run may use unless told otherwise: half the machine's
// physical memory, leaving the rest to the system, the editor and a second run.
func DefaultMemory() int64 {
	if n := physicalMemory(); n > 0 {
		return n / 2
	}
	return fallbackMemory
}

var units = []struct {
	suffix string
	mult   int64
}{
	{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30}, {"TiB", 1 << 40},
	{"KB", 1e3}, {"MB", 1e6}, {"GB", 1e9}, {"TB", 1e12},
	{"K", 1 << 10}, {"M", 1 << 20}, {"G", 1 << 30}, {"T", 1 << 40}, {"B", 1},
}

// ParseSize reads a memory size: a number with an optional unit (B, KiB, MiB, GiB, TiB; KB, MB,
// GB, TB in powers of ten; K, M, G, T in powers of two), such as 4GiB or 1.5G.
func ParseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	mult := int64(1)
	for _, u := range units {
		if len(t) > len(u.suffix) && strings.EqualFold(t[len(t)-len(u.suffix):], u.suffix) {
			mult, t = u.mult, strings.TrimSpace(t[:len(t)-len(u.suffix)])
			break
		}
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || v <= 0 || v*float64(mult) > 1<<62 {
		return 0, fmt.Errorf("%q is not a memory size (a positive number with a unit, such as 4GiB or 512MiB)", s)
	}
	n := int64(v * float64(mult))
	if n < 64<<20 {
		return 0, fmt.Errorf("%s is too little memory for a run (at least 64MiB)", s)
	}
	return n, nil
}

// Size writes a byte count in binary units: 1.5GiB.
func Size(n int64) string {
	names := []string{"B", "KiB", "MiB", "GiB", "TiB"}
	f, i := float64(n), 0
	for f >= 1024 && i < len(names)-1 {
		f /= 1024
		i++
	}
	if f == math.Trunc(f) {
		return fmt.Sprintf("%.0f%s", f, names[i])
	}
	return fmt.Sprintf("%.1f%s", f, names[i])
}

// SizeFlag is a flag.Value for -memory.
type SizeFlag struct{ Bytes int64 }

func (f *SizeFlag) String() string {
	if f == nil || f.Bytes == 0 {
		return ""
	}
	return Size(f.Bytes)
}

func (f *SizeFlag) Set(s string) error {
	n, err := ParseSize(s)
	if err != nil {
		return err
	}
	f.Bytes = n
	return nil
}
