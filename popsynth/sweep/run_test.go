package sweep

import (
	"context"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

// Environment of the helper process of TestKilledTaskLeavesNoPart.
const (
	helperDirEnv   = "COREFALL_SWEEP_TEST_HELPER_DIR"
	helperIndexEnv = "COREFALL_SWEEP_TEST_HELPER_INDEX"
)

// TestMain lets the test binary run one task as a helper process that the test then kills.
func TestMain(m *testing.M) {
	if dir := os.Getenv(helperDirEnv); dir != "" {
		i, _ := strconv.Atoi(os.Getenv(helperIndexEnv))
		d, err := Open(dir)
		if err == nil {
			_, err = d.RunTask(context.Background(), i, TaskOptions{Workers: 1})
		}
		if err != nil {
			os.Stderr.WriteString(err.Error() + "\n")
			os.Exit(1)
		}
		os.Exit(0)
	}
	os.Exit(m.Run())
}

// smallSweep: 2 engines x 2 metallicities of 2000 single stars. (Single stars: the companion
// columns of a part are compared by popsynth.Inspect, whose reading of companion remnant types is
// not under test here.)
const smallSweep = `
base:
  systems: 2000
  seed: 11
vary:
  explosion.engine: [rapid, delayed]
  metallicity.fixed: [0.0002, 0.0142]
`

func testSlurm() SlurmOptions {
	o := DefaultSlurmOptions()
	o.Corefall = "/usr/local/bin/corefall"
	return o
}

// planDir plans text into a new temporary sweep directory.
func planDir(t *testing.T, text string) *Dir {
	t.Helper()
	d, err := WritePlan(filepath.Join(t.TempDir(), "sweep"), mustPlan(t, text), testSlurm(), false)
	if err != nil {
		t.Fatalf("WritePlan: %v", err)
	}
	return d
}

func runAll(t *testing.T, d *Dir, jobs int) LocalResult {
	t.Helper()
	res, err := d.RunLocal(context.Background(), d.Status().Unfinished(), LocalOptions{Jobs: jobs})
	if err != nil {
		t.Fatalf("RunLocal: %v", err)
	}
	return res
}

func wantStatus(t *testing.T, d *Dir, done, pending, failed, corrupt int) Status {
	t.Helper()
	s := d.Status()
	if s.Tasks != len(d.Manifest.Tasks) || s.Done != done || s.Pending != pending || s.Failed != failed || s.Corrupt != corrupt {
		t.Fatalf("status %d tasks: %d done, %d pending, %d failed, %d corrupt; want %d, %d, %d, %d (%+v)",
			s.Tasks, s.Done, s.Pending, s.Failed, s.Corrupt, done, pending, failed, corrupt, s.FailedTasks)
	}
	return s
}

func partHash(t *testing.T, path string) string {
	t.Helper()
	h, _, err := fileSHA256(path)
	if err != nil {
		t.Fatal(err)
	}
	return h
}

// TestSlurmScript checks the job script's #SBATCH lines against the options.
func TestSlurmScript(t *testing.T) {
	m := mustPlan(t, smallSweep)
	o := testSlurm()
	o.Throttle, o.CPUsPerTask, o.Mem, o.Time, o.Partition, o.JobName = 3, 4, "6G", "1-02:00:00", "long", "zgrid"
	o.Extra = []string{"--account=astro"}
	s, err := SlurmScript("/scratch/sw", m, o)
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range []string{
		"#!/bin/bash\n",
		"#SBATCH --array=0-3%3\n",
		"#SBATCH --cpus-per-task=4\n",
		"#SBATCH --mem=6G\n",
		"#SBATCH --time=1-02:00:00\n",
		"#SBATCH --partition=long\n",
		"#SBATCH --job-name=zgrid\n",
		"#SBATCH --output=/scratch/sw/logs/%x-%A_%a.out\n",
		"#SBATCH --account=astro\n",
		"exec /usr/local/bin/corefall sweep task /scratch/sw\n",
		"sbatch /scratch/sw/job.sbatch",
	} {
		if !strings.Contains(s, line) {
			t.Errorf("script lacks %q:\n%s", line, s)
		}
	}
	o.Throttle, o.Partition = 0, ""
	s, _ = SlurmScript("/scratch/sw", m, o)
	if !strings.Contains(s, "#SBATCH --array=0-3\n") || strings.Contains(s, "--partition") {
		t.Errorf("no throttle and no partition: script\n%s", s)
	}
	for _, bad := range []func(*SlurmOptions){
		func(o *SlurmOptions) { o.Time = "1 hour" },
		func(o *SlurmOptions) { o.Mem = "4 GB" },
		func(o *SlurmOptions) { o.CPUsPerTask = 0 },
		func(o *SlurmOptions) { o.Throttle = -1 },
		func(o *SlurmOptions) { o.Corefall = "corefall" },
		func(o *SlurmOptions) { o.JobName = "a b" },
		func(o *SlurmOptions) { o.Extra = []string{"account=x"} },
	} {
		o := testSlurm()
		bad(&o)
		if _, err := SlurmScript("/scratch/sw", m, o); err == nil {
			t.Errorf("options %+v accepted", o)
		}
	}
	if _, err := SlurmScript("/scratch/my sweep", m, testSlurm()); err == nil {
		t.Error("a directory with a space accepted in #SBATCH lines")
	}
}

// TestWritePlanOverwrite: the same plan may be written again (keeping finished parts); a different
// one is refused without force, and force clears the old parts and records.
func TestWritePlanOverwrite(t *testing.T) {
	d := planDir(t, smallSweep)
	if _, err := d.RunTask(context.Background(), 0, TaskOptions{}); err != nil {
		t.Fatal(err)
	}
	if _, err := WritePlan(d.Path, mustPlan(t, smallSweep), testSlurm(), false); err != nil {
		t.Fatalf("same plan again: %v", err)
	}
	wantStatus(t, d, 1, 3, 0, 0)
	other := strings.Replace(smallSweep, "systems: 2000", "systems: 3000", 1)
	_, err := WritePlan(d.Path, mustPlan(t, other), testSlurm(), false)
	if !errors.Is(err, ErrPlanExists) || !strings.Contains(err.Error(), "--force") {
		t.Fatalf("different plan without force: %v; want ErrPlanExists naming --force", err)
	}
	d2, err := WritePlan(d.Path, mustPlan(t, other), testSlurm(), true)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(d.Path, CatalogueDir)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("force left the old catalogue: %v", err)
	}
	wantStatus(t, d2, 0, 4, 0, 0)
	if _, err := os.Stat(filepath.Join(d.Path, LogsDir)); err != nil {
		t.Errorf("logs directory: %v", err)
	}
}

