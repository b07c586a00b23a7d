package longrun

import (
	"flag"
	"fmt"
	"os"
	"time"
)

// Flags adds the long-run flags to fs: -resume, -restart, -checkpoint, -shard and -extend.
// The function it returns, called after parsing, gives the settings.
func Flags(fs *flag.FlagSet) func() (*Settings, error) {
	s := &Settings{}
	var shard string
	fs.BoolVar(&s.Resume, "resume", false, "continue from the checkpoint in the outputs folder (or, with -shard, the shard file); starts afresh if there is none")
	fs.BoolVar(&s.Restart, "restart", false, "discard the checkpoint (or shard file) and start afresh")
	fs.DurationVar(&s.Every, "checkpoint", DefaultEvery, "how often to save the checkpoint (wall time); it is also saved at each point's end. Shards in one folder tell each other their counts this often, or every second if that is sooner")
	fs.StringVar(&shard, "shard", "", "run only shard `i/N` of every point's frames (frame f when f mod N = i), writing a shard file for tally merge; env reads it from the batch system ("+EnvShard+", SLURM_ARRAY_TASK_ID, JOB_COMPLETION_INDEX)")
	fs.BoolVar(&s.Extend, "extend", false, "with -shard: continue the existing shard file, as far as the last merge asked")
	return func() (*Settings, error) {
		if s.Resume && s.Restart {
			return nil, fmt.Errorf("-resume and -restart exclude each other")
		}
		if s.Every == 0 {
			s.Every = -1 // -checkpoint 0: only at each point's end
		}
		switch shard {
		case "":
			if s.Extend {
				return nil, fmt.Errorf("-extend continues a shard file: give -shard i/N too")
			}
		case "env":
			p, err := PartFromEnv(os.Getenv)
			if err != nil {
				return nil, err
			}
			s.Shard = &p
		default:
			p, err := ParsePart(shard)
			if err != nil {
				return nil, fmt.Errorf("-shard: %w", err)
			}
			s.Shard = &p
		}
		if s.Extend && s.Restart {
			return nil, fmt.Errorf("-extend and -restart exclude each other")
		}
		return s, nil
	}
}

// Interval is the checkpoint interval the settings ask for; negative: only at point ends.
func (s *Settings) Interval() time.Duration {
	if s.Every == 0 {
		return DefaultEvery
	}
	return s.Every
}
