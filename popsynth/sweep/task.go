package sweep

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"time"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/remnant"
)

// Environment variables that carry a task index.
const (
	EnvSlurmArrayTaskID   = "SLURM_ARRAY_TASK_ID"  // set by Slurm in each element of a job array
	EnvJobCompletionIndex = "JOB_COMPLETION_INDEX" // set by Kubernetes in each pod of an indexed Job
)

// TaskIndex returns the task index to run and where it came from: flag when it is >= 0 (the
// --index flag), else SLURM_ARRAY_TASK_ID, else JOB_COMPLETION_INDEX from environ (as from
// os.Environ).
func TaskIndex(flag int, environ []string) (int, string, error) {
	if flag >= 0 {
		return flag, "--index", nil
	}
	env := map[string]string{}
	for _, kv := range environ {
		if k, v, ok := strings.Cut(kv, "="); ok {
			env[k] = v
		}
	}
	for _, name := range []string{EnvSlurmArrayTaskID, EnvJobCompletionIndex} {
		v, ok := env[name]
		if !ok || v == "" {
			continue
		}
		i, err := strconv.Atoi(strings.TrimSpace(v))
		if err != nil || i < 0 {
			return 0, name, fmt.Errorf("sweep: %s = %q is not a task index (a whole number >= 0)", name, v)
		}
		return i, name, nil
	}
	return 0, "", fmt.Errorf("sweep: no task index: give --index I, or run inside a Slurm job array (%s) or a Kubernetes indexed Job (%s)",
		EnvSlurmArrayTaskID, EnvJobCompletionIndex)
}

// DoneRecord is what DIR/done/NNNNN.json says about a finished task. It is written, atomically,
// after the task's part is complete.
type DoneRecord struct {
	Index   int     `json:"index"`
	Part    string  `json:"part"`
	Rows    int64   `json:"rows"`
	Bytes   int64   `json:"bytes"`
	SHA256  string  `json:"sha256"` // of the part file, hex
	Seconds float64 `json:"seconds"`
	Seed    uint64  `json:"seed"`
	// ConfigSHA256 is the sha256 of the task's config text in the manifest: a record left by
	// another plan does not match.
	ConfigSHA256    string        `json:"config_sha256"`
	Systems         int64         `json:"systems"`
	Binaries        int64         `json:"binaries"`
	MassRepresented float64       `json:"mass_represented"` // Msun
	Counts          RemnantCounts `json:"counts"`
	BHMass          MassQuantiles `json:"bh_mass_quantiles"` // Msun
	Workers         int           `json:"workers"`
	Host            string        `json:"host"`
	Finished        time.Time     `json:"finished"`
}

// RemnantCounts counts stars (a binary has two) by remnant type.
type RemnantCounts struct {
	BH   int64 `json:"BH"`
	NS   int64 `json:"NS"`
	WD   int64 `json:"WD"`
	None int64 `json:"none"`
	Star int64 `json:"star"`
}

// MassQuantiles are quantiles of remnant masses (Msun); nil when there is no remnant of the type.
type MassQuantiles struct {
	P05 *float64 `json:"p05"`
	P50 *float64 `json:"p50"`
	P95 *float64 `json:"p95"`
	Max *float64 `json:"max"`
}

// FailureRecord is what DIR/failed/NNNNN.json says about a task that stopped with an error.
type FailureRecord struct {
	Index       int       `json:"index"`
	Error       string    `json:"error"`
	Interrupted bool      `json:"interrupted"` // stopped by a signal or a cancelled context
	Seconds     float64   `json:"seconds"`
	Host        string    `json:"host"`
	Time        time.Time `json:"time"`
}

// TaskOptions control RunTask.
type TaskOptions struct {
	// Force reruns a task whose part is already done.
	Force bool
	// Workers, when > 0, is the number of engine workers (it does not change the rows).
	Workers int
	// Progress, if not nil, is called with the number of systems written so far.
	Progress popsynth.Progress
}

// TaskResult tells what RunTask did.
type TaskResult struct {
	Index   int
	Skipped bool // the task was already done
	Record  DoneRecord
}

// RunTask runs task i: it writes the task's part atomically, then its done-record, and removes any
// failure record. A task already done (done-record present, checksum matching) is skipped unless
// opt.Force. On error, or when ctx is cancelled, no part appears under its final name and a
// failure record is written.
func (d *Dir) RunTask(ctx context.Context, i int, opt TaskOptions) (TaskResult, error) {
	t, err := d.Task(i)
	if err != nil {
		return TaskResult{Index: i}, err
	}
	if !opt.Force {
		if c := d.check(t); c.state == Done {
			return TaskResult{Index: i, Skipped: true, Record: *c.rec}, nil
		}
	}
	start := time.Now()
	rec, err := d.runTask(ctx, t, opt)
	if err != nil {
		interrupted := errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) || ctx.Err() != nil
		fr := FailureRecord{Index: i, Error: err.Error(), Interrupted: interrupted, Seconds: time.Since(start).Seconds(), Host: hostname(), Time: time.Now().UTC()}
		if js, jerr := json.MarshalIndent(fr, "", "  "); jerr == nil {
			_ = writeFileAtomic(d.failedPath(i), append(js, '\n'), 0o644)
		}
		return TaskResult{Index: i}, fmt.Errorf("sweep: task %d (%s): %w", i, CellLabel(t.Vary), err)
	}
	return TaskResult{Index: i, Record: rec}, nil
}

