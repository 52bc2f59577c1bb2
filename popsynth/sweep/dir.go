package sweep

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
)

// Names of the files and directories inside a sweep directory.
const (
	ManifestFile = "manifest.json"
	JobFile      = "job.sbatch"
	SummaryFile  = "summary.parquet"
	CatalogueDir = "catalogue"
	DoneDir      = "done"
	FailedDir    = "failed"
	LogsDir      = "logs"
)

// Dir is a planned sweep directory.
type Dir struct {
	// Path is the directory's absolute path.
	Path     string
	Manifest *Manifest
}

// ErrPlanExists is returned (wrapped) by WritePlan when the directory holds a different plan.
var ErrPlanExists = errors.New("the sweep directory holds a different plan")

// WritePlan stores m in dir (created if needed) as manifest.json, with the Slurm script job.sbatch
// made from o, and creates dir/logs. A directory that already holds the same tasks keeps its parts
// and records (a plan may be rewritten, e.g. with other Slurm resources). One that holds a
// different plan is refused unless force, which deletes its catalogue, records and summary.
func WritePlan(dir string, m *Manifest, o SlurmOptions, force bool) (*Dir, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, fmt.Errorf("sweep: sweep directory %q: %w", dir, err)
	}
	script, err := SlurmScript(abs, m, o)
	if err != nil {
		return nil, err
	}
	if old, err := readManifest(abs); err == nil {
		if !samePlan(old, m) {
			if !force {
				return nil, fmt.Errorf("sweep: %s: %w (%d tasks, planned from %s); plan into a new directory, or give --force to replace it, which deletes its catalogue/, done/, failed/ and summary.parquet",
					abs, ErrPlanExists, len(old.Tasks), old.Sweep)
			}
			for _, name := range []string{CatalogueDir, DoneDir, FailedDir, SummaryFile} {
				if err := os.RemoveAll(filepath.Join(abs, name)); err != nil {
					return nil, fmt.Errorf("sweep: cannot clear the old plan's %s: %w", name, err)
				}
			}
		}
	} else if !errors.Is(err, fs.ErrNotExist) && !force {
		return nil, fmt.Errorf("sweep: %s has a manifest.json that cannot be read (%v); plan into a new directory, or give --force to replace it", abs, err)
	}
	if err := os.MkdirAll(filepath.Join(abs, LogsDir), 0o755); err != nil {
		return nil, fmt.Errorf("sweep: cannot create the sweep directory: %w", err)
	}
	js, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("sweep: encoding the manifest: %w", err)
	}
	if err := writeFileAtomic(filepath.Join(abs, ManifestFile), append(js, '\n'), 0o644); err != nil {
		return nil, err
	}
	if err := writeFileAtomic(filepath.Join(abs, JobFile), []byte(script), 0o755); err != nil {
		return nil, err
	}
	return &Dir{Path: abs, Manifest: m}, nil
}

// samePlan reports whether two manifests have the same keys and tasks.
func samePlan(a, b *Manifest) bool {
	ja, err1 := json.Marshal(struct {
		K []KeyInfo
		T []Task
	}{a.Keys, a.Tasks})
	jb, err2 := json.Marshal(struct {
		K []KeyInfo
		T []Task
	}{b.Keys, b.Tasks})
	return err1 == nil && err2 == nil && bytes.Equal(ja, jb)
}

// Open reads the sweep directory dir.
func Open(dir string) (*Dir, error) {
	abs, err := filepath.Abs(dir)
	if err != nil {
		return nil, fmt.Errorf("sweep: sweep directory %q: %w", dir, err)
	}
	m, err := readManifest(abs)
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return nil, fmt.Errorf("sweep: %s has no %s; make one with `corefall sweep plan SWEEP.yaml -o %s`", abs, ManifestFile, dir)
		}
		return nil, err
	}
	return &Dir{Path: abs, Manifest: m}, nil
}

func readManifest(dir string) (*Manifest, error) {
	path := filepath.Join(dir, ManifestFile)
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var m Manifest
	if err := json.Unmarshal(data, &m); err != nil {
		return nil, fmt.Errorf("sweep: %s is not a sweep manifest: %v", path, err)
	}
	if m.Format != ManifestFormat {
		return nil, fmt.Errorf("sweep: %s has format %q; this corefall reads %q", path, m.Format, ManifestFormat)
	}
	for i, t := range m.Tasks {
		if t.Index != i {
			return nil, fmt.Errorf("sweep: %s: task %d has index %d; the manifest was altered", path, i, t.Index)
		}
		if t.Part == "" || filepath.IsAbs(t.Part) || strings.Contains(t.Part, "..") {
			return nil, fmt.Errorf("sweep: %s: task %d has part path %q; the manifest was altered", path, i, t.Part)
		}
	}
	return &m, nil
}

// NumTasks returns the number of tasks.
func (d *Dir) NumTasks() int { return len(d.Manifest.Tasks) }

// Task returns task i, or an error naming the allowed range.
func (d *Dir) Task(i int) (*Task, error) {
	if i < 0 || i >= len(d.Manifest.Tasks) {
		return nil, fmt.Errorf("sweep: task index %d is out of range; %s has tasks 0 to %d", i, d.Path, len(d.Manifest.Tasks)-1)
	}
	return &d.Manifest.Tasks[i], nil
}

// PartPath returns the absolute path of task t's part.
func (d *Dir) PartPath(t *Task) string { return filepath.Join(d.Path, filepath.FromSlash(t.Part)) }

func (d *Dir) donePath(i int) string {
	return filepath.Join(d.Path, DoneDir, fmt.Sprintf("%05d.json", i))
}
func (d *Dir) failedPath(i int) string {
	return filepath.Join(d.Path, FailedDir, fmt.Sprintf("%05d.json", i))
}

// writeFileAtomic writes data to path through a temporary file in the same directory and a rename,
// so path holds either its old content or all of data.
func writeFileAtomic(path string, data []byte, perm os.FileMode) error {
	dir, base := filepath.Split(path)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("sweep: cannot create %s: %w", dir, err)
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("sweep: cannot write %s: %w", path, err)
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if err == nil {
		err = f.Chmod(perm)
	}
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("sweep: cannot write %s: %w", path, err)
	}
	return nil
}
