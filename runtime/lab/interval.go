package lab

import (
	"io"
	"strings"

	"tally/blocks/stats"
)

// IntervalResult is what tally interval reports (its JSON form with -json).
type IntervalResult struct {
	Errors     int64   `json:"errors"`
	Bits       int64   `json:"bits"`
	BER        float64 `json:"ber"`     // estimate
	Low        float64 `json:"ci_low"`  // lower confidence limit (0 with no errors)
	High       float64 `json:"ci_high"` // upper confidence limit (one-sided with no errors)
	Confidence float64 `json:"confidence"`
	Method     string  `json:"method"`
}

const intervalAbout = `Estimate and confidence interval of the BER for -errors errors counted in -bits
bits. With no errors the upper limit is a one-sided bound. With -stopped the count
ran until its last error (a fixed error target): the estimate and interval are then
those of inverse sampling (method negative-binomial).`

// Interval is tally interval: the estimate and interval for a measured count.
func Interval(args []string, stdout, stderr io.Writer) int {
	c := newCommand("interval", "-errors K -bits N [-confidence C] [-method M] [-stopped] [-json]", intervalAbout, stdout, stderr)
	var errs, bits count
	c.fs.Var(&errs, "errors", "`K` errors counted (required)")
	c.fs.Var(&bits, "bits", "`N` bits counted (required)")
	conf := c.fs.Float64("confidence", 0.95, "confidence `C` of the interval, in (0, 1)")
	method := c.fs.String("method", stats.Default, "interval method `M`: "+strings.Join(stats.Methods, ", "))
	stopped := c.fs.Bool("stopped", false, "the count ended at its last error (error-target stop)")
	asJSON := c.fs.Bool("json", false, "print JSON: ber, ci_low, ci_high, confidence, method")
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
	if err := checkConfidence(*conf); err != nil {
		return c.fail("%v", err)
	}
	m, err := stats.MethodNamed(*method)
	if err != nil {
		return c.fail("-method: %v", err)
	}
	var e stats.Estimate
	if perr := guard(func() {
		if *stopped {
			e, err = stats.InverseSampling(errs.v, bits.v, bits.v, errs.v, *conf)
		} else {
			e, err = m(errs.v, bits.v, *conf)
		}
	}); perr != nil {
		err = perr
	}
	if err != nil {
		return c.fail("%v", err)
	}
	r := IntervalResult{Errors: errs.v, Bits: bits.v, BER: e.Rate, Low: e.Low, High: e.High, Confidence: *conf, Method: e.Method}
	if *asJSON {
		return c.printJSON(r)
	}
	w := c.stdout
	switch {
	case r.Errors == 0:
		fprintf(w, "No errors in %s bits: BER ≤ %.3g with %s confidence (one-sided, %s).\n",
			grouped(r.Bits), r.High, percent(r.Confidence), r.Method)
	default:
		noun := "errors"
		if r.Errors == 1 {
			noun = "error"
		}
		fprintf(w, "%s %s in %s bits: BER %.3g\n", grouped(r.Errors), noun, grouped(r.Bits), r.BER)
		fprintf(w, "%s interval (%s): %.3g to %.3g\n", percent(r.Confidence), r.Method, r.Low, r.High)
	}
	return exitOK
}
