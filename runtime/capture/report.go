package capture

import (
	"fmt"
	"math"

	"tally/blocks/link"
	"tally/blocks/stats"
)

// Report is every figure of a counted capture: what tally count prints, its -json, and
// run.json.
type Report struct {
	Capture     string  `json:"capture"`
	SHA256      string  `json:"sha256"`
	Bytes       int64   `json:"bytes"`
	Format      string  `json:"format"`
	BitOrder    string  `json:"bit_order"`
	Pattern     string  `json:"pattern"`
	PRBS        int     `json:"prbs,omitempty"`
	Reference   string  `json:"reference,omitempty"`
	RefSHA256   string  `json:"reference_sha256,omitempty"`
	RefBits     int64   `json:"reference_bits,omitempty"`
	Offset      *int64  `json:"reference_offset,omitempty"` // reference bit under the capture's first bit
	Polarity    string  `json:"polarity"`
	CaptureBits int64   `json:"capture_bits"`
	LockBit     int64   `json:"lock_bit"`
	Bits        int64   `json:"bits"` // compared
	Errors      int64   `json:"errors"`
	BER         float64 `json:"ber"`
	Low         float64 `json:"ci_low"`
	High        float64 `json:"ci_high"`
	Upper       float64 `json:"upper"` // one-sided upper limit
	Lower       float64 `json:"lower"` // one-sided lower limit
	Confidence  float64 `json:"confidence"`
	Method      string  `json:"method"`
	Spec        float64 `json:"ber_spec,omitempty"`
	Verdict     string  `json:"verdict,omitempty"`

	Slips      int64  `json:"slips"`
	LostBits   int64  `json:"lost_bits"`
	BeforeLock int64  `json:"bits_before_lock"`
	SlipList   []Slip `json:"slip_list"`
	Window     int64  `json:"loss_window_bits"`
	Threshold  int64  `json:"loss_threshold_errors"`

	Dispersion     *float64 `json:"dispersion"` // index of dispersion of errors between rows (null: not judged)
	DispersionRows int64    `json:"dispersion_rows"`
	Clustered      bool     `json:"clustered"` // significantly over-dispersed: the interval was widened
	PlainLow       float64  `json:"ci_low_binomial"`
	PlainHigh      float64  `json:"ci_high_binomial"`
	PlainUpper     float64  `json:"upper_binomial"`

	Bursts BurstReport `json:"bursts"`

	Rate               int64   `json:"rate,omitempty"`
	ErroredSeconds     *int64  `json:"errored_seconds"`
	SeverelyErrored    *int64  `json:"severely_errored_seconds"`
	UnavailableSeconds *int64  `json:"unavailable_seconds"`
	LeftOverBits       int64   `json:"bits_after_last_second,omitempty"`
	G821               *G821   `json:"g821,omitempty"`
	G826               *G826   `json:"g826,omitempty"`
	Block              int64   `json:"block_bits,omitempty"`
	Blocks             int64   `json:"blocks,omitempty"`
	ErroredBlocks      int64   `json:"errored_blocks,omitempty"`
	BlockErrorRatio    float64 `json:"block_error_ratio,omitempty"`
	Interval           int64   `json:"interval_bits"`
}

// BurstReport is the burst statistics with the definition they follow.
type BurstReport struct {
	Definition   string  `json:"definition"`
	Guard        int64   `json:"guard_bits"`
	Count        int64   `json:"count"`
	Multi        int64   `json:"with_two_or_more_errors"`
	MeanLength   float64 `json:"mean_length"`
	MaxLength    int64   `json:"max_length"`
	MaxStart     int64   `json:"max_start_bit"`
	MaxErrors    int64   `json:"max_errors"`
	MostErrors   int64   `json:"most_errors"`
	MostStart    int64   `json:"most_errors_start_bit"`
	MostLength   int64   `json:"most_errors_length"`
	MeanErrors   float64 `json:"mean_errors"`
	Lengths      []Bin   `json:"lengths"`
	Gaps         int64   `json:"gaps"`
	MeanGap      float64 `json:"mean_gap"`
	ShortGaps    int64   `json:"gaps_below_guard"`
	ShortShare   float64 `json:"share_below_guard"`
	ShortIfIndep float64 `json:"share_below_guard_if_independent"`
	GapHist      []Bin   `json:"gap_lengths"`
}

// Bin is a count of lengths in [From, To].
type Bin struct {
	From  int64 `json:"from"`
	To    int64 `json:"to"`
	Count int64 `json:"count"`
}

// BurstDefinition states the burst definition for a guard of g bits.
func BurstDefinition(g int64) string {
	return fmt.Sprintf("errors fewer than %d error-free bits apart form one burst; its length runs from its first error to its last, both included", g)
}

