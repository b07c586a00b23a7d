package source

// Role is "source": in a paired comparison (link.Paired) every variant's random source draws
// the same bits.
func (s *RandomBits) Role() string { return "source" }
