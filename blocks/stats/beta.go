package stats

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// gonum's Beta routines (cephes' incomplete beta) lose accuracy as a + b grows: their
// quantiles are off by about 1e-7 relative at a + b = 1e9, 1e-3 at 1e12, and wrong or NaN
// beyond 1e14, which a long run reaches. Past bigBeta the Beta(a, b) law (a ≤ b; the other
// case by the mirror X ↔ 1−X) is taken through its limits, each within 1e-4 standard
// deviations of the exact value there (and closer as a + b grows):
//
//   - a² ≤ 10·b: −(b + (a−1)/2)·ln(1−X) is close to Gamma(a, 1), the Poisson limit of the
//     binomial with the half-shape correction (Johnson, Kotz and Balakrishnan, Continuous
//     Univariate Distributions 2, 2nd ed., 1995, ch. 25, from memory), so gonum's Gamma
//     routines serve;
//   - a² > 10·b with whole a and b (every Clopper–Pearson limit): the exact binomial tail,
//     summed near its mode (binomialBetaTail);
//   - a² > 10·b otherwise: X is close to normal with the Beta's mean and variance; its skewness γ
//     corrects the tails by the first Cornish–Fisher term z → z + γ(z²−1)/6 (Cornish and
//     Fisher, Revue de l'Institut International de Statistique 5, 1937), and the first
//     Edgeworth term for the distribution function.
const bigBeta = 1e6

// betaQuantile is the q-quantile of Beta(a, b). Past q = 0.99 it is found on the upper tail,
// which keeps the digits of 1 − q that a quantile routine loses (gonum's Beta quantile gives
// 1 for Beta(1, 1000) at q = 1 − 1e-7, where the answer is 0.016).
func betaQuantile(q, a, b float64) float64 {
	switch {
	case q > 0.99 && q < 1:
		if x, err := tailQuantile(1-q, a, b, true); err == nil {
			return x
		}
		return math.NaN()
	case a+b <= bigBeta:
		return distuv.Beta{Alpha: a, Beta: b}.Quantile(q)
	case a > b: // X ~ Beta(a, b) ⇔ 1−X ~ Beta(b, a)
		return 1 - betaQuantile(1-q, b, a)
	case a*a <= 10*b:
		return gammaBetaQuantile(q, a, b)
	case summable(a, b, a/(a+b)):
		if q > 0.5 {
			x, _ := tailQuantile(1-q, a, b, true)
			return x
		}
		x, _ := tailQuantile(q, a, b, false)
		return x
	}
	return normalBetaQuantile(q, a, b)
}

func gammaBetaQuantile(q, a, b float64) float64 {
	y := distuv.Gamma{Alpha: a, Beta: 1}.Quantile(q)
	return -math.Expm1(-y / (b + (a-1)/2))
}

func normalBetaQuantile(q, a, b float64) float64 {
	mean, sd, skew := betaMoments(a, b)
	z := distuv.UnitNormal.Quantile(q)
	return mean + sd*(z+skew*(z*z-1)/6)
}

// betaTail is P(X ≤ x), or P(X > x) when upper, for X ~ Beta(a, b); each tail is computed
// on its own so that a small one keeps its digits.
func betaTail(x, a, b float64, upper bool) float64 {
	switch {
	case x <= 0:
		return b2f(upper)
	case x >= 1:
		return b2f(!upper)
	case a+b <= bigBeta:
		d := distuv.Beta{Alpha: a, Beta: b}
		if upper {
			return d.Survival(x)
		}
		return d.CDF(x)
	case a > b:
		return betaTail(1-x, b, a, !upper)
	case a*a <= 10*b:
		return gammaBetaTail(x, a, b, upper)
	case summable(a, b, x):
		return binomialBetaTail(x, a, b, upper)
	}
	return normalBetaTail(x, a, b, upper)
}

// summable reports whether binomialBetaTail serves Beta(a, b) near x: whole shapes, counts
// exact in a float64 (a + b < 2⁵³), and a binomial whose terms within 40 standard deviations
// of the mode number at most two million.
func summable(a, b, x float64) bool {
	n := a + b - 1
	return a == math.Trunc(a) && b == math.Trunc(b) && n < 1<<53 && 80*math.Sqrt(n*x*(1-x)) < 2e6
}

