package rng

// Norm returns a standard normal value, N(0, 1).
// It is the standard library's ziggurat (math/rand/v2 NormFloat64) driven by this stream.
func (s *Stream) Norm() float64 { return s.rand().NormFloat64() }

// Normals fills dst with independent N(0, σ²) values.
func (s *Stream) Normals(dst []float64, sigma float64) {
	r := s.rand()
	for i := range dst {
		dst[i] = sigma * r.NormFloat64()
	}
}

// AddNoise adds independent N(0, σ²) noise to both parts of every element of x:
// circular complex Gaussian noise of total variance 2σ².
func (s *Stream) AddNoise(x []complex128, sigma float64) {
	r := s.rand()
	for i := range x {
		x[i] += complex(sigma*r.NormFloat64(), sigma*r.NormFloat64())
	}
}

// AddRealNoise adds N(0, σ²) noise to the real part of every element of x.
func (s *Stream) AddRealNoise(x []complex128, sigma float64) {
	r := s.rand()
	for i := range x {
		x[i] += complex(sigma*r.NormFloat64(), 0)
	}
}

// AddImagNoise adds N(0, σ²) noise to the imaginary part of every element of x.
func (s *Stream) AddImagNoise(x []complex128, sigma float64) {
	r := s.rand()
	for i := range x {
		x[i] += complex(0, sigma*r.NormFloat64())
	}
}
