package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/corefall/corefall/popsynth/sweep"
)

// runSweepCLI runs corefall in-process with the given environment.
func runSweepCLI(t *testing.T, environ []string, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	a := &app{stdout: &out, stderr: &errb, environ: environ}
	code := a.execute(context.Background(), args)
	return code, out.String(), errb.String()
}

// planCLISweep writes a 3-task sweep file and plans it with the CLI.
func planCLISweep(t *testing.T) string {
	t.Helper()
	tmp := t.TempDir()
	spec := filepath.Join(tmp, "s.yaml")
	if err := os.WriteFile(spec, []byte("base:\n  systems: 1500\nvary:\n  metallicity.fixed: [0.0002, 0.002, 0.0142]\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	exe, _ := os.Executable()
	dir := filepath.Join(tmp, "sw")
	code, out, errs := runSweepCLI(t, nil, "sweep", "plan", spec, "-o", dir, "--corefall", exe, "--throttle", "2", "--mem", "1G")
	if code != 0 {
		t.Fatalf("plan: exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "planned 3 tasks") || !strings.Contains(out, "sbatch "+filepath.Join(dir, "job.sbatch")) {
		t.Errorf("plan output:\n%s", out)
	}
	return dir
}

// TestSweepTaskKubernetesIndex: `sweep task DIR` in a Kubernetes indexed Job takes its index from
// JOB_COMPLETION_INDEX and runs exactly that task; a second run skips it; without any index it is
// an error that says how to give one.
func TestSweepTaskKubernetesIndex(t *testing.T) {
	dir := planCLISweep(t)
	code, out, errs := runSweepCLI(t, []string{"JOB_COMPLETION_INDEX=2"}, "sweep", "task", dir)
	if code != 0 || !strings.Contains(out, "task 2: wrote catalogue/metallicity_fixed=0.0142/part-00002.parquet") {
		t.Fatalf("task via JOB_COMPLETION_INDEX: exit %d\n%s%s", code, out, errs)
	}
	d, err := sweep.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []sweep.State{sweep.Pending, sweep.Pending, sweep.Done} {
		if st, _, _ := d.TaskState(i); st != want {
			t.Errorf("task %d is %s, want %s", i, st, want)
		}
	}
	code, out, _ = runSweepCLI(t, []string{"JOB_COMPLETION_INDEX=2"}, "sweep", "task", dir)
	if code != 0 || !strings.Contains(out, "task 2: already done") {
		t.Errorf("second run: exit %d: %s", code, out)
	}
	// SLURM_ARRAY_TASK_ID wins over JOB_COMPLETION_INDEX, --index over both.
	code, out, _ = runSweepCLI(t, []string{"SLURM_ARRAY_TASK_ID=0", "JOB_COMPLETION_INDEX=2", "SLURM_CPUS_PER_TASK=1"}, "sweep", "task", dir)
	if code != 0 || !strings.Contains(out, "task 0: wrote") {
		t.Errorf("SLURM_ARRAY_TASK_ID: exit %d: %s", code, out)
	}
	code, out, _ = runSweepCLI(t, []string{"SLURM_ARRAY_TASK_ID=0"}, "sweep", "task", dir, "--index", "1")
	if code != 0 || !strings.Contains(out, "task 1: wrote") {
		t.Errorf("--index: exit %d: %s", code, out)
	}
	code, _, errs = runSweepCLI(t, nil, "sweep", "task", dir)
	if code != exitError || !strings.Contains(errs, "--index") || !strings.Contains(errs, "JOB_COMPLETION_INDEX") {
		t.Errorf("no index: exit %d: %s", code, errs)
	}
	code, _, errs = runSweepCLI(t, []string{"JOB_COMPLETION_INDEX=3"}, "sweep", "task", dir)
	if code != exitError || !strings.Contains(errs, "tasks 0 to 2") || !strings.Contains(errs, "JOB_COMPLETION_INDEX") {
		t.Errorf("index out of range: exit %d: %s", code, errs)
	}
}

// TestSweepStatusLocalCollect: status --json has the keys the interface fixes, local runs the
// pending tasks with a line per task when stderr is not a terminal, and collect writes the summary.
func TestSweepStatusLocalCollect(t *testing.T) {
	dir := planCLISweep(t)
	code, out, errs := runSweepCLI(t, nil, "sweep", "status", dir, "--json")
	if code != 0 {
		t.Fatalf("status: exit %d: %s", code, errs)
	}
	m := decodeJSON(t, out)
	hasKeys(t, "sweep status", m, "tasks", "done", "pending", "failed")
	if m["tasks"] != 3.0 || m["done"] != 0.0 || m["pending"] != 3.0 || m["failed"] != 0.0 {
		t.Errorf("status before running: %v", m)
	}
	code, _, errs = runSweepCLI(t, nil, "sweep", "collect", dir)
	if code != exitError || !strings.Contains(errs, "3 of 3 tasks are not done") {
		t.Errorf("collect before running: exit %d: %s", code, errs)
	}
	code, out, errs = runSweepCLI(t, nil, "sweep", "local", dir, "--jobs", "2")
	if code != 0 || !strings.Contains(out, "ran 3 tasks") || strings.Count(errs, "] task ") != 3 {
		t.Fatalf("local: exit %d\n%s%s", code, out, errs)
	}
	code, out, _ = runSweepCLI(t, nil, "sweep", "status", dir)
	if code != 0 || !strings.Contains(out, "3 tasks: 3 done, 0 pending, 0 failed") {
		t.Errorf("status after local: %s", out)
	}
	code, out, errs = runSweepCLI(t, nil, "sweep", "collect", dir)
	if code != 0 || !strings.Contains(out, "wrote "+filepath.Join(dir, "summary.parquet")+" (3 rows)") {
		t.Errorf("collect: exit %d: %s%s", code, out, errs)
	}
	code, out, _ = runSweepCLI(t, nil, "sweep", "local", dir)
	if code != 0 || !strings.Contains(out, "all 3 tasks are done") {
		t.Errorf("local with nothing to do: %s", out)
	}
}

// TestSweepPlanErrors: a bad cell is refused before anything is written, and a different plan is
// not written over an existing one without --force.
func TestSweepPlanErrors(t *testing.T) {
	tmp := t.TempDir()
	bad := filepath.Join(tmp, "bad.yaml")
	os.WriteFile(bad, []byte("vary:\n  explosion.engine: [rapid, fastest]\n"), 0o644)
	code, _, errs := runSweepCLI(t, nil, "sweep", "plan", bad, "-o", filepath.Join(tmp, "x"), "--corefall", bad)
	if code != exitError || !strings.Contains(errs, "cell 1 (explosion.engine=fastest") {
		t.Errorf("bad cell: exit %d: %s", code, errs)
	}
	if _, err := os.Stat(filepath.Join(tmp, "x")); !os.IsNotExist(err) {
		t.Errorf("a refused plan created its directory: %v", err)
	}
	dir := planCLISweep(t)
	other := filepath.Join(tmp, "other.yaml")
	os.WriteFile(other, []byte("vary:\n  explosion.engine: [rapid]\n"), 0o644)
	code, _, errs = runSweepCLI(t, nil, "sweep", "plan", other, "-o", dir, "--corefall", other)
	if code != exitError || !strings.Contains(errs, "different plan") {
		t.Errorf("overwrite without --force: exit %d: %s", code, errs)
	}
	code, _, errs = runSweepCLI(t, nil, "sweep", "plan", other, "-o", dir, "--corefall", other, "--force")
	if code != 0 {
		t.Errorf("overwrite with --force: exit %d: %s", code, errs)
	}
	code, _, errs = runSweepCLI(t, nil, "sweep", "plan", other, "-o", dir, "--time", "soon")
	if code != exitError || !strings.Contains(errs, "not a Slurm time") {
		t.Errorf("bad --time: exit %d: %s", code, errs)
	}
}
