package noise

// Roles in a paired comparison (link.Roled, link.Paired): each of these noises takes the role
// "noise", as channel.AWGN does, so a variant with impulsive noise where another has Gaussian
// noise draws from the same stream.

// Role is "noise".
func (c *ClassANoise) Role() string { return "noise" }

// Role is "noise".
func (c *ImpulseNoise) Role() string { return "noise" }

// Role is "noise".
func (c *LaplaceNoise) Role() string { return "noise" }
