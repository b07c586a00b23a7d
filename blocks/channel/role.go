package channel

// Roles of the channel's random blocks in a paired comparison (link.Roled, link.Paired):
// variants draw the same noise and the same fades frame by frame.

// Role is "noise".
func (c *WhiteNoise) Role() string { return "noise" }

// Role is "fading".
func (c *Fading) Role() string { return "fading" }