// TestTaskIndex: --index beats SLURM_ARRAY_TASK_ID, which beats JOB_COMPLETION_INDEX (Kubernetes
// indexed Jobs); nothing at all is a clear error.
func TestTaskIndex(t *testing.T) {
	for _, c := range []struct {
		flag    int
		env     []string
		want    int
		from    string
		wantErr string
	}{
		{3, []string{"SLURM_ARRAY_TASK_ID=5", "JOB_COMPLETION_INDEX=7"}, 3, "--index", ""},
		{-1, []string{"SLURM_ARRAY_TASK_ID=5", "JOB_COMPLETION_INDEX=7"}, 5, "SLURM_ARRAY_TASK_ID", ""},
		{-1, []string{"PATH=/bin", "JOB_COMPLETION_INDEX=7"}, 7, "JOB_COMPLETION_INDEX", ""},
		{-1, []string{"SLURM_ARRAY_TASK_ID=", "JOB_COMPLETION_INDEX=2"}, 2, "JOB_COMPLETION_INDEX", ""},
		{-1, []string{"SLURM_ARRAY_TASK_ID=x"}, 0, "", "is not a task index"},
		{-1, nil, 0, "", "give --index I"},
	} {
		i, from, err := TaskIndex(c.flag, c.env)
		if c.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), c.wantErr) {
				t.Errorf("%d %v: error %v, want %q", c.flag, c.env, err, c.wantErr)
			}
			continue
		}
		if err != nil || i != c.want || from != c.from {
			t.Errorf("%d %v: %d from %s (%v); want %d from %s", c.flag, c.env, i, from, err, c.want, c.from)
		}
	}
}

