package longrun

import (
	"errors"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"tally/blocks/link"
)

func testCheckpoint() *Checkpoint {
	return &Checkpoint{Name: "uplink", Script: "uplink.go", SHA256: strings.Repeat("ab", 32), Seed: 3,
		Points: []PointState{
			{Index: 0, Values: []float64{0}, Frames: 12, Taps: []string{"ber", "fer"}, Counts: [][4]int64{{12288, 150, 12, 2100}, {12, 12, 12, 12}}, Stop: "errors", Seconds: 0.5},
			{Index: 1, Values: []float64{2.5}, Frames: 40, Taps: []string{"ber", "fer"}, Counts: [][4]int64{{40960, 61, 40, 120}, {40, 30, 40, 30}}, Seconds: 1.25},
		}}
}

func TestRoundTrip(t *testing.T) {
	path := filepath.Join(t.TempDir(), "out", CheckpointName)
	want := testCheckpoint()
	if err := Save(path, KindCheckpoint, want); err != nil {
		t.Fatal(err)
	}
	got, err := LoadCheckpoint(path)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := Encode(KindCheckpoint, want)
	b, _ := Encode(KindCheckpoint, got)
	if string(a) != string(b) {
		t.Errorf("read back differs:\n%s\n%s", a, b)
	}
}

// A file cut short anywhere (a torn write), or with any byte altered, is refused.
func TestTornFileRefused(t *testing.T) {
	data, err := Encode(KindCheckpoint, testCheckpoint())
	if err != nil {
		t.Fatal(err)
	}
	var c Checkpoint
	for n := 0; n < len(data); n++ {
		if err := Decode(data[:n], KindCheckpoint, &c); err == nil {
			t.Fatalf("the first %d of %d bytes read as a valid checkpoint", n, len(data))
		}
	}
	for i := range data {
		alt := append([]byte(nil), data...)
		alt[i] ^= 0x20
		if err := Decode(alt, KindCheckpoint, &c); err == nil {
			t.Fatalf("byte %d altered (%q → %q) read as valid", i, data[i], alt[i])
		}
	}
	if err := Decode(append(data, '\n'), KindCheckpoint, &c); err == nil {
		t.Errorf("a file with a trailing byte read as valid")
	}
	if err := Decode(data, KindCheckpoint, &c); err != nil {
		t.Errorf("the whole file: %v", err)
	}
}

func TestWrongKindOrVersion(t *testing.T) {
	data, _ := Encode(KindShard, &ShardFile{Of: 1})
	var c Checkpoint
	if err := Decode(data, KindCheckpoint, &c); err == nil || !strings.Contains(err.Error(), "shard") {
		t.Errorf("a shard file read as a checkpoint: %v", err)
	}
	v4 := strings.Replace(string(data), " v3 ", " v4 ", 1)
	if err := Decode([]byte(v4), KindShard, &ShardFile{}); err == nil || !strings.Contains(err.Error(), "v4") {
		t.Errorf("a v4 file: %v", err)
	}
	// Version 1 and 2 files (before the estimators' weights, before the checkpoint's frame
	// log) are still read.
	for _, v := range []string{" v1 ", " v2 "} {
		old := strings.Replace(string(data), " v3 ", v, 1)
		if err := Decode([]byte(old), KindShard, &ShardFile{}); err != nil {
			t.Errorf("a%sfile: %v", v, err)
		}
	}
}

// Weighted sums survive a checkpoint and a shard file bit for bit, and a shard's sum and
// frames give what the engine's in-order Add gives.
func TestWeightsRoundTrip(t *testing.T) {
	frames := [][]link.Tally{
		{{Trials: 100, Errors: 3, Estimator: link.Importance, Weight: 1.25e-13, WeightSquares: 7e-27}, {Trials: 1, Errors: 1, Estimator: link.Unestimated}},
		{{Trials: 100, Estimator: link.Importance}, {Trials: 1, Estimator: link.Unestimated}},
		{{Trials: 100, Errors: 5, Estimator: link.Importance, Weight: 3.0000000000000004e-13, WeightSquares: 1.9e-26}, {Trials: 1, Errors: 1, Estimator: link.Unestimated}},
	}
	want := make([]link.Tally, 2)
	sp := ShardPoint{Taps: []string{"ber", "fer"}}
	for _, c := range frames {
		for i := range c {
			want[i].Add(c[i])
		}
		sp.Add(c)
	}
	ps := PointState{Taps: sp.Taps}
	ps.SetTallies(want)
	var back Checkpoint
	data, err := Encode(KindCheckpoint, &Checkpoint{Points: []PointState{ps}})
	if err != nil {
		t.Fatal(err)
	}
	if err := Decode(data, KindCheckpoint, &back); err != nil {
		t.Fatal(err)
	}
	if got := back.Points[0].Tallies(); !slices.Equal(got, want) {
		t.Errorf("checkpoint: %+v, want %+v", got, want)
	}
	var sf ShardFile
	data, _ = Encode(KindShard, &ShardFile{Of: 1, Points: []ShardPoint{sp}})
	if err := Decode(data, KindShard, &sf); err != nil {
		t.Fatal(err)
	}
	p := &sf.Points[0]
	if err := p.check(); err != nil {
		t.Fatal(err)
	}
	if got := p.Sum(); !slices.Equal(got, want) {
		t.Errorf("shard sum: %+v, want %+v", got, want)
	}
	for k, c := range frames {
		if got, _ := p.Frame(int64(k)); !slices.Equal(got, c) {
			t.Errorf("shard frame %d: %+v, want %+v", k, got, c)
		}
	}
}

