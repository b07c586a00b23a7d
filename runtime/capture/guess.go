package capture

import (
	"bytes"
	"fmt"
)

// Guess tries, on the first bytes of a capture that did not lock, every O.150 order in both
// bit orders (and the other text format where it applies), and names the settings under which
// the pattern is found, or "" when none is. It reads at most guessBytes of head.
func Guess(head []byte, f Format) string {
	head = head[:min(len(head), guessBytes)]
	var found []string
	for _, lsb := range []bool{false, true} {
		if f == ASCII && lsb {
			continue // ascii has no bit order
		}
		for _, order := range PRBSOrders {
			c, err := Count(bytes.NewReader(head), Options{PRBS: order, Format: f, LSB: lsb})
			if err != nil || c.Compared < c.Bits/2 {
				continue
			}
			s := fmt.Sprintf("-prbs %d", order)
			if lsb {
				s += " -lsb"
			}
			found = append(found, s)
		}
	}
	if len(found) == 0 {
		return ""
	}
	return fmt.Sprintf("its first %d bytes lock with %s", len(head), join(found))
}

// guessBytes is how much of a capture Guess reads.
const guessBytes = 1 << 16

func join(s []string) string {
	switch len(s) {
	case 1:
		return s[0]
	case 2:
		return s[0] + " or " + s[1]
	}
	out := ""
	for i, v := range s {
		switch {
		case i == len(s)-1:
			out += ", or " + v
		case i > 0:
			out += ", " + v
		default:
			out += v
		}
	}
	return out
}
