package fec

// The encoders and the interleaver take their input in whole units (link.Framed), so a run can
// round the source's frame length up to what they take.

// FrameUnit is k: the encoder takes whole k-bit messages.
func (e *HammingEncoder) FrameUnit() int { return e.code.K }

// FrameOut is n coded bits per k message bits.
func (e *HammingEncoder) FrameOut(n int) int { return n / e.code.K * e.code.N }

// FrameUnit is k: the encoder takes whole k-bit messages.
func (e *BCHEncoder) FrameUnit() int { return e.code.K }

// FrameOut is n coded bits per k message bits.
func (e *BCHEncoder) FrameOut(n int) int { return n / e.code.K * e.code.N }

// FrameUnit is 8k: the encoder takes whole messages of k bytes.
func (e *RSEncoder) FrameUnit() int { return 8 * e.code.K }

// FrameOut is 8n coded bits per 8k message bits.
func (e *RSEncoder) FrameOut(n int) int { return n / (8 * e.code.K) * 8 * e.code.N }

// FrameUnit is K: the encoder takes whole K-bit messages.
func (e *LDPCEncoder) FrameUnit() int { return e.code.K }

// FrameOut is the N − Punct bits sent per K message bits.
func (e *LDPCEncoder) FrameOut(n int) int { return n / e.code.K * (e.code.N - e.code.Punct) }

// FrameUnit is K: the encoder takes whole K-bit messages.
func (e *PolarEncoder) FrameUnit() int { return e.code.K }

// FrameOut is the Sent coded bits per K message bits: N, or fewer when punctured or
// shortened.
func (e *PolarEncoder) FrameOut(n int) int { return n / e.code.K * e.code.Sent }

// FrameUnit is 1: the encoder takes any number of bits.
func (e *ConvEncoder) FrameUnit() int { return 1 }

// FrameOut is the bits sent for n message bits and the tail, after puncturing.
func (e *ConvEncoder) FrameOut(n int) int { return e.code.sent(2 * (n + e.code.K - 1)) }

// FrameUnit is the interleaver's block (rows·cols units) or, random, one unit, in bits.
func (b *Interleave) FrameUnit() int {
	il := b.il
	u := max(il.Unit, 1)
	if il.Random {
		return u
	}
	return u * max(il.Rows*il.Cols, 1)
}

// FrameOut is n: interleaving keeps the length.
func (b *Interleave) FrameOut(n int) int { return n }