// TestRunCollect runs a sweep locally and checks the summary against an independent reading of
// every part (popsynth.Inspect tallies the rows of the file), and the done-records' checksums
// against the files.
func TestRunCollect(t *testing.T) {
	d := planDir(t, smallSweep)
	wantStatus(t, d, 0, 4, 0, 0)
	if _, err := d.Collect(""); err == nil || !strings.Contains(err.Error(), "pending (not run or still running): 0, 1, 2, 3") {
		t.Fatalf("collect before running: %v", err)
	}
	res := runAll(t, d, 2)
	if res.Ran != 4 || len(res.Failed) != 0 {
		t.Fatalf("ran %d, failed %v; want 4, none", res.Ran, res.Failed)
	}
	wantStatus(t, d, 4, 0, 0, 0)
	cr, err := d.Collect("")
	if err != nil {
		t.Fatal(err)
	}
	r, err := catalog.Open(cr.Path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	s := r.Schema()
	b, err := r.Next()
	if err != nil {
		t.Fatal(err)
	}
	if b.Len != 4 {
		t.Fatalf("summary has %d rows, want 4", b.Len)
	}
	i64 := func(name string, row int) int64 { return b.Cols[s.Index(name)].I64[row] }
	f64 := func(name string, row int) float64 { return b.Cols[s.Index(name)].F64[row] }
	engines := s.Column(s.Index("explosion_engine")).Categories
	for row := range 4 {
		task := &d.Manifest.Tasks[row]
		if i64("task", row) != int64(row) {
			t.Errorf("row %d holds task %d", row, i64("task", row))
		}
		info, err := popsynth.Inspect(d.PartPath(task))
		if err != nil {
			t.Fatal(err)
		}
		if got := engines[b.Cols[s.Index("explosion_engine")].Cat[row]]; got != task.Vary[0].Value {
			t.Errorf("row %d: explosion_engine %s, want %s", row, got, task.Vary[0].Value)
		}
		if got := f64("metallicity_fixed", row); got != *task.Vary[1].Number {
			t.Errorf("row %d: metallicity_fixed %g, want %g", row, got, *task.Vary[1].Number)
		}
		if info.Metadata[catalog.MetaSeed] != strconv.FormatUint(task.Seed, 10) {
			t.Errorf("row %d: part seed %s, want %d", row, info.Metadata[catalog.MetaSeed], task.Seed)
		}
		for name, typ := range map[string]remnant.Type{"count_BH": remnant.BH, "count_NS": remnant.NS, "count_WD": remnant.WD, "count_none": remnant.None, "count_star": remnant.Star} {
			if got, want := i64(name, row), info.Tally.Count(typ); got != want {
				t.Errorf("row %d: %s = %d, the part holds %d", row, name, got, want)
			}
		}
		if i64("systems", row) != info.Systems || i64("rows", row) != info.Tally.Systems || i64("binaries", row) != info.Tally.Binaries() {
			t.Errorf("row %d: systems %d rows %d binaries %d; part says %d, %d, %d", row,
				i64("systems", row), i64("rows", row), i64("binaries", row), info.Systems, info.Tally.Systems, info.Tally.Binaries())
		}
		// The part stores masses as float32, so a quantile read back may fall in the neighbouring
		// 0.01 Msun bin of the engine's histogram.
		for name, p := range map[string]float64{"bh_mass_p05": 0.05, "bh_mass_p50": 0.5, "bh_mass_p95": 0.95} {
			if got, want := f64(name, row), info.Tally.BH.Quantile(p); math.Abs(got-want) > 0.0101 {
				t.Errorf("row %d: %s = %g, from the part %g", row, name, got, want)
			}
		}
		if got, want := f64("bh_mass_max", row), info.Tally.BH.Max; math.Abs(got-want) > 1e-5*want {
			t.Errorf("row %d: bh_mass_max %g, part %g", row, got, want)
		}
		if got, want := f64("mass_represented", row), info.MassRepresented; math.Abs(got-want) > 1e-9*want {
			t.Errorf("row %d: mass_represented %g, part metadata %g", row, got, want)
		}
		rec, err := d.readDone(row)
		if err != nil {
			t.Fatal(err)
		}
		if rec.SHA256 != partHash(t, d.PartPath(task)) {
			t.Errorf("task %d: done-record checksum differs from the part's", row)
		}
	}
	if info, _ := popsynth.Inspect(d.PartPath(&d.Manifest.Tasks[0])); info.Tally.Count(remnant.BH) == 0 {
		t.Error("no black holes in 2000 massive stars: the quantile checks above were vacuous")
	}
	if r.Metadata()[MetaSweepTasks] != "4" {
		t.Errorf("summary metadata %s = %q", MetaSweepTasks, r.Metadata()[MetaSweepTasks])
	}
	// Everything done: a second local run runs nothing.
	if res := runAll(t, d, 2); res.Ran != 0 {
		t.Errorf("second run ran %d tasks, want 0", res.Ran)
	}
}

// TestRerunAloneGivesSamePart: a task run alone in another directory planned from the same sweep
// gives the same part, byte for byte (its seed comes from the base seed and its index only).
func TestRerunAloneGivesSamePart(t *testing.T) {
	a, b := planDir(t, smallSweep), planDir(t, smallSweep)
	runAll(t, a, 1)
	// With the same worker count, which the configuration stored in the part records.
	if _, err := b.RunTask(context.Background(), 2, TaskOptions{Workers: workersOf(t, a, 2)}); err != nil {
		t.Fatal(err)
	}
	wantStatus(t, b, 1, 3, 0, 0)
	pa, pb := a.PartPath(&a.Manifest.Tasks[2]), b.PartPath(&b.Manifest.Tasks[2])
	if partHash(t, pa) != partHash(t, pb) {
		t.Error("task 2 run alone gives a different part")
	}
	if partHash(t, pa) == partHash(t, a.PartPath(&a.Manifest.Tasks[3])) {
		t.Error("tasks 2 and 3 gave identical parts; the comparison above is vacuous")
	}
}

func workersOf(t *testing.T, d *Dir, i int) int {
	t.Helper()
	rec, err := d.readDone(i)
	if err != nil {
		t.Fatal(err)
	}
	return rec.Workers
}

// TestRerunCompletesMissing: after some tasks ran, a local run runs exactly the others and leaves
// the finished parts untouched.
func TestRerunCompletesMissing(t *testing.T) {
	d := planDir(t, smallSweep)
	for _, i := range []int{0, 2} {
		if _, err := d.RunTask(context.Background(), i, TaskOptions{}); err != nil {
			t.Fatal(err)
		}
	}
	before := map[int]time.Time{}
	for _, i := range []int{0, 2} {
		st, err := os.Stat(d.PartPath(&d.Manifest.Tasks[i]))
		if err != nil {
			t.Fatal(err)
		}
		before[i] = st.ModTime()
	}
	s := wantStatus(t, d, 2, 2, 0, 0)
	if got := s.Unfinished(); len(got) != 2 || got[0] != 1 || got[1] != 3 {
		t.Fatalf("unfinished %v, want [1 3]", got)
	}
	var ran []int
	res, err := d.RunLocal(context.Background(), s.Unfinished(), LocalOptions{Jobs: 2, TaskDone: func(r TaskResult, err error) {
		if err == nil && !r.Skipped {
			ran = append(ran, r.Index)
		}
	}})
	if err != nil {
		t.Fatal(err)
	}
	if res.Ran != 2 || len(ran) != 2 || ran[0]+ran[1] != 4 {
		t.Errorf("ran %d tasks (%v), want exactly 1 and 3", res.Ran, ran)
	}
	for i, mt := range before {
		st, _ := os.Stat(d.PartPath(&d.Manifest.Tasks[i]))
		if !st.ModTime().Equal(mt) {
			t.Errorf("finished task %d was rewritten", i)
		}
	}
	wantStatus(t, d, 4, 0, 0, 0)
	// Running a done task again without force skips it.
	r, err := d.RunTask(context.Background(), 1, TaskOptions{})
	if err != nil || !r.Skipped {
		t.Errorf("done task 1 rerun: skipped %v, err %v; want skipped", r.Skipped, err)
	}
}

// TestCorruptPartRerun: flipping bytes of a part makes status report it corrupt (and collect
// refuse), and a local run reruns exactly that task, giving back the same part.
func TestCorruptPartRerun(t *testing.T) {
	d := planDir(t, smallSweep)
	runAll(t, d, 2)
	part := d.PartPath(&d.Manifest.Tasks[1])
	good := partHash(t, part)
	data, err := os.ReadFile(part)
	if err != nil {
		t.Fatal(err)
	}
	for k := len(data) / 3; k < len(data)/3+8; k++ {
		data[k] ^= 0xff
	}
	if err := os.WriteFile(part, data, 0o644); err != nil {
		t.Fatal(err)
	}
	s := wantStatus(t, d, 3, 0, 1, 1)
	if p := s.FailedTasks[0]; p.Index != 1 || !p.Corrupt || !strings.Contains(p.Reason, "checksum") {
		t.Errorf("failed task %+v; want task 1, corrupt, checksum", p)
	}
	var ie *IncompleteError
	if _, err := d.Collect(""); !errors.As(err, &ie) || !strings.Contains(err.Error(), "corrupt (checksum does not match): 1") {
		t.Errorf("collect with a corrupt part: %v", err)
	}
	res := runAll(t, d, 2)
	if res.Ran != 1 {
		t.Errorf("reran %d tasks, want 1", res.Ran)
	}
	wantStatus(t, d, 4, 0, 0, 0)
	if partHash(t, part) != good {
		t.Error("the rerun part differs from the original")
	}
	// A missing part with its done-record present is corrupt too.
	os.Remove(d.PartPath(&d.Manifest.Tasks[3]))
	wantStatus(t, d, 3, 0, 1, 1)
}

// TestCancelledTaskLeavesNoPart: a task whose context is cancelled mid-run leaves no part under
// its final name and no done-record, writes a failure record (status: failed, interrupted), and a
// local run completes it.
func TestCancelledTaskLeavesNoPart(t *testing.T) {
	d := planDir(t, strings.Replace(smallSweep, "systems: 2000", "systems: 300000", 1))
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var calls int
	_, err := d.RunTask(ctx, 0, TaskOptions{Workers: 1, Progress: func(done int64) {
		calls++
		cancel() // after the first batch is written
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled task returned %v; want context.Canceled", err)
	}
	if calls == 0 {
		t.Fatal("progress never called: the task was not cancelled mid-run")
	}
	part := d.PartPath(&d.Manifest.Tasks[0])
	if _, err := os.Stat(part); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("part exists after cancel: %v", err)
	}
	if left, _ := filepath.Glob(filepath.Join(filepath.Dir(part), ".*")); len(left) != 0 {
		t.Errorf("temporary files left: %v", left)
	}
	s := wantStatus(t, d, 0, 3, 1, 0)
	if !strings.HasPrefix(s.FailedTasks[0].Reason, "interrupted") {
		t.Errorf("reason %q; want interrupted", s.FailedTasks[0].Reason)
	}
	res, err := d.RunLocal(context.Background(), []int{0}, LocalOptions{})
	if err != nil || res.Ran != 1 {
		t.Fatalf("rerun: ran %d, %v", res.Ran, err)
	}
	if _, err := os.Stat(d.failedPath(0)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("failure record kept after success: %v", err)
	}
	wantStatus(t, d, 1, 3, 0, 0)
}

// TestKilledTaskLeavesNoPart kills (SIGKILL) a process in the middle of writing a task's part: no
// part appears under its final name, status calls the task pending, and a local run completes
// exactly that task and removes the dead run's temporary file.
func TestKilledTaskLeavesNoPart(t *testing.T) {
	d := planDir(t, "base:\n  systems: 800000\n  output:\n    row_group_rows: 65536\nvary:\n  explosion.engine: [rapid]\n")
	part := d.PartPath(&d.Manifest.Tasks[0])
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(os.Environ(), helperDirEnv+"="+d.Path, helperIndexEnv+"=0")
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	killed := false
	defer func() {
		if !killed {
			cmd.Process.Kill()
			cmd.Wait()
		}
	}()
	// Wait until the temporary file holds some data: the task is mid-write.
	deadline := time.Now().Add(30 * time.Second)
	var tmp string
	for time.Now().Before(deadline) {
		m, _ := filepath.Glob(filepath.Join(filepath.Dir(part), "."+filepath.Base(part)+".tmp-*"))
		if len(m) == 1 {
			if st, err := os.Stat(m[0]); err == nil && st.Size() > 1<<20 {
				tmp = m[0]
				break
			}
		}
		time.Sleep(20 * time.Millisecond)
	}
	if tmp == "" {
		t.Fatal("the helper task wrote no temporary file within 30 s")
	}
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	cmd.Wait()
	killed = true
	if _, err := os.Stat(part); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("a part exists under its final name after the kill: %v", err)
	}
	if _, err := os.Stat(d.donePath(0)); !errors.Is(err, os.ErrNotExist) {
		t.Fatalf("a done-record exists after the kill: %v", err)
	}
	wantStatus(t, d, 0, 1, 0, 0)
	res := runAll(t, d, 1)
	if res.Ran != 1 {
		t.Fatalf("ran %d tasks, want 1", res.Ran)
	}
	wantStatus(t, d, 1, 0, 0, 0)
	if _, err := os.Stat(tmp); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the killed run's temporary file %s is still there", tmp)
	}
}
