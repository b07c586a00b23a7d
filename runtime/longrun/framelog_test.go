package longrun

import (
	"context"
	"reflect"
	"testing"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/runtime/engine"
)

// bpsk is a point's engine spec: BPSK over AWGN at 4 dB, 40 frames of 256 bits.
func bpsk() engine.Spec {
	return engine.Spec{Point: 0, Seed: 1, Workers: 1, Rules: []stop.Rule{stop.Frames(40)},
		Build: func() (*link.Link, error) {
			m := modem.BPSK()
			return link.Chain(source.Random(256), m.Mod(), channel.AWGN(4), m.Demod()), nil
		}}
}

func runWith(s *Session, pt Point) (engine.Outcome, error) {
	return s.Run(pt, bpsk(), func(sp engine.Spec) (engine.Outcome, error) { return engine.Run(context.Background(), sp) })
}

// A resumed point keeps its frames one by one (the checkpoint holds them), as the run that
// computed them had them — unless they were computed under another link fingerprint (another
// tally build): then the point keeps none, rather than frames it cannot vouch for.
func TestCheckpointKeepsFrameLog(t *testing.T) {
	dir := t.TempDir()
	job := Job{Name: "x", Script: "x.go", SHA256: "abc", Seed: 1, Dir: dir}
	s, err := Open(&Settings{Every: -1}, job)
	if err != nil {
		t.Fatal(err)
	}
	first, err := runWith(s, Point{Index: 0, Values: []float64{4}, Fingerprint: "fp"})
	if err != nil {
		t.Fatal(err)
	}
	if !first.Log.Usable() || first.Log.Frames != 40 {
		t.Fatalf("the engine kept %+v", first.Log)
	}
	for _, c := range []struct {
		print string
		keep  bool
	}{{"fp", true}, {"another build", false}} {
		s, err := Open(&Settings{Every: -1, Resume: true}, job)
		if err != nil {
			t.Fatal(err)
		}
		again, err := runWith(s, Point{Index: 0, Values: []float64{4}, Fingerprint: c.print})
		if err != nil {
			t.Fatal(err)
		}
		if again.Computed != 0 || !reflect.DeepEqual(again.Counts, first.Counts) {
			t.Fatalf("resumed: %d frames computed, counts %v, want none and %v", again.Computed, again.Counts, first.Counts)
		}
		if kept := again.Log != nil && reflect.DeepEqual(again.Log.Runs, first.Log.Runs); kept != c.keep {
			t.Errorf("fingerprint %q: frame log kept %v, want %v", c.print, kept, c.keep)
		}
	}
}
