package longrun

import (
	"fmt"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"tally/blocks/link"
)

// Part names one shard of N: it computes frame f of every point when f mod Of == Index.
type Part struct {
	Index, Of int
}

func (p Part) String() string { return fmt.Sprintf("%d/%d", p.Index, p.Of) }

// ParsePart reads "i/N" (0 ≤ i < N).
func ParsePart(s string) (Part, error) {
	a, b, ok := strings.Cut(strings.TrimSpace(s), "/")
	i, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if !ok || err1 != nil || err2 != nil {
		return Part{}, fmt.Errorf("shard %q: want i/N, as 0/4 (or env)", s)
	}
	return checkPart(i, n, s)
}

func checkPart(i, n int, s string) (Part, error) {
	if n < 1 || i < 0 || i >= n {
		return Part{}, fmt.Errorf("shard %q: index %d must lie in 0..%d (shards are numbered from 0)", s, i, n-1)
	}
	return Part{Index: i, Of: n}, nil
}

// Environment variables a batch system sets, read by PartFromEnv in this order:
//
//	TALLY_SHARD=i/N                               set it yourself (any scheduler, GNU parallel)
//	SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_COUNT    a Slurm job array (--array=a-b[:step]);
//	                                              SLURM_ARRAY_TASK_MIN and _STEP are honoured
//	JOB_COMPLETION_INDEX with TALLY_SHARDS=N      a Kubernetes indexed Job (N = completions)
const (
	EnvShard  = "TALLY_SHARD"
	EnvShards = "TALLY_SHARDS"
)

// PartFromEnv finds this process's shard in the environment (getenv is os.Getenv).
func PartFromEnv(getenv func(string) string) (Part, error) {
	if s := getenv(EnvShard); s != "" {
		p, err := ParsePart(s)
		if err != nil {
			return p, fmt.Errorf("%s: %w", EnvShard, err)
		}
		return p, nil
	}
	num := func(name string, def int) (int, error) {
		s := getenv(name)
		if s == "" {
			return def, nil
		}
		v, err := strconv.Atoi(s)
		if err != nil {
			return 0, fmt.Errorf("%s=%q is not a whole number", name, s)
		}
		return v, nil
	}
	if getenv("SLURM_ARRAY_TASK_ID") != "" {
		id, err := num("SLURM_ARRAY_TASK_ID", 0)
		if err != nil {
			return Part{}, err
		}
		count, err := num("SLURM_ARRAY_TASK_COUNT", 0)
		if err != nil {
			return Part{}, err
		}
		min, err := num("SLURM_ARRAY_TASK_MIN", 0)
		if err != nil {
			return Part{}, err
		}
		step, err := num("SLURM_ARRAY_TASK_STEP", 1)
		if err != nil || step < 1 {
			return Part{}, fmt.Errorf("SLURM_ARRAY_TASK_STEP=%q is not a positive number", getenv("SLURM_ARRAY_TASK_STEP"))
		}
		if count == 0 {
			return Part{}, fmt.Errorf("SLURM_ARRAY_TASK_ID is set but SLURM_ARRAY_TASK_COUNT is not")
		}
		return checkPart((id-min)/step, count, fmt.Sprintf("slurm task %d of %d", id, count))
	}
	if getenv("JOB_COMPLETION_INDEX") != "" {
		i, err := num("JOB_COMPLETION_INDEX", 0)
		if err != nil {
			return Part{}, err
		}
		n, err := num(EnvShards, 0)
		if err != nil {
			return Part{}, err
		}
		if n == 0 {
			return Part{}, fmt.Errorf("JOB_COMPLETION_INDEX is set: set %s to the job's completions too", EnvShards)
		}
		return checkPart(i, n, fmt.Sprintf("completion index %d of %d", i, n))
	}
	return Part{}, fmt.Errorf("-shard env: none of %s, SLURM_ARRAY_TASK_ID or JOB_COMPLETION_INDEX is set", EnvShard)
}

// ShardDir is the folder of the shard files of the run whose outputs go to dir.
func ShardDir(dir string) string { return filepath.Join(dir, "shards") }

// ShardPath is the file of shard p in the shard folder of outputs dir.
func ShardPath(dir string, p Part) string {
	return filepath.Join(ShardDir(dir), fmt.Sprintf("shard-%d-of-%d.tally", p.Index, p.Of))
}

// ShardFile is what one shard computed: for every point, the counts of each of its frames,
// in order (frame k·Of+Index is its k-th). Per-frame counts, not sums, because the merge
// replays the prefix frame by frame to find where a single run would have stopped.
type ShardFile struct {
	Name   string       `json:"experiment"`
	Script string       `json:"script"` // the path the run was given
	SHA256 string       `json:"script_sha256"`
	Seed   uint64       `json:"seed"`
	Index  int          `json:"shard"`
	Of     int          `json:"shards"`
	Host   string       `json:"host,omitempty"` // the machine that last ran it
	Points []ShardPoint `json:"points"`
}

// ShardPoint is one point's frames computed by a shard.
type ShardPoint struct {
	Index   int       `json:"point"`
	Values  []float64 `json:"values"`
	Taps    []string  `json:"taps"`    // what the link counts (links may differ by point)
	Frames  int64     `json:"frames"`  // this shard's frames: k·Of+Index for k < Frames
	Done    bool      `json:"done"`    // the shard's estimate met a rule (see engine.Shard)
	Stop    string    `json:"stop"`    // that rule, or "interrupted"
	Seconds float64   `json:"seconds"` // wall time this shard spent on it
	// Runs are the per-frame counts, run-length coded (frames without errors repeat):
	// [n, trials, errors, trials, errors, …] for n consecutive frames with these counts per tap.
	Runs [][]int64 `json:"runs"`
	// Weights are, when the point's link estimates with weights (format v2), one row per frame:
	// per tap the estimator, the frame's Σ weights and Σ weights². Absent in plain counting.
	Weights [][]float64 `json:"weights,omitempty"`
	// Fingerprint is the link fingerprint its frames were computed under (format v3; empty
	// when unknown or mixed: the merge then keeps no per-frame counts of the point).
	Fingerprint string `json:"link_fingerprint,omitempty"`

	starts []int64 // frame number (of this shard) where each run begins; built by index
}

