// Package result is the value a finished run produces: what the writers put in table.csv,
// run.json and README.md, and what plots draw. It knows nothing of how the run was computed.
package result

import (
	"encoding/json"
	"math"
	"strconv"
	"time"

	"tally/runtime/framelog"
)

// Run is a finished (or interrupted) run of one experiment.
type Run struct {
	Name         string     `json:"name"`          // the experiment's title
	Script       string     `json:"script"`        // script file name (base name)
	ScriptSHA256 string     `json:"script_sha256"` // hash of the script's bytes
	Tool         string     `json:"tool_version"`
	GoVersion    string     `json:"go_version"`
	Mode         string     `json:"mode"` // "interpreted" or "compiled"
	Seed         uint64     `json:"seed"`
	Workers      int        `json:"workers"`
	Confidence   float64    `json:"confidence"`
	Method       string     `json:"interval_method"`  // the method chosen; each estimate names what it used
	Params       []string   `json:"params"`           // swept parameter names, x axis first
	Labels       [][]string `json:"labels,omitempty"` // per parameter, the names of its values (nil: numeric)
	Taps         []string   `json:"taps"`             // what the link counted
	Theory       []string   `json:"theory"`           // theory curve names
	Points       []Point    `json:"points"`
	Targets      []Target   `json:"targets,omitempty"`
	Limits       []Limit    `json:"limits,omitempty"` // theory curves no link can beat, per tap
	Notes        []string   `json:"notes,omitempty"`  // findings the summary must show
	Inputs       []Input    `json:"inputs,omitempty"` // files the script read (sim.ReadFile)
	Interrupted  bool       `json:"interrupted"`
	// Shards, for a run merged from shard files (tally merge), says where its frames came from.
	Shards *Shards `json:"shards,omitempty"`
	// Shown are the taps the plot and README.md show, the governing one (the tap the stop
	// rules judge, or the script's choice) first; empty in records from before: the BER tap.
	Shown []string `json:"shown,omitempty"`
	// Specs are the rates the stop rules claim a tap below or above (stop.Below, stop.Above).
	Specs []Spec `json:"specs,omitempty"`

	// Execution, for a run tally started, says how it was computed: interpreted, compiled, or
	// handed over from the interpreter to the compiled script (Mode names the last).
	Execution *Execution `json:"execution,omitempty"`

	// Scatter is one frame's received samples at a chosen point, for the constellation plot
	// (not part of run.json: the plot is the record).
	Scatter *Scatter  `json:"-"`
	Start   time.Time `json:"start"`
	End     time.Time `json:"end"`
}

// Shards is the record of a run merged from the shard files of Count shards: which files,
// where they ran, the bits each computed, and how many more bits they computed in all than
// one machine would have for the same table (each shard runs on an estimate of the others).
type Shards struct {
	Count int         `json:"count"`
	Files []ShardFile `json:"files"` // by shard index
	Bits  int64       `json:"bits_computed"`
	Used  int64       `json:"bits_used"` // the bits the table counts: one machine's run
	// Overshoot is (Bits − Used) / Used: the bits computed beyond one machine's, as a multiple
	// of one machine's (0.5: half as many again).
	Overshoot float64 `json:"overshoot"`
}

// ShardFile is one shard file a merged run read.
type ShardFile struct {
	Shard  int    `json:"shard"`
	File   string `json:"file"`           // its base name
	SHA256 string `json:"sha256"`         // of the file's bytes
	Host   string `json:"host,omitempty"` // the machine that last wrote it, when it said
	Bits   int64  `json:"bits_computed"`  // bits of the BER tap it computed, over all points
}

