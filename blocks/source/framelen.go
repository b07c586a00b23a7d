package source

// A run rounds a source's frame length up to what the blocks after it take in whole units (a
// modulator's bits per symbol, a code's block, an interleaver's size) and says so once; Exact
// keeps the length as typed, and a block that cannot take it then refuses it with its message.

// Exact keeps the frame length as given, never rounded.
func (s *RandomBits) Exact() *RandomBits { s.exact = true; return s }

// FrameLen is the bits per frame (link.Sized).
func (s *RandomBits) FrameLen() int { return s.N }

// SetFrameLen sets the bits per frame (link.Sized).
func (s *RandomBits) SetFrameLen(n int) { s.N = n }

// FrameLenExact says whether Exact was asked for (link.Sized).
func (s *RandomBits) FrameLenExact() bool { return s.exact }

// Exact keeps the frame length as given, never rounded.
func (s *PRBSSequence) Exact() *PRBSSequence { s.exact = true; return s }

// FrameLen is the bits per frame (link.Sized).
func (s *PRBSSequence) FrameLen() int { return s.N }

// SetFrameLen sets the bits per frame (link.Sized).
func (s *PRBSSequence) SetFrameLen(n int) { s.N = n }

// FrameLenExact says whether Exact was asked for (link.Sized).
func (s *PRBSSequence) FrameLenExact() bool { return s.exact }