// Analyse turns counts into a report at a confidence level and interval method, with a
// verdict against spec when spec > 0.
func Analyse(c *Counts, confidence float64, method string, spec float64) (*Report, error) {
	m, err := stats.MethodNamed(method)
	if err != nil {
		return nil, err
	}
	r := &Report{Capture: c.Name, SHA256: c.SHA256, Bytes: c.Bytes, Format: c.Format.String(), BitOrder: "msb-first",
		Pattern: c.Pattern, PRBS: c.PRBS, Reference: c.RefName, RefSHA256: c.RefSHA256, RefBits: c.RefBits, Polarity: "normal", CaptureBits: c.Bits,
		LockBit: c.LockBit, Bits: c.Compared, Errors: c.Errors, Confidence: confidence, Spec: spec,
		Slips: c.NSlips, LostBits: c.Lost, BeforeLock: c.Before, SlipList: c.Slips, Window: c.Window,
		Threshold: c.Thresh, Rate: c.Rate, Interval: c.Interval}
	if c.LSB {
		r.BitOrder = "lsb-first"
	}
	if c.Inverted {
		r.Polarity = "inverted"
	}
	if c.RefName != "" {
		off := c.Offset
		r.Offset = &off
	}
	e, err := m(c.Errors, c.Compared, confidence)
	if err != nil {
		return nil, err
	}
	r.BER, r.Low, r.High, r.Method = e.Rate, e.Low, e.High, e.Method
	r.PlainLow, r.PlainHigh = e.Low, e.High
	if r.Upper, err = upperLimit(c.Errors, c.Compared, confidence); err != nil {
		return nil, err
	}
	if r.Lower, err = lowerLimit(c.Errors, c.Compared, confidence); err != nil {
		return nil, err
	}
	r.PlainUpper = r.Upper

	// Errors between rows: over-dispersion widens every limit (Kish's effective sample size,
	// as the simulations do), so a verdict holds under clustered errors too.
	t := rowTally(c.Rows, c.Interval)
	r.DispersionRows = t.Frames
	if d := stats.Dispersion(t); !math.IsNaN(d) {
		r.Dispersion = &d
		if stats.Bursty(t, 1-confidence) && d > 1 {
			r.Clustered = true
			w, err := stats.Clustered(t, e, confidence, method)
			if err != nil {
				return nil, err
			}
			r.Low, r.High, r.Method = w.Low, w.High, w.Method
			k, n := int64(math.Round(float64(c.Errors)/d)), max(1, int64(math.Round(float64(c.Compared)/d)))
			k = min(k, n)
			if u, err := upperLimit(k, n, confidence); err == nil {
				r.Upper = math.Max(r.Upper, u)
			}
			if l, err := lowerLimit(k, n, confidence); err == nil {
				r.Lower = math.Min(r.Lower, l)
			}
		}
	}
	if spec > 0 {
		r.Verdict = verdict(r, spec)
	}
	r.Bursts = burstReport(c.Bursts, c.Guard, r.BER)

	if g := c.G821; g != nil {
		r.G821 = g
		es, ses, uas := g.ES, g.SES, g.Unavailable
		r.ErroredSeconds, r.SeverelyErrored, r.UnavailableSeconds = &es, &ses, &uas
		r.LeftOverBits = c.Bits - g.Seconds*c.Rate
	}
	r.G826 = c.G826
	if c.Block > 0 {
		r.Block, r.Blocks, r.ErroredBlocks = c.Block, c.Blocks, c.EBlocks
		if c.Blocks > 0 {
			r.BlockErrorRatio = float64(c.EBlocks) / float64(c.Blocks)
		}
	}
	return r, nil
}

// rowTally is the rows that compared every bit of a full interval, as frames of a tally.
func rowTally(rows []Row, size int64) link.Tally {
	var t link.Tally
	for _, w := range rows {
		if w.Lost > 0 || w.Slips > 0 || w.End-w.Start != size {
			continue
		}
		t.Add(link.Tally{Trials: w.Bits(), Errors: w.Errors})
	}
	return t
}

func verdict(r *Report, spec float64) string {
	conf := percent(r.Confidence)
	switch {
	case r.Upper <= spec:
		return fmt.Sprintf("meets the specification: BER ≤ %s with %s confidence (one-sided upper limit %s)", g3(spec), conf, g3(r.Upper))
	case r.Lower > spec:
		return fmt.Sprintf("fails the specification: BER > %s with %s confidence (one-sided lower limit %s)", g3(spec), conf, g3(r.Lower))
	}
	if r.Errors == 0 {
		// n error-free bits show BER ≤ spec when 1 − (1−C)^(1/n) ≤ spec
		need := math.Ceil(math.Log1p(-r.Confidence) / math.Log1p(-spec))
		return fmt.Sprintf("not decided: no errors in %s bits show only BER ≤ %s at %s; %s error-free bits would show BER ≤ %s",
			grouped(r.Bits), g3(r.Upper), conf, grouped(int64(need)), g3(spec))
	}
	return fmt.Sprintf("not decided: the capture allows a BER from %s to %s (one-sided %s limits), on both sides of %s; a longer capture decides",
		g3(r.Lower), g3(r.Upper), conf, g3(spec))
}

func burstReport(b *bursts, guard int64, ber float64) BurstReport {
	br := BurstReport{Definition: BurstDefinition(guard), Guard: guard, Count: b.Count, Multi: b.Multi,
		MaxLength: b.MaxLength, MaxStart: b.MaxStart, MaxErrors: b.MaxErrors,
		MostErrors: b.MostErrors, MostStart: b.MostStart, MostLength: b.MostLength, Gaps: b.Gaps, ShortGaps: b.ShortGaps,
		Lengths: []Bin{}, GapHist: []Bin{}}
	if b.Count > 0 {
		br.MeanLength = float64(b.LengthSum) / float64(b.Count)
		br.MeanErrors = float64(b.Errors) / float64(b.Count)
	}
	if b.Gaps > 0 {
		br.MeanGap = b.GapSum / float64(b.Gaps)
		br.ShortShare = float64(b.ShortGaps) / float64(b.Gaps)
	}
	if ber > 0 {
		br.ShortIfIndep = expectedShort(ber, guard)
	}
	for i, n := range b.Lengths {
		if n > 0 {
			br.Lengths = append(br.Lengths, Bin{From: 1 << i, To: 1<<(i+1) - 1, Count: n})
		}
	}
	for i, n := range b.GapHist { // [i] holds gaps g with g+1 in [2^i, 2^(i+1))
		if n > 0 {
			br.GapHist = append(br.GapHist, Bin{From: 1<<i - 1, To: 1<<(i+1) - 2, Count: n})
		}
	}
	return br
}
