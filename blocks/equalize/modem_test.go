package equalize_test

import (
	"testing"

	"tally/blocks/channel"
	"tally/blocks/equalize"
	"tally/blocks/internal/linktest"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/theory"
)

// With the modem package's 16-QAM the LMS equaliser reads its training symbols from the coded
// bits through the modem's labelling (most significant bit first, Points()[label]): a wrong
// reading would train it on the wrong symbols. At 14 dB on the ISI channel its BER must lie
// within 2 dB of the ISI-free 16-QAM curve (Cho and Yoon, IEEE Trans. Commun., 2002, via
// theory.QAM; margin common practice, no source).
func TestLMSWithModemQAM(t *testing.T) {
	const ebn0 = 14.0 // dB
	m := modem.QAM(16)
	l := link.Chain(source.Random(8192), m.Mod(), channel.Multipath(isiTaps), channel.AWGN(ebn0),
		equalize.LMS(21, 0.05), m.Demod())
	e := linktest.Estimate(t, l, 40, 4)
	if margin := theory.QAM(16, ebn0-2); e.Low > margin {
		t.Errorf("16-QAM with LMS: BER %.4g (99%% interval from %.4g), more than 2 dB worse than ISI-free (%.4g)", e.Rate, e.Low, margin)
	}
	if clean := theory.QAM(16, ebn0); e.High < clean {
		t.Errorf("16-QAM with LMS: BER %.4g below the ISI-free %.4g", e.Rate, clean)
	}
}
