package result

// Comparison is a variant compared with the reference on the same frames (a paired
// comparison): both error rates of the BER tap, their difference Rate − RateRef and ratio
// Rate / RateRef with intervals at the run's confidence, the p-value of no difference, and the
// verdict in words. OnlyRef and OnlyVariant are the discordant bits: wrong in the reference
// only, wrong in the variant only. Method names the paired method behind the intervals and p.
type Comparison struct {
	Against     string  `json:"against"` // the reference variant's name
	Variant     string  `json:"variant"`
	RateRef     float64 `json:"ber_ref"`
	Rate        float64 `json:"ber"`
	Diff        float64 `json:"diff"`
	DiffLow     float64 `json:"diff_low"`
	DiffHigh    float64 `json:"diff_high"`
	Ratio       float64 `json:"ratio"`
	RatioLow    float64 `json:"ratio_low"`
	RatioHigh   float64 `json:"ratio_high"`
	P           float64 `json:"diff_p"`
	Shown       bool    `json:"shown"` // the difference is shown at the run's confidence
	Verdict     string  `json:"verdict"`
	Method      string  `json:"method"`
	OnlyRef     int64   `json:"only_ref"`
	OnlyVariant int64   `json:"only_variant"`
	// Narrower is how many times narrower the paired interval on the difference is than an
	// unpaired comparison of the same counts would give (stats.CompareUnpaired): what running
	// the variants on the same frames bought. NaN when either width is not defined.
	Narrower float64 `json:"narrower_than_unpaired"`
}

// Paired reports whether any point of the run carries a comparison.
func (r *Run) Paired() bool {
	for _, p := range r.Points {
		if p.Paired != nil {
			return true
		}
	}
	return false
}
