package longrun

import (
	"time"

	"tally/runtime/result"
)

// DefaultEvery is how often a run saves its checkpoint (or shard file), in wall time.
const DefaultEvery = 2 * time.Second

// Settings are a run's long-run choices, from the command line.
type Settings struct {
	// Resume continues from the checkpoint in the outputs folder (with Shard: from the shard
	// file). It refuses a checkpoint of another script or seed; with none it starts afresh.
	Resume bool
	// Restart discards a checkpoint (or shard file) and starts afresh.
	Restart bool
	// Every is the checkpoint interval (0: DefaultEvery; negative: only at each point's end).
	Every time.Duration
	// Shard runs only this share of every point's frames and writes a shard file instead of
	// the outputs.
	Shard *Part
	// Extend (with Shard) continues from the shard file, up to the plan a short merge left.
	Extend bool
	// HandedOver (with Resume): the checkpoint or shard file was left by the interpreter of this
	// same run, which handed it over to the compiled program (runtime/isolate); it is continued
	// without the note a resume prints.
	HandedOver bool
	// Replay (a merge) takes every frame's counts from the shards instead of computing them.
	Replay *Merged
	// Short is filled by a replay whose shards ran out before some point met its rules.
	Short *ShortError
	// Record is filled by a replay: where the merged frames came from (Session.Record).
	Record *result.Shards
}