func TestLoadMissing(t *testing.T) {
	_, err := LoadCheckpoint(filepath.Join(t.TempDir(), CheckpointName))
	if !errors.Is(err, os.ErrNotExist) {
		t.Errorf("missing file: %v, want not-exist", err)
	}
}

// Run-length coding keeps every frame's counts, in order.
func TestShardRuns(t *testing.T) {
	frames := [][]link.Tally{
		{{Trials: 64, Errors: 0}, {Trials: 1, Errors: 0}}, {{Trials: 64, Errors: 0}, {Trials: 1, Errors: 0}}, {{Trials: 64, Errors: 3}, {Trials: 1, Errors: 1}}, {{Trials: 64, Errors: 0}, {Trials: 1, Errors: 0}}, {{Trials: 64, Errors: 0}, {Trials: 1, Errors: 0}}, {{Trials: 64, Errors: 0}, {Trials: 1, Errors: 0}}, {{Trials: 64, Errors: 1}, {Trials: 1, Errors: 1}},
	}
	p := ShardPoint{Taps: []string{"ber", "fer"}}
	for _, c := range frames {
		p.Add(c)
	}
	if len(p.Runs) != 4 {
		t.Errorf("%d runs, want 4 (2 clean, 1 errored, 3 clean, 1 errored)", len(p.Runs))
	}
	for k, want := range frames {
		got, ok := p.Frame(int64(k))
		if !ok || got[0] != want[0] || got[1] != want[1] {
			t.Errorf("frame %d: %v, want %v", k, got, want)
		}
	}
	if _, ok := p.Frame(int64(len(frames))); ok {
		t.Errorf("a frame past the end")
	}
	s := p.Sum()
	if s[0] != (link.Tally{Trials: 448, Errors: 4, Frames: 7, Squares: 10}) || s[1] != (link.Tally{Trials: 7, Errors: 2, Frames: 7, Squares: 2}) {
		t.Errorf("sum %v", s)
	}
	if err := p.check(); err != nil {
		t.Error(err)
	}
	p.Frames++
	if err := p.check(); err == nil {
		t.Error("a frame count that the runs do not add up to passed")
	}
}

func shard(i, of int, seed uint64, hash string, frames int) *ShardFile {
	s := &ShardFile{Name: "uplink", Script: "uplink.go", SHA256: hash, Seed: seed, Index: i, Of: of}
	p := ShardPoint{Index: 0, Values: []float64{1}, Taps: []string{"ber"}}
	for k := 0; k < frames; k++ {
		f := int64(k*of + i) // the frame's number in the single run, as its error count
		p.Add([]link.Tally{{Trials: 10, Errors: f}})
	}
	s.Points = []ShardPoint{p}
	return s
}

// Merged frames come in single-run order: frame f from shard f mod N.
func TestMergeOrder(t *testing.T) {
	h := strings.Repeat("0", 64)
	files := []*ShardFile{shard(2, 3, 1, h, 4), shard(0, 3, 1, h, 5), shard(1, 3, 1, h, 4)}
	m, err := Merge([]string{"c", "a", "b"}, files)
	if err != nil {
		t.Fatal(err)
	}
	// Shard 0 has frames 0, 3, …, 12, shard 1 1, …, 10 and shard 2 2, …, 11: frame 13 is the
	// first missing, so frames 0..12 are in order.
	if c := m.Covered(0); c != 13 {
		t.Errorf("covered %d, want 13", c)
	}
	for f := int64(0); f < 13; f++ {
		c, ok := m.Frame(0, f)
		if !ok || c[0].Errors != f {
			t.Errorf("frame %d: %v %v", f, c, ok)
		}
	}
	if _, ok := m.Frame(0, 13); ok {
		t.Errorf("frame 13 should be missing")
	}
}

