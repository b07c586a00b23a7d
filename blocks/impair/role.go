package impair

// Role is "phase noise": in a paired comparison (link.Roled, link.Paired) the variants draw
// the same phase walk frame by frame.
func (b *Wiener) Role() string { return "phase noise" }
