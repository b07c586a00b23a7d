package rng

// Internals for the external tests (package rng_test), which may import blocks/stats.

var SlowNormal = slowNormal

func ZigR() float64 { return zigR }
func ZigK0() uint64 { return zigK[0] }

const ZigBits = zigBits