func (d *Dir) runTask(ctx context.Context, t *Task, opt TaskOptions) (DoneRecord, error) {
	cfg, err := popsynth.ParseYAMLConfig(fmt.Sprintf("%s: task %d config", filepath.Join(d.Path, ManifestFile), t.Index), t.Config)
	if err != nil {
		return DoneRecord{}, err
	}
	if cfg.Seed != t.Seed {
		return DoneRecord{}, fmt.Errorf("the manifest's config has seed %d but the task's seed is %d; the manifest was altered: plan again", cfg.Seed, t.Seed)
	}
	if opt.Workers > 0 {
		cfg.Workers = opt.Workers
	}
	eng, err := popsynth.NewEngine(cfg)
	if err != nil {
		return DoneRecord{}, err
	}
	part := d.PartPath(t)
	if err := os.MkdirAll(filepath.Dir(part), 0o755); err != nil {
		return DoneRecord{}, fmt.Errorf("cannot create the partition directory: %w", err)
	}
	// Temporary files left by a killed run of this task (one task index runs in one process at a time).
	if stale, _ := filepath.Glob(filepath.Join(filepath.Dir(part), "."+filepath.Base(part)+".tmp-*")); len(stale) > 0 {
		for _, s := range stale {
			os.Remove(s)
		}
	}
	if err := os.Remove(d.donePath(t.Index)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return DoneRecord{}, fmt.Errorf("cannot remove the old done-record: %w", err)
	}
	start := time.Now()
	sum, err := eng.WriteCatalogue(ctx, part, opt.Progress)
	if err != nil {
		return DoneRecord{}, err
	}
	seconds := time.Since(start).Seconds()
	digest, size, err := fileSHA256(part)
	if err != nil {
		return DoneRecord{}, err
	}
	rec := DoneRecord{
		Index:           t.Index,
		Part:            t.Part,
		Rows:            sum.Systems - sum.Dropped,
		Bytes:           size,
		SHA256:          digest,
		Seconds:         seconds,
		Seed:            t.Seed,
		ConfigSHA256:    textSHA256(t.Config),
		Systems:         sum.Systems,
		Binaries:        sum.Binaries(),
		MassRepresented: sum.MassRepresented,
		Counts:          countsOf(&sum.Tally),
		BHMass:          quantilesOf(&sum.BH),
		Workers:         cfg.Workers,
		Host:            hostname(),
		Finished:        time.Now().UTC(),
	}
	js, err := json.MarshalIndent(rec, "", "  ")
	if err != nil {
		return DoneRecord{}, err
	}
	if err := writeFileAtomic(d.donePath(t.Index), append(js, '\n'), 0o644); err != nil {
		return DoneRecord{}, err
	}
	if err := os.Remove(d.failedPath(t.Index)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return DoneRecord{}, fmt.Errorf("cannot remove the old failure record: %w", err)
	}
	return rec, nil
}

func countsOf(t *popsynth.Tally) RemnantCounts {
	return RemnantCounts{
		BH:   t.Count(remnant.BH),
		NS:   t.Count(remnant.NS),
		WD:   t.Count(remnant.WD),
		None: t.Count(remnant.None),
		Star: t.Count(remnant.Star),
	}
}

func quantilesOf(h *popsynth.MassHist) MassQuantiles {
	if h.N == 0 {
		return MassQuantiles{}
	}
	p := func(x float64) *float64 {
		if math.IsNaN(x) {
			return nil
		}
		return &x
	}
	return MassQuantiles{P05: p(h.Quantile(0.05)), P50: p(h.Quantile(0.5)), P95: p(h.Quantile(0.95)), Max: p(h.Max)}
}

// fileSHA256 returns the hex sha256 and the size of the file at path.
func fileSHA256(path string) (string, int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", 0, err
	}
	defer f.Close()
	h := sha256.New()
	n, err := io.Copy(h, f)
	if err != nil {
		return "", 0, fmt.Errorf("reading %s: %w", path, err)
	}
	return hex.EncodeToString(h.Sum(nil)), n, nil
}

func textSHA256(s string) string {
	h := sha256.Sum256([]byte(s))
	return hex.EncodeToString(h[:])
}

func hostname() string {
	h, _ := os.Hostname()
	return h
}

// readDone reads task i's done-record.
func (d *Dir) readDone(i int) (*DoneRecord, error) {
	data, err := os.ReadFile(d.donePath(i))
	if err != nil {
		return nil, err
	}
	var r DoneRecord
	if err := json.Unmarshal(data, &r); err != nil {
		return nil, fmt.Errorf("done-record %s is not valid JSON: %v", d.donePath(i), err)
	}
	return &r, nil
}

// readFailure reads task i's failure record.
func (d *Dir) readFailure(i int) (*FailureRecord, error) {
	data, err := os.ReadFile(d.failedPath(i))
	if err != nil {
		return nil, err
	}
	var r FailureRecord
	if err := json.Unmarshal(data, &r); err != nil {
		return &FailureRecord{Index: i, Error: fmt.Sprintf("unreadable failure record: %v", err)}, nil
	}
	return &r, nil
}