// Point is one sweep point's outcome.
type Point struct {
	Values  []float64 `json:"values"` // one per Params
	Frames  int64     `json:"frames"`
	Taps    []Tap     `json:"taps"` // one per Run.Taps
	Stop    string    `json:"stop"` // the rule that ended the point, "interrupted", or "skipped"
	Theory  []float64 `json:"theory"`
	Seconds float64   `json:"wall_seconds"`
	BitRate float64   `json:"bits_per_second"`
	Note    string    `json:"note,omitempty"` // why a point was skipped
	// LinkFingerprint is a digest of everything that decides the point's frames (the program,
	// seed, point and its link as built: every block with its parameters); WholeScript says it
	// covers the whole script too, since the link holds a block or function of the script's
	// own. RulesFingerprint is the digest of the stop rules. Two points with one link
	// fingerprint compute the same counts for every frame.
	LinkFingerprint  string `json:"link_fingerprint,omitempty"`
	WholeScript      bool   `json:"link_fingerprint_covers_script,omitempty"`
	RulesFingerprint string `json:"rules_fingerprint,omitempty"`
	// FramesReused are the frames taken from the last good run's per-frame counts instead of
	// computed (tally watch: a point whose link is unchanged).
	FramesReused int64 `json:"frames_reused,omitempty"`
	// Log is the point's committed per-frame counts (frames.gz beside run.json; nil when not
	// kept: a shard, an estimator's weighted counts, or an older results folder).
	Log *framelog.Log `json:"-"`
	// Claim names the test behind the claim the stop word makes ("below", "above": the rate
	// shown below or above a target), empty when the rule that ended the point claims
	// nothing (a bit or time cap, an error count).
	Claim string `json:"claim,omitempty"`
	// Paired, on a variant's row of a paired comparison (sim's Variants) other than the
	// reference's, compares it with the reference on the same frames (see Comparison).
	Paired *Comparison `json:"paired,omitempty"`
}

// Tap is what one tap counted at a point, with its estimate.
type Tap struct {
	Name   string  `json:"name"`
	Trials int64   `json:"trials"`
	Errors int64   `json:"errors"`
	Rate   float64 `json:"rate"`
	Low    float64 `json:"ci_low"`
	High   float64 `json:"ci_high"`
	Method string  `json:"method"`
	Absent bool    `json:"absent,omitempty"` // the point's link has no such tap
	// Dispersion is the spread of errors between frames against independent errors (1); the
	// interval is widened ("+clustered" in Method) when the burst test shows it above 1. 0:
	// not judged.
	Dispersion float64 `json:"dispersion,omitempty"`
	// Estimator names a tap's weighted estimator ("importance-sampling", "semi-analytic"; empty
	// for counted errors, "not-estimated" for a tap the estimator does not serve); its interval
	// comes from the variance of the weighted sums between frames (IntervalFrom). Effective is
	// Kish's effective sample size of the weights, Degenerate flags weights that degenerated
	// (the interval is not to be read as precise), PlainBits the bits plain counting would need
	// for the same precision at the estimated rate.
	Estimator    string  `json:"estimator,omitempty"`
	IntervalFrom string  `json:"interval_from,omitempty"`
	Effective    float64 `json:"effective_samples,omitempty"`
	Degenerate   bool    `json:"degenerate,omitempty"`
	PlainBits    float64 `json:"plain_bits_needed,omitempty"`
	// BurstTest names the method that judged whether the errors came in bursts (see
	// stats.BurstTest); the interval is widened only when that test says so.
	BurstTest string `json:"burst_test,omitempty"`
}

// Weighted reports whether the tap was estimated with weights.
func (t Tap) Weighted() bool { return t.Estimator != "" && !t.Absent }

