package fec

// Role is "interleaver": in a paired comparison (link.Roled, link.Paired) a random
// interleaver draws the same permutation in every variant.
func (b *Interleave) Role() string { return "interleaver" }
