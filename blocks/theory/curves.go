package theory

// Curves: the formulas that take an order, a code or a factor besides Eb/N0, fixed to those
// and returned as a function of Eb/N0 (dB) alone, the form a script gives a curve
// (x.Curve(…).Theory(theory.QAMCurve(16))) beside theory.BPSK, theory.QPSK, theory.DBPSK and
// the other functions of Eb/N0 alone. Each is the formula it names, unchanged.

// PSKCurve is PSK(M, ·): the bit error rate of Gray M-PSK as a function of Eb/N0 in dB.
func PSKCurve(M int) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return PSK(M, ebn0DB) }
}

// QAMCurve is QAM(M, ·): the bit error rate of Gray square M-QAM (Cho and Yoon) as a function
// of Eb/N0 in dB.
func QAMCurve(M int) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return QAM(M, ebn0DB) }
}

// PAMCurve is PAM(M, ·): the bit error rate of Gray M-PAM as a function of Eb/N0 in dB.
func PAMCurve(M int) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return PAM(M, ebn0DB) }
}

// RicianCurve is BPSKRician(k, ·), which is also QPSK's: the average bit error rate in Rician
// fading of factor k as a function of Eb/N0 in dB.
func RicianCurve(k float64) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return BPSKRician(k, ebn0DB) }
}

// RSCurve is RS(n, k, ·): the bit error rate of RS(n, k) over BPSK with hard decisions as a
// function of Eb/N0 in dB.
func RSCurve(n, k int) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return RS(n, k, ebn0DB) }
}

// NormalApproxCurve is NormalApprox(n, k, ·): the frame error rate no code of k information
// bits in n BPSK symbols beats, by the normal approximation, as a function of Eb/N0 in dB.
func NormalApproxCurve(n, k int) func(ebn0DB float64) float64 {
	return func(ebn0DB float64) float64 { return NormalApprox(n, k, ebn0DB) }
}
