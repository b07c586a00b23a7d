package fec

// field is GF(2⁸) built from a primitive polynomial, with log and antilog tables.
type field struct {
	exp [510]byte // exp[i] = α^i, doubled so exp[log a + log b] needs no reduction
	log [256]int  // log[α^i] = i; log[0] is unused
}

// gfDVB is GF(256) of DVB-S: field generator p(x) = x⁸ + x⁴ + x³ + x² + 1 (ETSI EN 300 421,
// §4.4.2), with α = 0x02 a root of p.
var gfDVB = newField(0x11d)

func newField(poly int) *field {
	f := &field{}
	x := 1
	for i := 0; i < 255; i++ {
		f.exp[i] = byte(x)
		f.exp[i+255] = byte(x)
		f.log[x] = i
		x <<= 1
		if x&0x100 != 0 {
			x ^= poly
		}
	}
	return f
}

func (f *field) mul(a, b byte) byte {
	if a == 0 || b == 0 {
		return 0
	}
	return f.exp[f.log[a]+f.log[b]]
}

// div is a/b for b ≠ 0.
func (f *field) div(a, b byte) byte {
	if a == 0 {
		return 0
	}
	return f.exp[f.log[a]+255-f.log[b]]
}

// pow is α^i for any integer i.
func (f *field) pow(i int) byte {
	i %= 255
	if i < 0 {
		i += 255
	}
	return f.exp[i]
}
