package lab

import (
	"io"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// PlanResult is what tally plan reports (its JSON form with -json).
type PlanResult struct {
	BER        float64  `json:"ber"`               // the BER to be claimed
	Confidence float64  `json:"confidence"`        // level of the claim
	Errors     int64    `json:"errors"`            // errors allowed in the bits
	Bits       float64  `json:"bits"`              // bits to run (a whole number)
	Rate       float64  `json:"rate,omitempty"`    // line rate, bit/s, when given
	Seconds    *float64 `json:"seconds,omitempty"` // time at that rate, when given
}

// BitsToClaim is the number of bits in which at most k errors show BER ≤ ber at the given
// confidence: the Poisson form n = χ²(confidence; 2(k+1)) / (2·ber), rounded up (exact for
// the Poisson count, and within a bit or so of the binomial for a BER well below 1e-2).
// k = 0 gives −ln(1 − confidence)/ber, about 3/ber at 95 %.
func BitsToClaim(ber, confidence float64, k int64) float64 {
	q := distuv.ChiSquared{K: 2 * float64(k+1)}.Quantile(confidence)
	return math.Ceil(q / (2 * ber))
}

// ConfidenceReached is the confidence with which at most k errors in n bits show
// BER ≤ ber: P(χ²(2(k+1)) ≤ 2·ber·n), the reverse of BitsToClaim.
func ConfidenceReached(ber float64, k int64, n float64) float64 {
	return distuv.ChiSquared{K: 2 * float64(k+1)}.CDF(2 * ber * n)
}

const planAbout = `Bits a tester must run, counting at most -errors errors, to claim BER ≤ -ber
with the given confidence (Poisson form: bits = χ²(confidence; 2(errors+1)) / (2·ber),
about 3/ber at 95 % with no errors). With -rate, also the time at that line rate.
With -bits, the reverse: the confidence a run of that many bits reached.`

// Plan is tally plan: bits (and time) to claim a BER, or with -bits the confidence reached.
func Plan(args []string, stdout, stderr io.Writer) int {
	c := newCommand("plan", "-ber BER [-errors K] [-confidence C | -bits N] [-rate R] [-json]", planAbout, stdout, stderr)
	ber := c.fs.Float64("ber", 0, "`BER` to claim, in (0, 1) (required)")
	conf := c.fs.Float64("confidence", 0.95, "confidence `C` of the claim, in (0, 1)")
	var errs, bits count
	c.fs.Var(&errs, "errors", "`K` errors allowed (default 0)")
	c.fs.Var(&bits, "bits", "`N` bits run: print the confidence reached, not the bits needed")
	rate := c.fs.Float64("rate", 0, "line rate `R` in bit/s, for the time (e.g. 10e9)")
	asJSON := c.fs.Bool("json", false, "print JSON: ber, confidence, errors, bits, seconds")
	if code, done := c.parse(args); done {
		return code
	}
	if !c.given("ber") {
		return c.fail("-ber is required (the BER to claim, e.g. -ber 1e-12)")
	}
	if err := checkBER(*ber); err != nil {
		return c.fail("%v", err)
	}
	if c.given("rate") && !(*rate > 0 && !math.IsInf(*rate, 1)) {
		return c.fail("-rate %v must be a positive number of bits per second", *rate)
	}
	r := PlanResult{BER: *ber, Errors: errs.v, Rate: *rate}
	if bits.set {
		if c.given("confidence") {
			return c.fail("give -confidence or -bits, not both (with -bits the confidence is the answer)")
		}
		if bits.v < 1 {
			return c.fail("-bits %d must be at least 1", bits.v)
		}
		if errs.v > bits.v {
			return c.fail("-errors %d exceed -bits %d", errs.v, bits.v)
		}
		r.Bits = float64(bits.v)
		if err := guard(func() { r.Confidence = ConfidenceReached(*ber, errs.v, r.Bits) }); err != nil {
			return c.fail("%v", err)
		}
	} else {
		if err := checkConfidence(*conf); err != nil {
			return c.fail("%v", err)
		}
		r.Confidence = *conf
		if err := guard(func() { r.Bits = BitsToClaim(*ber, *conf, errs.v) }); err != nil {
			return c.fail("%v", err)
		}
		if math.IsInf(r.Bits, 0) || math.IsNaN(r.Bits) || r.Bits > 1e300 {
			return c.fail("-ber %v is too small to plan for", *ber)
		}
	}
	if *rate > 0 {
		s := r.Bits / *rate
		r.Seconds = &s
	}
	if *asJSON {
		return c.printJSON(r)
	}
	printPlan(c, r, bits.set)
	return exitOK
}

func printPlan(c *command, r PlanResult, reverse bool) {
	w := c.stdout
	errs := "no errors"
	if r.Errors == 1 {
		errs = "1 error"
	} else if r.Errors > 1 {
		errs = grouped(r.Errors) + " errors"
	}
	if reverse {
		fprintf(w, "%s in %s bits show BER ≤ %.3g with %s confidence.\n", capital(errs), bitsText(r.Bits), r.BER, percent(r.Confidence))
	} else {
		at := "no errors"
		if r.Errors > 0 {
			at = "at most " + errs
		}
		fprintf(w, "To show BER ≤ %.3g with %s confidence, run %s bits (%.3g/BER) with %s.\n",
			r.BER, percent(r.Confidence), bitsText(r.Bits), r.Bits*r.BER, at)
	}
	if r.Seconds != nil {
		fprintf(w, "At %s that takes %s.\n", lineRate(r.Rate), duration(*r.Seconds))
	}
}

// bitsText is a bit count in groups when it fits an int64, else in e-notation.
func bitsText(n float64) string {
	if n < maxCount {
		return grouped(int64(n))
	}
	return formatG(n)
}
