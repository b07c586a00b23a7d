package modem

// DBPSK is differential BPSK: bit b multiplies the previous symbol by +1 (b = 0) or −1
// (b = 1), so the data ride on phase changes and the detector needs no carrier phase. Each
// frame starts with a reference symbol +1 (so a frame of n bits has n + 1 symbols, a rate
// loss the Eb/N0 accounting does not charge); the detector decides bit i from the sign of
// Re(y_i·conj(y_{i−1})).
func DBPSK() *Modem {
	m := fixed("DBPSK", 2)
	m.kind = kindDBPSK
	m.points = []complex128{1, -1}
	return m
}

// DQPSK is differential QPSK with Gray-labelled phase changes: the bit pair with label l
// (first bit most significant) multiplies the previous symbol by j^q, where q = 0, 1, 2, 3 for
// l = 00, 01, 11, 10, so the symbols stay on {1, j, −1, −j}. Each frame starts with a
// reference symbol 1. The detector forms p = y_i·conj(y_{i−1}) and decides the nearest phase
// change: with z = p·e^{jπ/4}, first bit = [Im z < 0], second bit = [Re z < 0].
func DQPSK() *Modem {
	m := fixed("DQPSK", 4)
	m.kind = kindDQPSK
	m.points = make([]complex128, 4)
	for q, c := range quarter {
		m.points[gray(q)] = c
	}
	return m
}

// quarter[q] is j^q.
var quarter = [4]complex128{1, 1i, -1, -1i}