// Shards of another script, seed or split, a shard twice, or one missing, are refused with
// the file named.
func TestMergeRefuses(t *testing.T) {
	h, other := strings.Repeat("0", 64), strings.Repeat("1", 64)
	cases := []struct {
		name  string
		files []*ShardFile
		want  string
	}{
		{"script", []*ShardFile{shard(0, 2, 1, h, 3), shard(1, 2, 1, other, 3)}, "another script"},
		{"seed", []*ShardFile{shard(0, 2, 1, h, 3), shard(1, 2, 9, h, 3)}, "seed 9"},
		{"split", []*ShardFile{shard(0, 2, 1, h, 3), shard(1, 3, 1, h, 3)}, "one of 3"},
		{"twice", []*ShardFile{shard(0, 2, 1, h, 3), shard(0, 2, 1, h, 3)}, "again"},
		{"missing", []*ShardFile{shard(0, 3, 1, h, 3), shard(2, 3, 1, h, 3)}, "shard(s) 1 of 3 missing"},
	}
	for _, c := range cases {
		_, err := Merge([]string{"first.tally", "second.tally"}, c.files)
		if err == nil || !strings.Contains(err.Error(), c.want) || c.name != "missing" && !strings.HasPrefix(err.Error(), "second.tally") {
			t.Errorf("%s: %v; want an error naming second.tally with %q", c.name, err, c.want)
		}
	}
}

func TestMinFrames(t *testing.T) {
	// Frames 0..9 among 4 shards: shard 0 has 0,4,8 (3), shard 1 has 1,5,9 (3), shards 2 and
	// 3 two each.
	for i, want := range []int64{3, 3, 2, 2} {
		if got := MinFrames(10, Part{Index: i, Of: 4}); got != want {
			t.Errorf("shard %d: %d, want %d", i, got, want)
		}
	}
	if got := MinFrames(0, Part{Index: 1, Of: 4}); got != 0 {
		t.Errorf("no frames: %d", got)
	}
}

func TestParsePart(t *testing.T) {
	if p, err := ParsePart("2/4"); err != nil || p != (Part{2, 4}) {
		t.Errorf("2/4: %v %v", p, err)
	}
	for _, bad := range []string{"4/4", "-1/4", "1/0", "1", "a/b", "1/4/2"} {
		if _, err := ParsePart(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// The shard index as batch systems give it (Slurm documents SLURM_ARRAY_TASK_ID, _COUNT,
// _MIN and _STEP for job arrays; Kubernetes sets JOB_COMPLETION_INDEX in indexed Jobs; from
// memory).
func TestPartFromEnv(t *testing.T) {
	cases := []struct {
		env  map[string]string
		want Part
		ok   bool
	}{
		{map[string]string{"TALLY_SHARD": "1/3", "SLURM_ARRAY_TASK_ID": "0"}, Part{1, 3}, true},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "2", "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_MIN": "0"}, Part{2, 4}, true},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "4", "SLURM_ARRAY_TASK_COUNT": "4", "SLURM_ARRAY_TASK_MIN": "1"}, Part{3, 4}, true},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "20", "SLURM_ARRAY_TASK_COUNT": "3", "SLURM_ARRAY_TASK_MIN": "10", "SLURM_ARRAY_TASK_STEP": "5"}, Part{2, 3}, true},
		{map[string]string{"SLURM_ARRAY_TASK_ID": "2"}, Part{}, false},
		{map[string]string{"JOB_COMPLETION_INDEX": "3", "TALLY_SHARDS": "8"}, Part{3, 8}, true},
		{map[string]string{"JOB_COMPLETION_INDEX": "3"}, Part{}, false},
		{map[string]string{"JOB_COMPLETION_INDEX": "8", "TALLY_SHARDS": "8"}, Part{}, false},
		{map[string]string{}, Part{}, false},
	}
	for _, c := range cases {
		p, err := PartFromEnv(func(k string) string { return c.env[k] })
		if (err == nil) != c.ok || c.ok && p != c.want {
			t.Errorf("%v: %v, %v; want %v (ok %v)", c.env, p, err, c.want, c.ok)
		}
	}
}
