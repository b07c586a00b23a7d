package theory

import "math"

// QAM is the exact bit error rate of square Gray-labelled M-QAM (M = 4, 16, 64, …, 4^n), with
// each axis an independent Gray √M-PAM, from Cho and Yoon, "On the general BER expression of
// one- and two-dimensional amplitude modulations", IEEE Trans. Commun., 50(7), 2002:
// with I = J = √M,
//
//	Pb = 1/log2(M) · Σ_{k=1}^{log2 I} 2·P_I(k),
//	P_I(k) = 1/I · Σ_{i=0}^{(1−2^{−k})I−1} (−1)^⌊i·2^{k−1}/I⌋ · (2^{k−1} − ⌊i·2^{k−1}/I + ½⌋)
//	         · erfc((2i+1)·√(3·log2(M)·γb / (2(M−1)))).
func QAM(M int, ebn0DB float64) float64 {
	k := log2M(M)
	if k == 0 || k%2 != 0 {
		return math.NaN()
	}
	L := 1 << (k / 2)
	arg := math.Sqrt(3 * float64(k) * FromDB(ebn0DB) / (2 * float64(M-1)))
	return 2 * choYoonAxis(L, arg) / float64(k)
}

// PAM is the exact bit error rate of Gray-labelled M-PAM (M = 2, 4, 8, …), the
// one-dimensional case of Cho and Yoon (IEEE Trans. Commun., 2002, with J = 1):
// the argument of erfc becomes (2i+1)·√(3·log2(M)·γb / (M² − 1)).
func PAM(M int, ebn0DB float64) float64 {
	k := log2M(M)
	if k == 0 {
		return math.NaN()
	}
	arg := math.Sqrt(3 * float64(k) * FromDB(ebn0DB) / float64(M*M-1))
	return choYoonAxis(M, arg) / float64(k)
}

// choYoonAxis is Σ_k P_I(k) over the log2(I) bits of a Gray I-PAM axis, with
// erfc((2i+1)·arg) in each term (Cho and Yoon, 2002).
func choYoonAxis(I int, arg float64) float64 {
	if math.IsNaN(arg) {
		return math.NaN()
	}
	fi := float64(I)
	sum := 0.0
	for k := 1; 1<<(k-1) < I; k++ {
		p := float64(int(1) << (k - 1)) // 2^{k−1}
		top := int((1-math.Pow(2, -float64(k)))*fi) - 1
		s := 0.0
		for i := 0; i <= top; i++ {
			x := float64(i) * p / fi
			sign := 1.0
			if int(math.Floor(x))%2 != 0 {
				sign = -1
			}
			s += sign * (p - math.Floor(x+0.5)) * math.Erfc(float64(2*i+1)*arg)
		}
		sum += s / fi
	}
	return sum
}

// QAMSER is the exact symbol error rate of square M-QAM, Ps = 1 − (1 − P√M)² with
// P√M = 2(1 − 1/√M)·Q(√(3γs/(M−1))) the error rate of one √M-PAM axis (Proakis, Digital
// Communications, 4th ed., 2001, ch. 5).
func QAMSER(M int, ebn0DB float64) float64 {
	k := log2M(M)
	if k == 0 || k%2 != 0 {
		return math.NaN()
	}
	L := math.Sqrt(float64(M))
	gs := FromDB(ebn0DB) * float64(k)
	p := 2 * (1 - 1/L) * Q(math.Sqrt(3*gs/float64(M-1)))
	return p * (2 - p) // 1 − (1 − p)², without cancellation at high SNR
}

// PAMSER is the exact symbol error rate of M-PAM, Ps = 2(1 − 1/M)·Q(√(6γs/(M²−1)))
// (Proakis, Digital Communications, 4th ed., 2001, ch. 5).
func PAMSER(M int, ebn0DB float64) float64 {
	k := log2M(M)
	if k == 0 {
		return math.NaN()
	}
	gs := FromDB(ebn0DB) * float64(k)
	return 2 * (1 - 1/float64(M)) * Q(math.Sqrt(6*gs/float64(M*M-1)))
}
