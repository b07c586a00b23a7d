package longrun

import (
	"fmt"
	"path/filepath"
	"strings"
)

// PlanName is the file a short merge leaves in the shard folder for the next round.
const PlanName = "extend.tally"

// Plan is what a merge found missing: per point, the frames the merged prefix should reach.
// A shard run with -extend reads it and computes its share up to there.
type Plan struct {
	SHA256 string       `json:"script_sha256"`
	Seed   uint64       `json:"seed"`
	Of     int          `json:"shards"`
	Points []ShortPoint `json:"points"`
}

// ShortPoint is a point whose merged frames ran out before a rule was met.
type ShortPoint struct {
	Index   int    `json:"point"`
	Label   string `json:"label"`   // "ebn0_db=6", for messages
	Covered int64  `json:"covered"` // frames the shards held in order
	Need    int64  `json:"need"`    // frames the prefix should reach (an estimate; 0: unknown)
}

// PlanPath is the plan's file in the shard folder of outputs dir.
func PlanPath(dir string) string { return filepath.Join(ShardDir(dir), PlanName) }

// LoadPlan reads and checks a plan.
func LoadPlan(path string) (*Plan, error) {
	var p Plan
	if err := Load(path, KindPlan, &p); err != nil {
		return nil, err
	}
	return &p, nil
}

// Target is the frames the merged prefix of point index should reach, or 0.
func (p *Plan) Target(index int) int64 {
	for _, s := range p.Points {
		if s.Index == index {
			return s.Need
		}
	}
	return 0
}

// MinFrames is how many of its own frames shard part must compute so that, with every shard
// doing likewise, the merged prefix reaches total frames: frames i, i+N, … below total.
func MinFrames(total int64, part Part) int64 {
	if total <= int64(part.Index) {
		return 0
	}
	n := int64(part.Of)
	return (total - int64(part.Index) + n - 1) / n
}

// ShortError is a merge whose shards did not cover every point far enough.
type ShortError struct {
	Of     int
	Points []ShortPoint
}

func (e *ShortError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "the shards do not cover enough frames for %d point(s):", len(e.Points))
	for _, p := range e.Points {
		fmt.Fprintf(&b, "\n  point %d (%s): %d frames in order, the rules not met", p.Index, p.Label, p.Covered)
		if p.Need > 0 {
			more := MinFrames(p.Need, Part{Index: 0, Of: e.Of}) - MinFrames(p.Covered, Part{Index: 0, Of: e.Of})
			fmt.Fprintf(&b, "; about %d frames needed (%d more per shard)", p.Need, max(more, 1))
		} else {
			b.WriteString("; no estimate (no shard has counted enough of it)")
		}
	}
	return b.String()
}
