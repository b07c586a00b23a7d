package main

import (
	"bufio"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// The README's recipes, run on the engines they name: a Slurm job array (.ci/slurm-up starts a
// one-node cluster) and GNU parallel. Each is the README's own text, taken from README.md with
// only the experiment's path changed, so the recipe and the test cannot drift apart. The table
// merged from the shards must be byte for byte the table of one machine's run; for Slurm also
// after one task is killed mid-run and requeued (--requeue), which -extend continues.
//
// Without sbatch or a cluster that answers, or without parallel, the test is skipped and says
// what is missing.

// recipe is the body of the first ```sh block after the README line holding marker, with the
// demo's path replaced by name (an experiment in the working folder).
func recipe(t *testing.T, marker, name string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "..", "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	sc := bufio.NewScanner(strings.NewReader(string(b)))
	var out []string
	state := 0 // 0: looking for marker, 1: for the fence, 2: in the block
	for sc.Scan() {
		line := sc.Text()
		switch {
		case state == 0 && strings.Contains(line, marker):
			state = 1
		case state == 1 && line == "```sh":
			state = 2
		case state == 2 && line == "```":
			return strings.ReplaceAll(strings.Join(out, "\n")+"\n", "experiments/uplink", name)
		case state == 2:
			out = append(out, line)
		}
	}
	t.Fatalf("README.md has no ```sh block after %q", marker)
	return ""
}

// clusterScript is the slow test script with ms milliseconds a frame (the table does not
// depend on it): 10 make a task last a few seconds, long enough to be killed while it runs.
func clusterScript(t *testing.T, dir string, ms int) {
	t.Helper()
	s := strings.Replace(slowScript, "time.Sleep(time.Millisecond)", fmt.Sprintf("time.Sleep(%d * time.Millisecond)", ms), 1)
	if err := os.WriteFile(filepath.Join(dir, "slow.go"), []byte(s), 0o644); err != nil {
		t.Fatal(err)
	}
}

// withBin is the environment with the tally binary first on PATH.
func withBin(bin string) []string {
	return append(os.Environ(), "PATH="+filepath.Dir(bin)+string(os.PathListSeparator)+os.Getenv("PATH"))
}

func shell(ctx context.Context, dir string, env []string, name string, args ...string) (string, error) {
	cmd := exec.CommandContext(ctx, name, args...)
	cmd.Dir, cmd.Env = dir, env
	out, err := cmd.CombinedOutput()
	return string(out), err
}

// reference is the table of one machine's run of the cluster script.
func reference(t *testing.T, bin string) string {
	t.Helper()
	dir := t.TempDir()
	clusterScript(t, dir, 1)
	if p := tally(t, bin, dir, "run", "-quiet", "slow.go"); p.code != 0 {
		t.Fatalf("one-machine run: exit %d\n%s", p.code, p.stderr)
	}
	return table(t, filepath.Join(dir, "slow"))
}

func TestSlurmJobArray(t *testing.T) {
	if testing.Short() {
		t.Skip("submits jobs to a cluster")
	}
	if _, err := exec.LookPath("sbatch"); err != nil {
		t.Skip("Slurm is not installed (no sbatch on PATH); .ci/slurm-up DIR installs and starts a one-node cluster")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 6*time.Minute)
	defer cancel()
	if out, err := shell(ctx, "", nil, "sinfo", "-h", "-o", "%T"); err != nil || !strings.Contains(out, "idle") && !strings.Contains(out, "mix") {
		t.Skipf("the Slurm cluster does not answer or has no idle node (sinfo: %v %s); start one with .ci/slurm-up DIR and export the SLURM_CONF it prints", err, strings.TrimSpace(out))
	}
	bin := tallyBinary(t)
	want := reference(t, bin)
	job := recipe(t, "A job array on an HPC batch scheduler (Slurm)", "slow")
	if !strings.Contains(job, "#SBATCH --requeue") || !strings.Contains(job, "-shard env -extend") {
		t.Fatalf("the README's job array no longer requeues and extends:\n%s", job)
	}

	run := func(t *testing.T, kill bool) {
		dir := t.TempDir()
		ms := 1
		if kill {
			ms = 10
		}
		clusterScript(t, dir, ms)
		if err := os.WriteFile(filepath.Join(dir, "slow.sh"), []byte(job), 0o755); err != nil {
			t.Fatal(err)
		}
		env := withBin(bin)
		out, err := shell(ctx, dir, env, "sbatch", "--parsable", "slow.sh")
		if err != nil {
			t.Fatalf("sbatch: %v\n%s", err, out)
		}
		id := strings.TrimSpace(strings.Split(out, ";")[0])
		defer shell(context.Background(), dir, nil, "scancel", id)
		var killed string
		for {
			out, err := shell(ctx, dir, nil, "squeue", "-h", "-r", "-j", id, "-o", "%i %T")
			if err != nil {
				t.Fatalf("squeue: %v\n%s", err, out)
			}
			if strings.TrimSpace(out) == "" {
				break
			}
			if kill && killed == "" {
				for _, l := range strings.Split(strings.TrimSpace(out), "\n") {
					if f := strings.Fields(l); len(f) == 2 && f[1] == "RUNNING" {
						time.Sleep(time.Second) // into its frames
						if o, err := shell(ctx, dir, nil, "scontrol", "requeue", f[0]); err != nil {
							t.Fatalf("scontrol requeue %s: %v\n%s", f[0], err, o)
						}
						killed = f[0]
						t.Logf("killed and requeued task %s while it ran", killed)
						break
					}
				}
			}
			if ctx.Err() != nil {
				t.Fatalf("the array did not finish in time:\n%s", out)
			}
			time.Sleep(200 * time.Millisecond)
		}
		if kill {
			if killed == "" {
				t.Fatal("no task was seen running to kill")
			}
			out, _ := shell(ctx, dir, nil, "scontrol", "show", "job", killed)
			if !strings.Contains(out, "Restarts=1") {
				t.Errorf("task %s was not run again after the kill:\n%s", killed, out)
			}
		}
		logs, _ := filepath.Glob(filepath.Join(dir, "slurm-*.out"))
		if p := tally(t, bin, dir, "merge", "-quiet", "slow"); p.code != 0 {
			var all strings.Builder
			for _, l := range logs {
				b, _ := os.ReadFile(l)
				fmt.Fprintf(&all, "%s:\n%s\n", filepath.Base(l), b)
			}
			t.Fatalf("tally merge: exit %d\n%s\n%s", p.code, p.stderr, all.String())
		}
		if got := table(t, filepath.Join(dir, "slow")); got != want {
			t.Errorf("merged table differs from one machine's\ngot:\n%s\nwant:\n%s", got, want)
		}
	}
	t.Run("array", func(t *testing.T) { run(t, false) })
	t.Run("a task killed and requeued", func(t *testing.T) { run(t, true) })
}

func TestGNUParallel(t *testing.T) {
	if testing.Short() {
		t.Skip("runs shards under GNU parallel")
	}
	if _, err := exec.LookPath("parallel"); err != nil {
		t.Skip("GNU parallel is not installed (no parallel on PATH); .ci/slurm-up DIR installs it")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	defer cancel()
	bin := tallyBinary(t)
	want := reference(t, bin)
	dir := t.TempDir()
	clusterScript(t, dir, 1)
	steps := recipe(t, "GNU parallel on one large machine", "slow")
	if out, err := shell(ctx, dir, withBin(bin), "sh", "-ec", steps); err != nil {
		t.Fatalf("the README's GNU parallel recipe: %v\n%s\n%s", err, steps, out)
	}
	if got := table(t, filepath.Join(dir, "slow")); got != want {
		t.Errorf("merged table differs from one machine's\ngot:\n%s\nwant:\n%s", got, want)
	}
}
