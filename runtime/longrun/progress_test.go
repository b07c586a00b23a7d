package longrun

import (
	"os"
	"strings"
	"testing"

	"tally/blocks/link"
)

// shardSession opens the session of shard i of `of` of a run in dir.
func shardSession(t *testing.T, dir string, i, of int, seed uint64) *Session {
	t.Helper()
	s, err := Open(&Settings{Shard: &Part{Index: i, Of: of}}, Job{Name: "uplink", Script: "uplink.go",
		SHA256: strings.Repeat("cd", 32), Seed: seed, Dir: dir})
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// Shards of one run in one folder see what the others told of a point, step by step; a
// progress file of another seed, of other point values, or damaged, tells nothing.
func TestProgressTold(t *testing.T) {
	dir := t.TempDir()
	taps := []string{"ber"}
	pt := Point{Index: 2, Values: []float64{4}}
	a, b := shardSession(t, dir, 0, 3, 1), shardSession(t, dir, 1, 3, 1)
	a.share.tell(pt, taps, 10, []link.Tally{{Trials: 640, Errors: 7, Frames: 10, Squares: 9}})
	a.share.tell(pt, taps, 25, []link.Tally{{Trials: 1600, Errors: 30, Frames: 25, Squares: 200}})
	a.share.tell(Point{Index: 3, Values: []float64{6}}, taps, 4, []link.Tally{{Trials: 256, Errors: 1, Frames: 4, Squares: 1}})
	seen := b.share.tell(pt, taps, 12, []link.Tally{{Trials: 768, Errors: 8, Frames: 12, Squares: 10}})
	if len(seen) != 1 || seen[0].Index != 0 || len(seen[0].Steps) != 2 ||
		seen[0].Steps[1].Frames != 25 || seen[0].Steps[1].Counts[0] != (link.Tally{Trials: 1600, Errors: 30, Frames: 25, Squares: 200}) {
		t.Fatalf("shard 1 sees %+v; want shard 0's two steps of point 2", seen)
	}
	// Shard 0 sees shard 1 in turn, and still tells both its points.
	if seen := a.share.read(pt, taps); len(seen) != 1 || seen[0].Index != 1 || seen[0].Steps[0].Frames != 12 {
		t.Errorf("shard 0 sees %+v", seen)
	}
	if seen := b.share.read(Point{Index: 3, Values: []float64{6}}, taps); len(seen) != 1 || seen[0].Steps[0].Frames != 4 {
		t.Errorf("shard 1 sees %+v of point 3", seen)
	}
	if seen := b.share.read(Point{Index: 2, Values: []float64{5}}, taps); len(seen) != 0 {
		t.Errorf("point 2 with other values: shard 1 sees %+v, want nothing", seen)
	}
	// A later run of shard 0 keeps what the earlier told until it runs the point again.
	if again := shardSession(t, dir, 0, 3, 1); len(again.share.own) != 2 {
		t.Errorf("a new session of shard 0 keeps %d told points, want 2", len(again.share.own))
	}
	// Another seed: its frames differ, so it sees nothing of seed 1's shards.
	c := shardSession(t, dir, 2, 3, 9)
	if seen := c.share.read(pt, taps); len(seen) != 0 {
		t.Errorf("a shard of another seed sees %+v", seen)
	}
	// A damaged progress file tells nothing (and is no error).
	path := ProgressPath(dir, Part{Index: 0, Of: 3})
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(path, raw[:len(raw)-3], 0o644)
	if seen := b.share.read(pt, taps); len(seen) != 0 {
		t.Errorf("a torn progress file told %+v", seen)
	}
	// Progress files are not shard files: a merge does not take them.
	if _, err := shardFiles([]string{dir}); err == nil || !strings.Contains(err.Error(), "no shard files") {
		t.Errorf("a folder with only progress files: %v, want no shard files", err)
	}
}

// Over a long sweep the progress file stays small: the Recent points told last keep all their
// steps, older ones their last step only (still a fact of the point).
func TestProgressCompact(t *testing.T) {
	dir := t.TempDir()
	taps := []string{"ber"}
	a := shardSession(t, dir, 0, 2, 1)
	for p := 0; p < Recent+2; p++ {
		pt := Point{Index: p, Values: []float64{float64(p)}}
		for f := int64(1); f <= 3; f++ {
			a.share.tell(pt, taps, f, []link.Tally{{Trials: 64 * f, Errors: f, Frames: f, Squares: f}})
		}
	}
	f, ok := a.share.load(Part{Index: 0, Of: 2})
	if !ok || len(f.Points) != Recent+2 {
		t.Fatalf("progress file: %v, %+v", ok, f)
	}
	for _, p := range f.Points {
		want := 3
		if p.Index < 2 {
			want = 1
		}
		if len(p.Frames) != want || p.Frames[len(p.Frames)-1] != 3 || p.Counts[len(p.Counts)-1][0][1] != 3 {
			t.Errorf("point %d keeps steps %v (%v), want %d ending at 3 frames, 3 errors", p.Index, p.Frames, p.Counts, want)
		}
	}
}
