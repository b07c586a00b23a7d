package runner

import "regexp"

// funcPrefix is the "stats.AtTarget: " a library function puts in front of its errors.
var funcPrefix = regexp.MustCompile(`^[a-z]+\.[A-Z]\w*: `)

// note is err's message for a target's note in the outputs: the library function's name the
// error starts with is of no use to the reader ("the curve does not reach 1e-06 in the sweep",
// not "stats.AtTarget: the curve …").
func note(err error) string { return funcPrefix.ReplaceAllString(err.Error(), "") }
