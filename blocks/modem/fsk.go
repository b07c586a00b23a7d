package modem

// BFSK is binary frequency shift keying with orthogonal tones, detected coherently.
//
// Baseband model: the receiver's two tone correlators are the signal. Each symbol occupies two
// complex samples, one per tone (so the frame has SPS = 2): bit 0 sends (1, 0) and bit 1
// sends (0, 1), energy Es = 1 per symbol. White noise of density N0 adds variance N0/2 per
// real dimension to each correlator output, which is what a channel adds per sample. The
// coherent detector compares the real parts: bit = [Re y1 > Re y0], Pb = Q(√(Eb/N0)).
func BFSK() *Modem {
	m := fixed("BFSK", 2)
	m.kind = kindFSK
	return m
}

// BFSKNoncoherent is binary orthogonal FSK detected without carrier phase, by comparing the
// tone energies: bit = [|y1|² > |y0|²], Pb = ½·exp(−Eb/(2N0)). Same signal model as BFSK.
func BFSKNoncoherent() *Modem {
	m := fixed("BFSK-NC", 2)
	m.name = "modem.BFSKNoncoherent"
	m.kind = kindNCFSK
	return m
}
