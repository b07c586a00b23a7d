package rng

import "math"

// The normal generator is a 256-layer ziggurat (Marsaglia and Tsang, "The Ziggurat Method for
// Generating Random Variables", J. Stat. Softw. 5(8), 2000) over f(x) = exp(−x²/2), x ≥ 0.
//
// The area under f is covered by 256 layers of equal area v: layer 0 is the rectangle
// [0, r] × [0, f(r)] plus the tail beyond r, layer i ≥ 1 the rectangle [0, x_i] × [f(x_i),
// f(x_{i+1})], with x_1 = r, x_{i+1} = f⁻¹(f(x_i) + v/x_i) and x_256 = 0. The base layer is
// treated as a rectangle of width x_0 = v/f(r). A draw picks a layer i and a point x = U·x_i;
// when x < x_{i+1} it lies under f for sure (98.5 % of draws), otherwise it is the tail
// (layer 0, Marsaglia's exponential method) or a wedge test against f itself.
//
// One 64-bit draw gives the layer (8 bits), the sign (1 bit) and U (55 bits): a fast-path
// normal costs one output of the stream, a table look-up, a compare and a multiply.

const (
	zigLayers = 256
	zigBits   = 55 // bits of U
)

var (
	zigR = zigSetup() // x_1, the start of the tail

	zigX [zigLayers + 1]float64 // x_i: layer widths, x_0 = v/f(r), x_256 = 0
	zigF [zigLayers + 1]float64 // f(x_i), f(x_0) unused
	zigK [zigLayers]uint64      // the fast path accepts U·2^55 < zigK[i], i.e. U·x_i < x_{i+1}
	zigW [2 * zigLayers]float64 // ±x_i·2^−55 at i and i+256: the value is int(U·2^55)·zigW[i]
)

func gauss(x float64) float64 { return math.Exp(-0.5 * x * x) }

// zigTail is the area of f beyond r: ∫_r^∞ exp(−x²/2) dx = √(π/2)·erfc(r/√2).
func zigTail(r float64) float64 { return math.Sqrt(math.Pi/2) * math.Erfc(r/math.Sqrt2) }

// zigStack builds the layers upward from r and reports how far the last one misses the top:
// f(x_255) + v/x_255 − 1, positive when the layers are too large (r too small); if they reach
// the top before the last layer it reports +∞.
func zigStack(r float64, x, fx []float64) float64 {
	v := r*gauss(r) + zigTail(r)
	x[0], x[1] = v/gauss(r), r
	fx[1] = gauss(r)
	for i := 1; i < zigLayers-1; i++ {
		t := fx[i] + v/x[i]
		if t >= 1 {
			return math.Inf(1)
		}
		x[i+1] = math.Sqrt(-2 * math.Log(t))
		fx[i+1] = t
	}
	return fx[zigLayers-1] + v/x[zigLayers-1] - 1
}

// zigSetup finds r by bisection so the 256 layers close exactly at the top, fills the tables
// and returns r. (Marsaglia and Tsang give r = 3.6541528853610088 for 256 layers.)
func zigSetup() float64 {
	x, fx := zigX[:], zigF[:]
	lo, hi := 3.0, 4.0 // zigStack > 0 at lo, < 0 at hi
	for range 200 {
		mid := 0.5 * (lo + hi)
		if mid == lo || mid == hi {
			break
		}
		if zigStack(mid, x, fx) > 0 {
			lo = mid
		} else {
			hi = mid
		}
	}
	r := hi
	zigStack(r, x, fx)
	x[zigLayers], fx[zigLayers] = 0, 1
	for i := range zigLayers {
		zigK[i] = uint64(x[i+1] / x[i] * (1 << zigBits))
		zigW[i] = x[i] * 0x1p-55
		zigW[i+zigLayers] = -zigW[i]
	}
	return r
}

// slowNormal finishes the draw u, output c of the stream with key k, that missed its layer's
// core: the tail or a wedge. Further uniforms come from an auxiliary stream keyed by (k, c);
// when the wedge test fails it starts over with a fresh draw from that stream.
func slowNormal(k, c, u uint64) float64 {
	aux := Stream{key: mix(k ^ mix(c+0x9b05688c2b3e6c1f))}
	for {
		i := u & (zigLayers - 1)
		m := u >> (64 - zigBits)
		neg := u>>8&1 == 1
		var z float64
		switch {
		case m < zigK[i]:
			z = float64(int64(m)) * zigW[i]
		case i == 0:
			// Tail beyond r: x = −ln(U1)/r, y = −ln(U2), accept when 2y > x² (Marsaglia, 1964,
			// as given by Marsaglia and Tsang, 2000).
			for {
				a := -math.Log(aux.Open()) / zigR
				b := -math.Log(aux.Open())
				if 2*b > a*a {
					z = zigR + a
					break
				}
			}
		default:
			x := float64(int64(m)) * zigW[i]
			y := zigF[i] + aux.Float64()*(zigF[i+1]-zigF[i])
			if y >= gauss(x) {
				u = aux.Uint64()
				continue
			}
			z = x
		}
		if neg {
			return -z
		}
		return z
	}
}
