package longrun

import (
	"fmt"
	"path/filepath"

	"tally/blocks/link"
	"tally/runtime/framelog"
)

// CheckpointName is the checkpoint's file name in a run's outputs folder.
const CheckpointName = "checkpoint.tally"

// Checkpoint is what a run has committed so far: per finished point its final counts and
// stop, and for the point in progress its committed prefix (frames 0..Frames-1). Resuming
// gives each point its saved state back; the engine judges the rules on it first, so a
// finished point ends again for the same rule and the one in progress goes on at frame Frames.
type Checkpoint struct {
	Name   string       `json:"experiment"`
	Script string       `json:"script"`
	SHA256 string       `json:"script_sha256"`
	Seed   uint64       `json:"seed"`
	Points []PointState `json:"points"`
}

// PointState is one point's committed prefix.
type PointState struct {
	Index  int        `json:"point"`
	Values []float64  `json:"values"`
	Frames int64      `json:"frames"`
	Taps   []string   `json:"taps"`   // what the link counts (links may differ by point)
	Counts [][4]int64 `json:"counts"` // per tap: trials, errors, frames, Σ errors²
	// Weights, per tap, are the estimators' sums: estimator, Σ weights, Σ weights², Σ over
	// frames of the frame's Σ weights squared (format v2; absent in plain counting).
	Weights [][4]float64 `json:"weights,omitempty"`
	Stop    string       `json:"stop,omitempty"` // the rule that ended it; empty while in progress
	Seconds float64      `json:"seconds"`        // wall time spent on it
	// Log is the prefix frame by frame (format v3), so a resumed run keeps the per-frame
	// counts of the frames it did not compute again. Absent: the run ends without them.
	Log *framelog.Log `json:"frame_log,omitempty"`
	// Fingerprint is the link fingerprint the frames were computed under (format v3).
	Fingerprint string `json:"link_fingerprint,omitempty"`
}

// CheckpointPath is the checkpoint of the run whose outputs go to dir.
func CheckpointPath(dir string) string { return filepath.Join(dir, CheckpointName) }

// LoadCheckpoint reads and checks a checkpoint.
func LoadCheckpoint(path string) (*Checkpoint, error) {
	var c Checkpoint
	if err := Load(path, KindCheckpoint, &c); err != nil {
		return nil, err
	}
	for i, p := range c.Points {
		if p.Index < 0 || i > 0 && p.Index <= c.Points[i-1].Index || p.Frames < 0 || len(p.Counts) != len(p.Taps) ||
			len(p.Weights) != 0 && len(p.Weights) != len(p.Taps) {
			return nil, fmt.Errorf("%s: point %d is inconsistent", path, p.Index)
		}
		if p.Log != nil && (p.Log.Check() != nil || p.Log.Frames != p.Frames && !p.Log.Dropped) {
			return nil, fmt.Errorf("%s: point %d: its frame log does not match its frames", path, p.Index)
		}
		if p.Stop == "" && i != len(c.Points)-1 {
			return nil, fmt.Errorf("%s: point %d is unfinished but not the last", path, p.Index)
		}
	}
	return &c, nil
}

// Point is the saved state of point index, or nil.
func (c *Checkpoint) Point(index int) *PointState {
	for i := range c.Points {
		if c.Points[i].Index == index {
			return &c.Points[i]
		}
	}
	return nil
}

// Set records the state of a point, replacing any earlier state of it.
func (c *Checkpoint) Set(p PointState) {
	if q := c.Point(p.Index); q != nil {
		*q = p
		return
	}
	c.Points = append(c.Points, p)
}

// Pack turns tallies into the file's rows: trials, errors, frames, Σ errors².
func Pack(t []link.Tally) [][4]int64 {
	p := make([][4]int64, len(t))
	for i, c := range t {
		p[i] = [4]int64{c.Trials, c.Errors, c.Frames, c.Squares}
	}
	return p
}

// Unpack turns the file's rows into tallies.
func Unpack(p [][4]int64) []link.Tally {
	t := make([]link.Tally, len(p))
	for i, c := range p {
		t[i] = link.Tally{Trials: c[0], Errors: c[1], Frames: c[2], Squares: c[3]}
	}
	return t
}

// SetTallies records the counts and weighted sums of the point's taps.
func (p *PointState) SetTallies(t []link.Tally) {
	p.Counts, p.Weights = Pack(t), nil
	for _, c := range t {
		if c.Estimator != link.Count {
			p.Weights = make([][4]float64, len(t))
			for i, c := range t {
				p.Weights[i] = [4]float64{float64(c.Estimator), c.Weight, c.WeightSquares, c.FrameWeights}
			}
			break
		}
	}
}

// Tallies are the point's saved counts with their weighted sums.
func (p *PointState) Tallies() []link.Tally {
	t := Unpack(p.Counts)
	for i, w := range p.Weights {
		if i < len(t) {
			t[i].Estimator, t[i].Weight, t[i].WeightSquares, t[i].FrameWeights = link.Estimator(w[0]), w[1], w[2], w[3]
		}
	}
	return t
}