// Target is the swept value at which a tap crosses a target error rate.
type Target struct {
	Tap     string  `json:"tap"`
	Rate    float64 `json:"target"`
	Curve   string  `json:"curve,omitempty"` // the value of the second sweep parameter, for grids
	Found   bool    `json:"found"`
	X       float64 `json:"x"`
	Low     float64 `json:"x_low"`                // −Inf (null in run.json) when open below
	High    float64 `json:"x_high"`               // +Inf (null in run.json) when open above
	Against string  `json:"against,omitempty"`    // theory curve compared with
	Penalty float64 `json:"penalty_db,omitempty"` // X minus the theory's value at the target, in Unit
	TheoryX float64 `json:"theory_x,omitempty"`   // where the theory curve reaches the target
	// Gain is how much less of the swept value this curve needs than the first curve (in Unit;
	// the JSON names keep "_db" from when every axis was taken to be in dB), GainOver names
	// it: the coding gain when the curves are uncoded and coded links on an Eb/N0 axis.
	Gain     float64 `json:"gain_db,omitempty"`
	GainOver string  `json:"gain_over,omitempty"`
	// Unit is the swept axis's unit, read from the parameter's name (ebn0_db: "dB",
	// drift_ppm: "ppm"; "" for a name without one).
	Unit string `json:"unit,omitempty"`
	// Method says how X and its interval were found, the claim's method.
	Method string `json:"method,omitempty"`
	Note   string `json:"note,omitempty"`
	// Open says why an end of the interval is open: the points' limits do not close it inside
	// the sweep on that side.
	Open string `json:"open,omitempty"`
}

// Spec is a rate a stop rule shows a tap below or above (stop.Below, stop.Above): the plot
// draws it as a line in the tap's panel.
type Spec struct {
	Tap  string  `json:"tap"`
	Rate float64 `json:"rate"`
	Rule string  `json:"rule"` // "below" or "above"
}

// Input is a file a script read, by its name relative to the script and its SHA-256.
type Input struct {
	Name   string `json:"name"`
	SHA256 string `json:"sha256"`
}

// Limit says that a theory curve is a limit no link can beat on a tap (the normal
// approximation on the frame error rate, say): plots draw it in that tap's panel.
type Limit struct {
	Tap   string `json:"tap"`
	Curve string `json:"curve"`
}

// Scatter is what the receiver saw in one frame of one point.
type Scatter struct {
	Point    int          // point index
	Label    string       // the point's parameters, for the title
	Received []complex128 // the frame's samples after the last block
	Ideal    []complex128 // the modulator's constellation (nil when none)
}

// Value is a point's value of parameter i as the table shows it: its label, or the number.
func (r *Run) Value(p Point, i int) string {
	if i < len(r.Labels) && r.Labels[i] != nil {
		k := int(p.Values[i])
		if k >= 0 && k < len(r.Labels[i]) {
			return r.Labels[i][k]
		}
	}
	return strconv.FormatFloat(p.Values[i], 'g', -1, 64)
}

// ShownTaps are the taps to plot and summarise, the governing one first: Shown without the
// taps no point counted, or the BER tap (a record written before Shown, a run that named none).
func (r *Run) ShownTaps() []string {
	var taps []string
	for _, t := range r.Shown {
		if r.TapIndex(t) >= 0 {
			taps = append(taps, t)
		}
	}
	if len(taps) == 0 {
		taps = []string{"ber"}
	}
	return taps
}

// TapIndex is the index of the named tap, or -1.
func (r *Run) TapIndex(name string) int {
	for i, t := range r.Taps {
		if t == name {
			return i
		}
	}
	return -1
}

// UnmarshalJSON reads a target of run.json, where an open end of a crossing's interval is
// null: it comes back as −Inf (Low) or +Inf (High), as the run had it.
func (t *Target) UnmarshalJSON(b []byte) error {
	type plain Target
	var v struct {
		plain
		Low  *float64 `json:"x_low"`
		High *float64 `json:"x_high"`
	}
	if err := json.Unmarshal(b, &v); err != nil {
		return err
	}
	*t = Target(v.plain)
	t.Low, t.High = math.Inf(-1), math.Inf(1)
	if v.Low != nil {
		t.Low = *v.Low
	}
	if v.High != nil {
		t.High = *v.High
	}
	if !t.Found && v.Low == nil && v.High == nil {
		t.Low, t.High = 0, 0
	}
	return nil
}
