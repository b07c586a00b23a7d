package theory_test

import (
	"math"
	"testing"

	"tally/blocks/theory"
)

// DE-BPSK and Gray DE-QPSK give Pb = 2p(1 − p), p = Q(√(2Eb/N0)) (Proakis and Salehi, Digital
// Communications, 5th ed., ch. 4): about twice coherent BPSK at high SNR, a fraction of a dB
// (about 0.3 dB at 1e-5) behind it, and below differential detection (DBPSK) throughout.
func TestDifferentiallyEncoded(t *testing.T) {
	for db := -5.0; db <= 14; db += 0.5 {
		p := theory.BPSK(db)
		want := 2 * p * (1 - p)
		got := theory.DEBPSK(db)
		if math.Abs(got/want-1) > 1e-14 {
			t.Errorf("DEBPSK(%v dB) = %v, want 2p(1−p) = %v", db, got, want)
		}
		if q := theory.DEQPSK(db); q != got {
			t.Errorf("DEQPSK(%v dB) = %v, DEBPSK %v: per bit they agree", db, q, got)
		}
		if d := theory.DBPSK(db); !(got < d) {
			t.Errorf("at %v dB DE-BPSK %v is not below DBPSK %v", db, got, d)
		}
		if !(got > p && got < 2*p) {
			t.Errorf("at %v dB DE-BPSK %v is not between p = %v and 2p", db, got, p)
		}
	}
	gap := theory.EbN0For(1e-5, theory.DEBPSK) - theory.EbN0For(1e-5, theory.BPSK)
	if gap < 0.2 || gap > 0.45 {
		t.Errorf("DE-BPSK − BPSK at 1e-5 = %.2f dB, expected about 0.3 dB", gap)
	}
	if !math.IsNaN(theory.DEBPSK(math.NaN())) || !math.IsNaN(theory.DEQPSK(math.NaN())) {
		t.Error("NaN Eb/N0 does not give NaN")
	}
}