// binomialBetaTail is the Beta(a, b) tail for whole a and b through the binomial:
// P(Beta(a, b) ≤ x) = P(Bin(a+b−1, x) ≥ a) (e.g. Johnson, Kemp and Kotz, Univariate Discrete
// Distributions, 3rd ed., 2005, §3.6; from memory), the binomial terms summed outward from
// the mode until they fall below 1e-25 of the largest. The mode's term is taken in logs with
// ln C(N, j) = ln Γ(N+1) − ln Γ(N−j+1) − ln Γ(j+1) from lgammaRatio (no large ln Γ cancels), so
// a tail keeps about 1e-9 relative accuracy at a million errors, where the normal form with
// one Cornish–Fisher term is off by 1e-4 in the far tails. Used past bigBeta when a² > 10·b.
func binomialBetaTail(x, a, b float64, upper bool) float64 {
	n := a + b - 1
	mode := math.Floor((n + 1) * x)
	mode = math.Max(0, math.Min(n, mode))
	lj, _ := math.Lgamma(mode + 1)
	lt := lgammaRatio(n-mode+1, mode) - lj + mode*math.Log(x) + (n-mode)*math.Log1p(-x)
	r := x / (1 - x) // t(j+1)/t(j) = (n−j)/(j+1)·r
	// Sum the terms at j ≥ a (hi) and at j < a (lo), relative to the mode's term.
	var hi, lo float64
	add := func(j, t float64) {
		if j >= a {
			hi += t
		} else {
			lo += t
		}
	}
	add(mode, 1)
	for j, t := mode, 1.0; j < n; j++ {
		t *= (n - j) / (j + 1) * r
		if t < 1e-25 || j-mode > 4e6 {
			break
		}
		add(j+1, t)
	}
	for j, t := mode, 1.0; j > 0; j-- {
		t *= j / ((n - j + 1) * r)
		if t < 1e-25 || mode-j > 4e6 {
			break
		}
		add(j-1, t)
	}
	// P(Beta ≤ x) = P(Bin ≥ a) = hi·e^lt; P(Beta > x) = lo·e^lt.
	if upper {
		return math.Min(1, lo*math.Exp(lt))
	}
	return math.Min(1, hi*math.Exp(lt))
}

func gammaBetaTail(x, a, b float64, upper bool) float64 {
	g := distuv.Gamma{Alpha: a, Beta: 1}
	y := -(b + (a-1)/2) * math.Log1p(-x)
	if upper {
		return g.Survival(y)
	}
	return g.CDF(y)
}

func normalBetaTail(x, a, b float64, upper bool) float64 {
	mean, sd, skew := betaMoments(a, b)
	w := (x - mean) / sd
	c := distuv.UnitNormal.Prob(w) * skew * (w*w - 1) / 6
	p := distuv.UnitNormal.CDF(w) - c
	if upper {
		p = distuv.UnitNormal.Survival(w) + c
	}
	return math.Max(0, math.Min(1, p))
}

func betaMoments(a, b float64) (mean, sd, skew float64) {
	s := a + b
	mean = a / s
	sd = math.Sqrt(a * b / (s * s * (s + 1)))
	skew = 2 * (b - a) * math.Sqrt(s+1) / ((s + 2) * math.Sqrt(a*b))
	return mean, sd, skew
}

// lgammaRatio is ln Γ(m+c) − ln Γ(m) for m > 0, c ≥ 0, without the cancellation of two
// large ln Γ: for large m by Stirling's series, (m−½)·ln(1+c/m) + c·ln(m+c) − c plus the
// 1/12x terms (the next, 1/360x³, is below 1e-23 there).
func lgammaRatio(m, c float64) float64 {
	if m < 1e6 {
		a, _ := math.Lgamma(m + c)
		b, _ := math.Lgamma(m)
		return a - b
	}
	return (m-0.5)*math.Log1p(c/m) + c*math.Log(m+c) - c + 1/(12*(m+c)) - 1/(12*m)
}

func b2f(v bool) float64 {
	if v {
		return 1
	}
	return 0
}
