package modem

// FrameUnit is the bits per symbol: the modulator takes whole symbols (link.Framed), so a run
// can round the source's frame length up to them.
func (b *Mapper) FrameUnit() int { return max(b.m.Bits, 1) }

// FrameOut is −1: what leaves the modulator is symbols, no longer bits.
func (b *Mapper) FrameOut(int) int { return -1 }
