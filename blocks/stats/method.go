package stats

import (
	"fmt"
	"strings"
)

// Method computes an interval for k errors in n trials at a confidence level in (0, 1).
type Method func(k, n int64, confidence float64) (Estimate, error)

// Default is the interval method used when none is named.
const Default = "clopper-pearson"

// Methods are the names MethodNamed accepts, the default first.
var Methods = []string{"clopper-pearson", "wilson", "jeffreys"}

// MethodNamed returns the interval method of that name: "clopper-pearson", "wilson" or
// "jeffreys" (case and surrounding space ignored). The empty name is the default.
func MethodNamed(name string) (Method, error) {
	switch strings.ToLower(strings.TrimSpace(name)) {
	case "", "clopper-pearson":
		return ClopperPearson, nil
	case "wilson":
		return Wilson, nil
	case "jeffreys":
		return Jeffreys, nil
	}
	return nil, fmt.Errorf("unknown interval method %q (want %s)", name, strings.Join(Methods, ", "))
}

// Interval is the estimate of k errors in n trials by the named method.
func Interval(method string, k, n int64, confidence float64) (Estimate, error) {
	m, err := MethodNamed(method)
	if err != nil {
		return Estimate{}, err
	}
	return m(k, n, confidence)
}
