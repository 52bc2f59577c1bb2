package sweep

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

const slurmHowTo = "to run it: `sudo bash .ci/slurm/setup.sh` (installs and starts a single-node Slurm), then `COREFALL_SLURM=1 go test ./popsynth/sweep -run Slurm`"

// slurmTimeout bounds the wait for one submitted job array.
const slurmTimeout = 5 * time.Minute

// requireSlurm skips the test unless CI=true or COREFALL_SLURM=1, and fails it when asked for but
// Slurm is not up (sinfo missing, or no idle node).
func requireSlurm(t *testing.T) {
	t.Helper()
	if os.Getenv("CI") != "true" && os.Getenv("COREFALL_SLURM") != "1" {
		t.Skip("the Slurm integration test runs when CI=true or COREFALL_SLURM=1; " + slurmHowTo)
	}
	if _, err := exec.LookPath("sbatch"); err != nil {
		t.Fatalf("Slurm is not installed (no sbatch on PATH); %s", slurmHowTo)
	}
	out, err := exec.Command("sinfo", "-h", "-N", "-o", "%N %t").CombinedOutput()
	if err != nil {
		t.Fatalf("sinfo failed (%v): %s; %s", err, out, slurmHowTo)
	}
	if !strings.Contains(string(out), " idle") && !strings.Contains(string(out), " mix") {
		t.Fatalf("Slurm has no idle node:\n%s%s", out, slurmHowTo)
	}
}

// goTool returns the go command that runs this test.
func goTool(t *testing.T) string {
	t.Helper()
	if p, err := exec.LookPath("go"); err == nil {
		return p
	}
	// Not on PATH: the usual install location of the Go distribution.
	p := "/usr/local/go/bin/go"
	if _, err := os.Stat(p); err != nil {
		t.Fatalf("cannot find the go command to build corefall (not on PATH, not at %s): %v", p, err)
	}
	return p
}

func run(t *testing.T, name string, args ...string) string {
	t.Helper()
	var out, errb bytes.Buffer
	cmd := exec.Command(name, args...)
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("%s %s: %v\n%s%s", name, strings.Join(args, " "), err, out.String(), errb.String())
	}
	return out.String()
}

// submitAndWait submits the sweep's job script with sbatch and waits until the job has left the
// queue. On timeout it cancels the job and fails with the logs.
func submitAndWait(t *testing.T, dir string) string {
	t.Helper()
	jobID := strings.TrimSpace(run(t, "sbatch", "--parsable", filepath.Join(dir, JobFile)))
	jobID, _, _ = strings.Cut(jobID, ";") // "ID;cluster" on multi-cluster setups
	finished := false
	t.Cleanup(func() {
		if !finished {
			exec.Command("scancel", jobID).Run()
		}
	})
	deadline := time.Now().Add(slurmTimeout)
	for time.Now().Before(deadline) {
		out, err := exec.Command("squeue", "-h", "-j", jobID, "-o", "%i %T").CombinedOutput()
		// squeue lists nothing (or, once the job is purged, says the id is invalid) when it is over.
		if (err == nil && strings.TrimSpace(string(out)) == "") || (err != nil && strings.Contains(string(out), "Invalid job id")) {
			finished = true
			return jobID
		}
		time.Sleep(500 * time.Millisecond)
	}
	ctl, _ := exec.Command("scontrol", "show", "job", jobID).CombinedOutput()
	t.Fatalf("job %s still queued or running after %v:\n%s\nlogs:\n%s", jobID, slurmTimeout, ctl, readLogs(dir))
	return ""
}

func readLogs(dir string) string {
	var b strings.Builder
	files, _ := filepath.Glob(filepath.Join(dir, LogsDir, "*"))
	for _, f := range files {
		data, _ := os.ReadFile(f)
		fmt.Fprintf(&b, "== %s\n%s", filepath.Base(f), data)
	}
	return b.String()
}

