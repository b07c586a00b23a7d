package lab

import (
	"io"
	"math"
)

// PlanResult is what tally plan reports (its JSON form with -json).
type PlanResult struct {
	BER        float64  `json:"ber"`               // the BER to be claimed
	Confidence float64  `json:"confidence"`        // level of the claim
	Errors     int64    `json:"errors"`            // errors allowed in the bits
	Bits       float64  `json:"bits"`              // bits to run (a whole number)
	Rate       float64  `json:"rate,omitempty"`    // line rate, bit/s, when given
	Seconds    *float64 `json:"seconds,omitempty"` // time at that rate, when given (not rounded)
	Method     string   `json:"method"`            // how the bits were found
}

// planMethod names BitsToClaim's method in the JSON.
const planMethod = "exact binomial, one-sided (fewest bits whose one-sided Clopper-Pearson upper limit is at most the BER)"

// maxSeconds is the longest test time plan answers: beyond a billion years there is no
// meaningful plan, and a float64 soon overflows.
const maxSeconds = 1e9 * 365.25 * 86400

const planAbout = `Bits a tester must run, counting at most -errors errors, to show BER ≤ -ber
with the given confidence: the fewest bits whose one-sided exact (Clopper-Pearson)
upper limit is at most -ber, the limit tally interval prints as "one-sided". About
3/ber at 95 % with no errors (close to the Poisson form χ²(C; 2(errors+1))/(2·ber)).
With -rate, also the time at that line rate, rounded up. With -bits, the reverse:
the confidence a run of that many bits reached.`

// Plan is tally plan: bits (and time) to claim a BER, or with -bits the confidence reached.
func Plan(args []string, stdout, stderr io.Writer) int {
	c := newCommand("plan", "-ber BER [-errors K] [-confidence C | -bits N] [-rate R] [-json]", planAbout, stdout, stderr)
	ber := c.fs.Float64("ber", 0, "`BER` to claim, in (0, 1) (required)")
	conf := c.fs.Float64("confidence", 0.95, "confidence `C` of the claim, above 0.5 and at most 0.999999999")
	var errs, bits count
	var lr rate
	c.fs.Var(&errs, "errors", "`K` errors allowed (default 0)")
	c.fs.Var(&bits, "bits", "`N` bits run: print the confidence reached, not the bits needed")
	c.fs.Var(&lr, "rate", "line rate `R` in bit/s, for the time (10e9, 10G, 2.5G, 100M)")
	asJSON := c.fs.Bool("json", false, "print JSON: ber, confidence, errors, bits, seconds, method")
	if code, done := c.parse(args); done {
		return code
	}
	if !c.given("ber") {
		return c.fail("-ber is required (the BER to claim, e.g. -ber 1e-12)")
	}
	if err := checkBER(*ber); err != nil {
		return c.fail("%v", err)
	}
	if lr.set && !(lr.v > 0) {
		return c.fail("-rate %v must be a positive number of bits per second", lr.v)
	}
	r := PlanResult{BER: *ber, Errors: errs.v, Rate: lr.v, Method: planMethod}
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
		if err := guard(func() error { r.Confidence = ConfidenceReached(*ber, errs.v, r.Bits); return nil }); err != nil || math.IsNaN(r.Confidence) {
			return c.fail("%v", errNoAnswer)
		}
	} else {
		if err := CheckConfidence(*conf); err != nil {
			return c.fail("%v", err)
		}
		r.Confidence = *conf
		r.Bits = BitsToClaim(*ber, *conf, errs.v)
		if math.IsInf(r.Bits, 0) || math.IsNaN(r.Bits) || r.Bits > 1e300 {
			return c.fail("-ber %v is too small to plan for: the bits needed overflow", *ber)
		}
	}
	if lr.set {
		s := r.Bits / lr.v
		if !(s <= maxSeconds) {
			return c.fail("at -rate %v bit/s the test would take more than a billion years: no meaningful plan", lr.v)
		}
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
		fprintf(w, "%s in %s bits show BER ≤ %.3g with %s confidence (one-sided).\n", capital(errs), bitsText(r.Bits), r.BER, Percent(r.Confidence))
	} else {
		at := "no errors"
		if r.Errors > 0 {
			at = "at most " + errs
		}
		fprintf(w, "To show BER ≤ %.3g with %s confidence (one-sided), run %s bits (%.3g/BER) with %s.\n",
			r.BER, Percent(r.Confidence), bitsText(r.Bits), r.Bits*r.BER, at)
	}
	if r.Seconds != nil {
		if reverse {
			fprintf(w, "At %s that took %s.\n", lineRate(r.Rate), duration(*r.Seconds))
		} else {
			fprintf(w, "At %s that takes at least %s.\n", lineRate(r.Rate), duration(*r.Seconds))
		}
	}
}

// bitsText is a bit count in groups when it fits an int64, else in e-notation.
func bitsText(n float64) string {
	if n < maxCount {
		return grouped(int64(n))
	}
	return formatG(n)
}
