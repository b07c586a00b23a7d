package longrun

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"tally/blocks/link"
)

// Merged is a set of shard files, one per shard of the same run, seen as the frame sequence of
// a single run: frame f of a point is frame f/Of of shard f mod Of.
type Merged struct {
	Name   string
	Script string // the script path the shards were given
	SHA256 string
	Seed   uint64
	Of     int
	Paths  []string // the files, by shard index
	Hashes []string // hex SHA-256 of each file's bytes, by shard index (set by Gather)
	shards []*ShardFile
}

// Merge checks that files (read from paths) are the Of shards of one run — same script hash,
// seed, shard count and taps, each index once — and joins them. Errors name the file.
func Merge(paths []string, files []*ShardFile) (*Merged, error) {
	if len(files) == 0 {
		return nil, fmt.Errorf("merge: no shard files")
	}
	first := files[0]
	m := &Merged{Name: first.Name, Script: first.Script, SHA256: first.SHA256, Seed: first.Seed, Of: first.Of,
		Paths: make([]string, first.Of), shards: make([]*ShardFile, first.Of)}
	taps := map[int][]string{}
	for k, f := range files {
		p := paths[k]
		switch {
		case f.SHA256 != m.SHA256:
			return nil, fmt.Errorf("%s: made by another script (SHA-256 %.12s…, %s has %.12s…): shards of different scripts cannot merge", p, f.SHA256, paths[0], m.SHA256)
		case f.Seed != m.Seed:
			return nil, fmt.Errorf("%s: made with seed %d, %s with seed %d: shards of different seeds cannot merge", p, f.Seed, paths[0], m.Seed)
		case f.Of != m.Of:
			return nil, fmt.Errorf("%s: one of %d shards, %s one of %d: shards of different splits cannot merge", p, f.Of, paths[0], m.Of)
		case f.Name != m.Name:
			return nil, fmt.Errorf("%s: experiment %q, %s has %q", p, f.Name, paths[0], m.Name)
		}
		if q := m.shards[f.Index]; q != nil {
			return nil, fmt.Errorf("%s: shard %d/%d again (also %s)", p, f.Index, f.Of, m.Paths[f.Index])
		}
		m.shards[f.Index], m.Paths[f.Index] = f, p
		for _, sp := range f.Points {
			if sp.Frames == 0 {
				continue
			}
			if t, ok := taps[sp.Index]; !ok {
				taps[sp.Index] = sp.Taps
			} else if !slices.Equal(t, sp.Taps) {
				return nil, fmt.Errorf("%s: point %d counts taps %v, other shards %v", p, sp.Index, sp.Taps, t)
			}
		}
	}
	var missing []string
	for i, s := range m.shards {
		if s == nil {
			missing = append(missing, fmt.Sprint(i))
		}
	}
	if len(missing) > 0 {
		return nil, fmt.Errorf("merge: shard(s) %s of %d missing (have %s)", strings.Join(missing, ", "), m.Of, strings.Join(nonEmpty(m.Paths), ", "))
	}
	return m, nil
}

func nonEmpty(s []string) []string {
	var out []string
	for _, v := range s {
		if v != "" {
			out = append(out, v)
		}
	}
	sort.Strings(out)
	return out
}

// Frame is frame f of point index, from the shard that computed it, or false when that shard
// has not computed it.
func (m *Merged) Frame(index int, f int64) ([]link.Tally, bool) {
	if f < 0 {
		return nil, false
	}
	p := m.shards[f%int64(m.Of)].Point(index)
	if p == nil {
		return nil, false
	}
	return p.Frame(f / int64(m.Of))
}

// Fingerprinted reports whether every shard computed point index under link fingerprint fp
// (see Point.Fingerprint).
func (m *Merged) Fingerprinted(index int, fp string) bool {
	for _, s := range m.shards {
		if p := s.Point(index); p != nil && p.Frames > 0 && (p.Fingerprint == "" || p.Fingerprint != fp) {
			return false
		}
	}
	return fp != ""
}

// Covered is how many frames of point index the shards hold in order: frames 0..Covered-1.
func (m *Merged) Covered(index int) int64 {
	var c int64 = -1
	for i, s := range m.shards {
		var k int64
		if p := s.Point(index); p != nil {
			k = p.Frames
		}
		if n := k*int64(m.Of) + int64(i); c < 0 || n < c {
			c = n
		}
	}
	return c
}

// Seconds is the wall time all shards spent on point index.
func (m *Merged) Seconds(index int) float64 {
	var t float64
	for _, s := range m.shards {
		if p := s.Point(index); p != nil {
			t += p.Seconds
		}
	}
	return t
}

// Values are point index's parameter values as the shards recorded them (nil if none has it).
func (m *Merged) Values(index int) []float64 {
	for _, s := range m.shards {
		if p := s.Point(index); p != nil {
			return p.Values
		}
	}
	return nil
}