// Add appends one frame's counts.
func (p *ShardPoint) Add(c []link.Tally) {
	if weighted(c) || len(p.Weights) > 0 {
		for int64(len(p.Weights)) < p.Frames {
			p.Weights = append(p.Weights, make([]float64, 3*len(c)))
		}
		row := make([]float64, 3*len(c))
		for i, t := range c {
			row[3*i], row[3*i+1], row[3*i+2] = float64(t.Estimator), t.Weight, t.WeightSquares
		}
		p.Weights = append(p.Weights, row)
	}
	if k := len(p.Runs); k > 0 && same(p.Runs[k-1], c) {
		p.Runs[k-1][0]++
	} else {
		r := make([]int64, 1+2*len(c))
		r[0] = 1
		for i, t := range c {
			r[1+2*i], r[2+2*i] = t.Trials, t.Errors
		}
		p.Runs = append(p.Runs, r)
	}
	p.Frames++
	p.starts = nil
}

func weighted(c []link.Tally) bool {
	for _, t := range c {
		if t.Estimator != link.Count {
			return true
		}
	}
	return false
}

// weigh puts frame k's weighted sums into its counts c.
func (p *ShardPoint) weigh(k int64, c []link.Tally) {
	if k >= int64(len(p.Weights)) {
		return
	}
	row := p.Weights[k]
	for i := range c {
		c[i].Estimator, c[i].Weight, c[i].WeightSquares = link.Estimator(row[3*i]), row[3*i+1], row[3*i+2]
	}
}

func same(r []int64, c []link.Tally) bool {
	if len(r) != 1+2*len(c) {
		return false
	}
	for i, t := range c {
		if r[1+2*i] != t.Trials || r[2+2*i] != t.Errors {
			return false
		}
	}
	return true
}

// Sum is the total of the point's frames in this shard.
func (p *ShardPoint) Sum() []link.Tally {
	s := make([]link.Tally, len(p.Taps))
	if len(p.Weights) > 0 { // frame by frame, in order, as the engine adds them
		for k := range p.Frames {
			c, _ := p.Frame(k)
			for i := range s {
				s[i].Add(c[i])
			}
		}
		return s
	}
	for _, r := range p.Runs {
		for i := range s {
			e := r[2+2*i]
			s[i].Trials += r[0] * r[1+2*i]
			s[i].Errors += r[0] * e
			s[i].Frames += r[0]
			s[i].Squares += r[0] * e * e
		}
	}
	return s
}

// Frame is the counts of this shard's k-th frame of the point.
func (p *ShardPoint) Frame(k int64) ([]link.Tally, bool) {
	if k < 0 || k >= p.Frames {
		return nil, false
	}
	if p.starts == nil {
		p.index()
	}
	j := sort.Search(len(p.starts), func(j int) bool { return p.starts[j] > k }) - 1
	r := p.Runs[j]
	c := make([]link.Tally, (len(r)-1)/2)
	for i := range c {
		c[i] = link.Tally{Trials: r[1+2*i], Errors: r[2+2*i]}
	}
	p.weigh(k, c)
	return c, true
}

func (p *ShardPoint) index() {
	p.starts = make([]int64, len(p.Runs))
	var n int64
	for j, r := range p.Runs {
		p.starts[j] = n
		n += r[0]
	}
}

// check verifies the runs add up to the frames and fit the taps.
func (p *ShardPoint) check() error {
	taps := len(p.Taps)
	var n int64
	for _, r := range p.Runs {
		if len(r) != 1+2*taps || r[0] < 1 {
			return fmt.Errorf("point %d: a run of frame counts does not fit %d taps", p.Index, taps)
		}
		n += r[0]
	}
	if n != p.Frames {
		return fmt.Errorf("point %d: runs hold %d frames, the point says %d", p.Index, n, p.Frames)
	}
	if len(p.Weights) != 0 && int64(len(p.Weights)) != p.Frames {
		return fmt.Errorf("point %d: weights for %d frames, the point has %d", p.Index+1, len(p.Weights), p.Frames)
	}
	for _, w := range p.Weights {
		if len(w) != 3*taps {
			return fmt.Errorf("point %d: a frame's weights do not fit %d taps", p.Index+1, taps)
		}
	}
	return nil
}

// Point is the shard's point index, or nil.
func (s *ShardFile) Point(index int) *ShardPoint {
	for i := range s.Points {
		if s.Points[i].Index == index {
			return &s.Points[i]
		}
	}
	return nil
}

// Part is the shard's place among its shards.
func (s *ShardFile) Part() Part { return Part{Index: s.Index, Of: s.Of} }

// LoadShard reads and checks a shard file.
func LoadShard(path string) (*ShardFile, error) {
	var s ShardFile
	if err := Load(path, KindShard, &s); err != nil {
		return nil, err
	}
	if s.Of < 1 || s.Index < 0 || s.Index >= s.Of {
		return nil, fmt.Errorf("%s: shard %d of %d is not a shard", path, s.Index, s.Of)
	}
	for i := range s.Points {
		p := &s.Points[i]
		if i > 0 && p.Index <= s.Points[i-1].Index {
			return nil, fmt.Errorf("%s: points out of order", path)
		}
		if err := p.check(); err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
	}
	return &s, nil
}
