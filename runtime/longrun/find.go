package longrun

import (
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
)

// Gather reads the shard files among args — files as given, folders by their shard files (or
// those of their shards/ subfolder) — and merges them (Merge).
func Gather(args []string) (*Merged, error) {
	paths, err := shardFiles(args)
	if err != nil {
		return nil, err
	}
	files := make([]*ShardFile, len(paths))
	for i, p := range paths {
		if files[i], err = LoadShard(p); err != nil {
			return nil, err
		}
	}
	m, err := Merge(paths, files)
	if err != nil {
		return nil, err
	}
	m.Hashes = make([]string, m.Of)
	for i, p := range m.Paths {
		b, err := os.ReadFile(p)
		if err != nil {
			return nil, err
		}
		sum := sha256.Sum256(b)
		m.Hashes[i] = hex.EncodeToString(sum[:])
	}
	return m, nil
}

func shardFiles(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		st, err := os.Stat(a)
		if errors.Is(err, fs.ErrNotExist) {
			return nil, fmt.Errorf("%s: no such shard file or folder", a)
		}
		if err != nil {
			return nil, fmt.Errorf("cannot read %s", a)
		}
		if !st.IsDir() {
			out = append(out, a)
			continue
		}
		found, _ := filepath.Glob(filepath.Join(a, "shard-*-of-*.tally"))
		if len(found) == 0 {
			found, _ = filepath.Glob(filepath.Join(ShardDir(a), "shard-*-of-*.tally"))
		}
		if len(found) == 0 {
			return nil, fmt.Errorf("no shard files (shard-I-of-N.tally) in %s", a)
		}
		sort.Strings(found)
		out = append(out, found...)
	}
	return out, nil
}

// FindScript is the script to replay the shards with: the one given, else the path the shards
// were run with, else the script beside their outputs folder. Its hash must be theirs.
func FindScript(given string, m *Merged) (string, error) {
	candidates := []string{given}
	if given == "" {
		// dir/<name>/shards/shard-i-of-N.tally belongs to dir/<name>.go.
		beside := filepath.Dir(filepath.Dir(m.Paths[0])) + filepath.Ext(m.Script)
		candidates = []string{m.Script, beside}
	}
	var changed string
	for _, c := range candidates {
		src, err := os.ReadFile(c)
		if err != nil {
			continue
		}
		sum := sha256.Sum256(src)
		if hex.EncodeToString(sum[:]) == m.SHA256 {
			return c, nil
		}
		if changed == "" {
			changed = c
		}
	}
	if changed != "" {
		return "", fmt.Errorf("%s is not the script the shards ran (its SHA-256 differs from %.12s…): it changed since, or give the right one with -script", changed, m.SHA256)
	}
	if given != "" {
		return "", fmt.Errorf("cannot read the script %s", given)
	}
	return "", fmt.Errorf("cannot find the script the shards ran (%s); give it with -script FILE.go", m.Script)
}

// SavePlan leaves, in the outputs folder dir, the plan of a merge that fell short, for the
// next round of shards run with -extend; it returns the plan's path. A point with no estimate
// of what it needs asks for twice what it has.
func SavePlan(dir string, m *Merged, short *ShortError) (string, error) {
	plan := &Plan{SHA256: m.SHA256, Seed: m.Seed, Of: m.Of, Points: short.Points}
	for i, p := range plan.Points {
		if p.Need == 0 && p.Covered > 0 {
			plan.Points[i].Need = 2 * p.Covered // no estimate: double
		}
	}
	pp := PlanPath(dir)
	return pp, Save(pp, KindPlan, plan)
}

// RemovePlan removes the plan of an earlier short merge once a merge has covered every point.
func RemovePlan(dir string) error {
	if err := os.Remove(PlanPath(dir)); err != nil && !os.IsNotExist(err) {
		return err
	}
	return nil
}
