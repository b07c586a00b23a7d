// Package rng provides the counter-based random streams that every block draws from.
//
// A Stream is a key and a counter. Output i of a stream is a bijective mix of key + i·γ
// (the SplitMix64 output function, Steele, Lea and Flood, "Fast splittable pseudorandom
// number generators", OOPSLA 2014), so any value of any stream can be computed without
// touching any other: frame f of point p never depends on which worker ran frames before it.
// Keys are derived from (seed, point, frame, block) by the same mix, see Key.
//
// Normal values come from a 256-layer ziggurat over the stream (ziggurat.go, normal.go), one
// output per value: the n-th normal value of a stream depends on its key and n alone. Bulk
// calls (Normals, AddNoise, AddRealNoise, Bits) fill a frame at a time without allocating.
package rng

import (
	"encoding/binary"
	"math/bits"
	"math/rand/v2"
)

// golden is the SplitMix64 increment γ = 2^64/φ, odd.
const golden = 0x9e3779b97f4a7c15

// mix is the SplitMix64 finaliser (variant 13 of Stafford's mixers).
func mix(z uint64) uint64 {
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// Key derives the key of the stream for one block of one frame of one sweep point.
// Each field goes through the mixer, so neighbouring indices give unrelated keys.
func Key(seed uint64, point, frame, block int) uint64 {
	k := mix(seed ^ 0x6a09e667f3bcc909)
	k = mix(k ^ mix(uint64(point)+0x3c6ef372fe94f82b))
	k = mix(k ^ mix(uint64(frame)+0xa54ff53a5f1d36f1))
	k = mix(k ^ mix(uint64(block)+0x510e527fade682d1))
	return k
}

// Stream is a counter-based generator: the n-th output is mix(Key + n·γ).
// The zero value is a valid stream with key 0. A Stream is not safe for concurrent use;
// the engine gives every block of every frame its own.
type Stream struct {
	key uint64
	ctr uint64
	r   *rand.Rand // lazily made view of this stream for the standard library's distributions
}

// New returns the stream with the given key, positioned at its first output.
func New(key uint64) *Stream { return &Stream{key: key} }

// Reset re-keys the stream and rewinds it to its first output.
func (s *Stream) Reset(key uint64) { s.key, s.ctr = key, 0 } // r keeps pointing at s

// Key reports the stream's key.
func (s *Stream) Key() uint64 { return s.key }

// Sub returns an independent stream derived from this one's key and i, for a block that
// needs several unrelated sequences (for example noise and a random phase).
func (s *Stream) Sub(i int) *Stream {
	return &Stream{key: mix(s.key ^ mix(uint64(i)+0x1f83d9abfb41bd6b))}
}

// Uint64 returns the next 64 uniformly distributed bits.
func (s *Stream) Uint64() uint64 {
	s.ctr++
	return mix(s.key + s.ctr*golden)
}

// Float64 returns a uniform value in [0, 1) with 53 random bits.
func (s *Stream) Float64() float64 { return float64(s.Uint64()>>11) * 0x1p-53 }

// Open returns a uniform value in (0, 1): never 0, for logarithms.
func (s *Stream) Open() float64 { return (float64(s.Uint64()>>11) + 0.5) * 0x1p-53 }

// IntN returns a uniform integer in [0, n) by Lemire's multiply-shift with rejection
// (Lemire, "Fast random integer generation in an interval", ACM TOMACS, 2019). n must be > 0.
func (s *Stream) IntN(n int) int {
	if n <= 0 {
		panic("rng: IntN argument must be positive")
	}
	hi, lo := bits.Mul64(s.Uint64(), uint64(n))
	if lo < uint64(n) {
		thresh := -uint64(n) % uint64(n)
		for lo < thresh {
			hi, lo = bits.Mul64(s.Uint64(), uint64(n))
		}
	}
	return int(hi)
}

// Bits fills dst with independent equiprobable bits (0 or 1), 64 bits per draw: bit j of the
// n-th draw goes to dst[64n+j].
func (s *Stream) Bits(dst []byte) {
	k, c := s.key, s.ctr
	i := 0
	for ; i+64 <= len(dst); i += 64 {
		c++
		w := mix(k + c*golden)
		d := dst[i : i+64 : i+64]
		// Eight bits at a time: spread[b] holds bit j of b in byte j.
		binary.LittleEndian.PutUint64(d[0:], spread[w&0xff])
		binary.LittleEndian.PutUint64(d[8:], spread[w>>8&0xff])
		binary.LittleEndian.PutUint64(d[16:], spread[w>>16&0xff])
		binary.LittleEndian.PutUint64(d[24:], spread[w>>24&0xff])
		binary.LittleEndian.PutUint64(d[32:], spread[w>>32&0xff])
		binary.LittleEndian.PutUint64(d[40:], spread[w>>40&0xff])
		binary.LittleEndian.PutUint64(d[48:], spread[w>>48&0xff])
		binary.LittleEndian.PutUint64(d[56:], spread[w>>56])
	}
	s.ctr = c
	if i < len(dst) {
		w := s.Uint64()
		for j := range dst[i:] {
			dst[i+j] = byte(w>>uint(j)) & 1
		}
	}
}

// spread[b] has bit j of b in the low bit of byte j (little-endian).
var spread = func() (t [256]uint64) {
	for b := range t {
		for j := range 8 {
			t[b] |= uint64(b>>j&1) << (8 * j)
		}
	}
	return t
}()
