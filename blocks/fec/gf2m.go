package fec

import "fmt"

// binField is GF(2^m), 3 ≤ m ≤ 16, built from a primitive polynomial, with log and antilog
// tables (the BCH codes' field; RS keeps its own GF(256) of DVB-S).
type binField struct {
	m, q int      // degree and q = 2^m − 1, the order of α
	exp  []uint16 // exp[i] = α^i for 0 ≤ i < 2q, doubled so products need no reduction
	log  []int32  // log[α^i] = i; log[0] unused
}

// primitivePolys are primitive polynomials of degree m, bit i the coefficient of xⁱ, from
// Lin and Costello, Error Control Coding, 2nd ed., 2004, Table 2.7 (the first of each degree);
// newBinField checks that α has order 2^m − 1 in each.
var primitivePolys = [17]int{
	3: 0xb, 4: 0x13, 5: 0x25, 6: 0x43, 7: 0x89, 8: 0x11d, 9: 0x211, 10: 0x409,
	11: 0x805, 12: 0x1053, 13: 0x201b, 14: 0x4443, 15: 0x8003, 16: 0x1100b,
}

func newBinField(m int) (*binField, error) {
	if m < 3 || m > 16 {
		return nil, fmt.Errorf("field GF(2^%d) is not supported (m must lie in 3…16)", m)
	}
	q := 1<<m - 1
	f := &binField{m: m, q: q, exp: make([]uint16, 2*q), log: make([]int32, q+1)}
	x := 1
	for i := 0; i < q; i++ {
		if i > 0 && x == 1 {
			return nil, fmt.Errorf("polynomial %#x is not primitive", primitivePolys[m])
		}
		f.exp[i], f.exp[i+q] = uint16(x), uint16(x)
		f.log[x] = int32(i)
		x <<= 1
		if x&(q+1) != 0 {
			x ^= primitivePolys[m]
		}
	}
	return f, nil
}

func (f *binField) mul(a, b uint16) uint16 {
	if a == 0 || b == 0 {
		return 0
	}
	return f.exp[f.log[a]+f.log[b]]
}

// pow is α^i for any integer i.
func (f *binField) pow(i int) uint16 {
	i %= f.q
	if i < 0 {
		i += f.q
	}
	return f.exp[i]
}

// inv is 1/a for a ≠ 0.
func (f *binField) inv(a uint16) uint16 { return f.exp[(f.q-int(f.log[a]))%f.q] }