// TestSlurmSweep runs a 2 engines x 2 metallicities sweep on a real Slurm cluster: it builds the
// corefall binary, plans the sweep with it, submits job.sbatch with sbatch, waits for the job
// array, and checks `sweep status --json` (all done) and `sweep collect` (one summary row per task,
// matching each part read back). It then corrupts one part and resubmits the same script: exactly
// that task reruns, the others are skipped.
func TestSlurmSweep(t *testing.T) {
	requireSlurm(t)
	t.Parallel() // it mostly waits for Slurm; the other tests run meanwhile
	start := time.Now()
	tmp := t.TempDir()
	bin := filepath.Join(tmp, "corefall")
	build := exec.Command(goTool(t), "build", "-o", bin, "github.com/corefall/corefall/cmd/corefall")
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	built := time.Since(start)
	spec := filepath.Join(tmp, "engines-z.yaml")
	if err := os.WriteFile(spec, []byte(`
base:
  systems: 2000
  seed: 5
vary:
  explosion.engine: [rapid, delayed]
  metallicity.fixed: [0.0002, 0.0142]
`), 0o644); err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(tmp, "sweep")
	planOut := run(t, bin, "sweep", "plan", spec, "-o", dir, "--throttle", "2", "--cpus-per-task", "1",
		"--mem", "500M", "--time", "00:05:00", "--job-name", "corefall-test")
	if !strings.Contains(planOut, "sbatch "+filepath.Join(dir, JobFile)) {
		t.Errorf("plan does not say how to submit:\n%s", planOut)
	}
	script, err := os.ReadFile(filepath.Join(dir, JobFile))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(script), "#SBATCH --array=0-3%2\n") || !strings.Contains(string(script), "exec "+bin+" sweep task "+dir) {
		t.Fatalf("job script:\n%s", script)
	}

	t0 := time.Now()
	jobID := submitAndWait(t, dir)
	t.Logf("first job: %.1f s", time.Since(t0).Seconds())
	var st Status
	if err := json.Unmarshal([]byte(run(t, bin, "sweep", "status", dir, "--json")), &st); err != nil {
		t.Fatal(err)
	}
	if st.Tasks != 4 || st.Done != 4 || st.Pending != 0 || st.Failed != 0 {
		t.Fatalf("after job %s: status %+v; want 4 tasks all done\nlogs:\n%s", jobID, st, readLogs(dir))
	}
	for i := range 4 {
		log, err := os.ReadFile(filepath.Join(dir, LogsDir, fmt.Sprintf("corefall-test-%s_%d.out", jobID, i)))
		if err != nil || !strings.Contains(string(log), fmt.Sprintf("task %d: wrote", i)) {
			t.Errorf("log of array element %d (%v):\n%s", i, err, log)
		}
	}
	run(t, bin, "sweep", "collect", dir)
	d, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	r, err := catalog.Open(filepath.Join(dir, SummaryFile))
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	b, err := r.Next()
	if err != nil || b.Len != 4 {
		t.Fatalf("summary: %v rows, %v; want 4", b, err)
	}
	s := r.Schema()
	for row := range 4 {
		task := &d.Manifest.Tasks[row]
		info, err := popsynth.Inspect(d.PartPath(task))
		if err != nil {
			t.Fatal(err)
		}
		if got := b.Cols[s.Index("task")].I64[row]; got != int64(row) {
			t.Errorf("summary row %d is task %d", row, got)
		}
		if got, want := b.Cols[s.Index("count_BH")].I64[row], info.Tally.Count(remnant.BH); got != want || want == 0 {
			t.Errorf("task %d: count_BH %d, the part holds %d (want > 0)", row, got, want)
		}
		if got := b.Cols[s.Index("systems")].I64[row]; got != 2000 {
			t.Errorf("task %d: systems %d, want 2000", row, got)
		}
	}

	// Resubmission after damage: only the corrupt task runs again.
	part := d.PartPath(&d.Manifest.Tasks[2])
	good := partHash(t, part)
	data, _ := os.ReadFile(part)
	data[len(data)/2] ^= 0xff
	if err := os.WriteFile(part, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if st := d.Status(); st.Corrupt != 1 || st.Done != 3 {
		t.Fatalf("after corrupting task 2: %+v", st)
	}
	t0 = time.Now()
	job2 := submitAndWait(t, dir)
	t.Logf("second job: %.1f s", time.Since(t0).Seconds())
	for i := range 4 {
		log, _ := os.ReadFile(filepath.Join(dir, LogsDir, fmt.Sprintf("corefall-test-%s_%d.out", job2, i)))
		want := "already done"
		if i == 2 {
			want = "task 2: wrote"
		}
		if !strings.Contains(string(log), want) {
			t.Errorf("resubmission, element %d: log lacks %q:\n%s", i, want, log)
		}
	}
	if st := d.Status(); st.Done != 4 {
		t.Errorf("after resubmission: %+v", st)
	}
	if partHash(t, part) != good {
		t.Error("the rerun part differs from the first")
	}
	t.Logf("Slurm sweep test: %.1f s (go build %.1f s)", time.Since(start).Seconds(), built.Seconds())
}

// TestSlurmNotWantedSkips documents the switch: without CI=true or COREFALL_SLURM=1 the Slurm test
// skips with instructions, it never runs by accident on a developer's machine.
func TestSlurmNotWantedSkips(t *testing.T) {
	ctx := context.Background()
	cmd := exec.CommandContext(ctx, os.Args[0], "-test.run=^TestSlurmSweep$", "-test.v")
	cmd.Env = append(os.Environ(), "CI=", "COREFALL_SLURM=")
	out, err := cmd.CombinedOutput()
	if err != nil || !strings.Contains(string(out), "SKIP") || !strings.Contains(string(out), "COREFALL_SLURM=1 go test ./popsynth/sweep -run Slurm") {
		t.Errorf("TestSlurmSweep without the switch: %v\n%s", err, out)
	}
}
