package result

// Execution is how a run was computed (run.json "execution"): in the interpreter throughout,
// compiled throughout, or begun in the interpreter and handed over to the compiled script at a
// commit boundary (At), which gives the same table.
type Execution struct {
	How string `json:"how"` // "interpreted", "handed-over" or "compiled"
	// At is where a handed-over run changed hands: the compiled program computed point
	// At.Point from frame At.Frame on, and every point after it.
	At *Spot `json:"handed_over_at,omitempty"`
	// BuildSeconds is the wall time the build took (0: found built in the cache).
	BuildSeconds float64 `json:"build_seconds,omitempty"`
	// Why, for a run that stayed interpreted, says why it was not handed over.
	Why string `json:"why,omitempty"`
}

// Spot is a place in a run: point Point (from 0) after Frame committed frames.
type Spot struct {
	Point int   `json:"point"`
	Frame int64 `json:"frame"`
}
