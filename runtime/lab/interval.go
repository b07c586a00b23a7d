package lab

import (
	"io"
	"strconv"
	"strings"

	"tally/blocks/stats"
)

// IntervalResult is what tally interval reports (its JSON form with -json): the count's
// Assessment, and with -ber the spec and whether the count shows it met.
type IntervalResult struct {
	Assessment
	Spec *float64 `json:"spec,omitempty"` // the -ber given
	Met  *bool    `json:"met,omitempty"`  // Upper ≤ Spec: BER ≤ spec shown at the confidence
}

const intervalAbout = `Estimate of the BER for -errors errors counted in -bits bits, its two-sided
confidence interval, and the one-sided upper limit at the same confidence: "BER ≤
upper" holds with that confidence, the figure that answers "is BER ≤ x shown?".
With -ber, says whether that spec is shown met (one-sided upper limit ≤ -ber), the
same rule tally plan counts bits by. With -stopped the count ran until its last
error (a fixed error target): the estimate and limits are then those of inverse
sampling (method negative-binomial).`

// Interval is tally interval: the estimate, the two-sided interval and the one-sided upper
// limit for a measured count, and with -ber the verdict against a spec.
func Interval(args []string, stdout, stderr io.Writer) int {
	c := newCommand("interval", "-errors K -bits N [-ber B] [-confidence C] [-method M] [-stopped] [-json]", intervalAbout, stdout, stderr)
	var errs, bits count
	c.fs.Var(&errs, "errors", "`K` errors counted (required)")
	c.fs.Var(&bits, "bits", "`N` bits counted (required)")
	spec := c.fs.Float64("ber", 0, "spec `B`: say whether BER ≤ B is shown")
	conf := c.fs.Float64("confidence", 0.95, "confidence `C`, above 0.5 and at most 0.999999999")
	method := c.fs.String("method", stats.Default, "two-sided interval method `M`: "+strings.Join(stats.Methods, ", "))
	stopped := c.fs.Bool("stopped", false, "the count ended at its last error (error-target stop)")
	asJSON := c.fs.Bool("json", false, "print JSON: ber, ci_low, ci_high, upper, confidence, methods, spec, met")
	if code, done := c.parse(args); done {
		return code
	}
	switch {
	case !errs.set:
		return c.fail("-errors is required (the errors counted, e.g. -errors 12)")
	case !bits.set:
		return c.fail("-bits is required (the bits counted, e.g. -bits 1e9)")
	case bits.v < 1:
		return c.fail("-bits %d must be at least 1", bits.v)
	case errs.v > bits.v:
		return c.fail("-errors %d exceed -bits %d", errs.v, bits.v)
	case *stopped && errs.v < 1:
		return c.fail("-stopped needs at least one error (the count ended at its last error)")
	}
	if c.given("ber") {
		if err := checkBER(*spec); err != nil {
			return c.fail("%v", err)
		}
	}
	if err := CheckConfidence(*conf); err != nil {
		return c.fail("%v", err)
	}
	if _, err := stats.MethodNamed(*method); err != nil {
		return c.fail("-method: %v", err)
	}
	a, err := Assess(errs.v, bits.v, *conf, *method, *stopped)
	if err != nil {
		return c.fail("%v", err)
	}
	r := IntervalResult{Assessment: a}
	if c.given("ber") {
		met := a.Shows(*spec)
		r.Spec, r.Met = spec, &met
	}
	if *asJSON {
		return c.printJSON(r)
	}
	w := c.stdout
	noun := "errors"
	if a.Errors == 1 {
		noun = "error"
	}
	if a.Errors == 0 {
		fprintf(w, "No errors in %s bits: BER 0\n", grouped(a.Bits))
	} else {
		fprintf(w, "%s %s in %s bits: BER %.3g\n", grouped(a.Errors), noun, grouped(a.Bits), a.BER)
	}
	switch {
	case a.Errors == 0 && a.Method != stats.InverseMethod:
		fprintf(w, "%s interval (%s): 0 to %.3g (no errors: one-sided at %s)\n", Percent(a.Confidence), a.Method, a.High, Percent(a.Confidence))
	default:
		fprintf(w, "%s two-sided interval (%s): %.3g to %.3g\n", Percent(a.Confidence), a.Method, a.Low, a.High)
	}
	fprintf(w, "%s one-sided upper limit: BER ≤ %.3g\n", Percent(a.Confidence), a.Upper)
	if r.Met != nil {
		u, s := apart(a.Upper, *spec)
		if *r.Met {
			fprintf(w, "Spec BER ≤ %s: met — shown with %s confidence (upper limit %s ≤ %s).\n", s, Percent(a.Confidence), u, s)
		} else {
			fprintf(w, "Spec BER ≤ %s: not shown at %s confidence (upper limit %s > %s); count more bits.\n", s, Percent(a.Confidence), u, s)
		}
	}
	return exitOK
}

// apart writes two numbers with three significant digits, more when three would show them
// equal and they are not.
func apart(a, b float64) (string, string) {
	for p := 3; ; p++ {
		x, y := strconv.FormatFloat(a, 'g', p, 64), strconv.FormatFloat(b, 'g', p, 64)
		if x != y || a == b || p >= 17 {
			return x, y
		}
	}
}
