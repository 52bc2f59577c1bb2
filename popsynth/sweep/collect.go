package sweep

import (
	"encoding/json"
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
)

// Metadata keys of summary.parquet, besides the catalog package's corefall.version.
const (
	MetaSweepKeys  = "corefall.sweep.keys"      // JSON list of the varied keys (key, column, numeric)
	MetaSweepTasks = "corefall.sweep.tasks"     // number of tasks, decimal
	MetaSweepSeed  = "corefall.sweep.base_seed" // base seed, decimal
	MetaSweepYAML  = "corefall.sweep.yaml"      // the sweep file's text
)

// IncompleteError is returned by Collect when some tasks are not done.
type IncompleteError struct {
	Dir    string
	Status Status
}

func (e *IncompleteError) Error() string {
	s := e.Status
	var parts []string
	list := func(idx []int) string {
		var b strings.Builder
		for k, i := range idx {
			if k == 20 {
				fmt.Fprintf(&b, " ... (%d more)", len(idx)-k)
				break
			}
			if k > 0 {
				b.WriteString(", ")
			}
			b.WriteString(strconv.Itoa(i))
		}
		return b.String()
	}
	var corrupt, failed []int
	for _, p := range s.FailedTasks {
		if p.Corrupt {
			corrupt = append(corrupt, p.Index)
		} else {
			failed = append(failed, p.Index)
		}
	}
	if len(s.PendingTasks) > 0 {
		parts = append(parts, fmt.Sprintf("pending (not run or still running): %s", list(s.PendingTasks)))
	}
	if len(failed) > 0 {
		parts = append(parts, fmt.Sprintf("failed: %s", list(failed)))
	}
	if len(corrupt) > 0 {
		parts = append(parts, fmt.Sprintf("corrupt (checksum does not match): %s", list(corrupt)))
	}
	return fmt.Sprintf("sweep: cannot collect %s: %d of %d tasks are not done; %s. Run them with `corefall sweep local %s` or resubmit the job (finished tasks are skipped); `corefall sweep status %s` says why each failed",
		e.Dir, s.Tasks-s.Done, s.Tasks, strings.Join(parts, "; "), e.Dir, e.Dir)
}

// CollectResult tells what Collect wrote.
type CollectResult struct {
	Path string
	Rows int
}

// SummarySchema returns the columns of summary.parquet for a sweep with the given varied keys:
// task, cell, repeat, one column per varied key (float64 when every value is a number, otherwise a
// category of the partition values), systems, binaries, rows, counts by remnant type, black-hole
// mass quantiles, mass represented and seconds.
func SummarySchema(keys []KeyInfo) (*catalog.Schema, error) {
	cols := append([]catalog.Column(nil), summaryFixedColumns[:3]...)
	for _, k := range keys {
		c := catalog.Column{Name: k.Column, Unit: "1", Doc: "swept config key " + k.Key + " (unit as in the config)"}
		if k.Numeric {
			c.Kind = catalog.Float64
		} else {
			c.Kind = catalog.Category
			c.Categories = k.Labels
		}
		cols = append(cols, c)
	}
	cols = append(cols, summaryFixedColumns[3:]...)
	return catalog.NewSchema(cols)
}

// Collect checks every task (done-record present, checksum of the part matching) and writes the
// summary, one row per task, to path (DIR/summary.parquet when path is ""), atomically. It refuses,
// with an *IncompleteError listing the pending, failed and corrupt tasks, unless every task is done.
func (d *Dir) Collect(path string) (CollectResult, error) {
	if path == "" {
		path = filepath.Join(d.Path, SummaryFile)
	}
	m := d.Manifest
	st, recs := d.scan()
	if st.Done != st.Tasks {
		return CollectResult{}, &IncompleteError{Dir: d.Path, Status: st}
	}
	schema, err := SummarySchema(m.Keys)
	if err != nil {
		return CollectResult{}, fmt.Errorf("sweep: summary columns: %w", err)
	}
	b := catalog.NewBatch(schema, len(m.Tasks))
	b.Reset(len(m.Tasks))
	col := func(name string) *catalog.ColumnData { return &b.Cols[schema.Index(name)] }
	ints := map[string]func(t *Task, r *DoneRecord) int64{
		"task":       func(t *Task, _ *DoneRecord) int64 { return int64(t.Index) },
		"cell":       func(t *Task, _ *DoneRecord) int64 { return int64(t.Cell) },
		"repeat":     func(t *Task, _ *DoneRecord) int64 { return int64(t.Repeat) },
		"systems":    func(_ *Task, r *DoneRecord) int64 { return r.Systems },
		"binaries":   func(_ *Task, r *DoneRecord) int64 { return r.Binaries },
		"rows":       func(_ *Task, r *DoneRecord) int64 { return r.Rows },
		"count_BH":   func(_ *Task, r *DoneRecord) int64 { return r.Counts.BH },
		"count_NS":   func(_ *Task, r *DoneRecord) int64 { return r.Counts.NS },
		"count_WD":   func(_ *Task, r *DoneRecord) int64 { return r.Counts.WD },
		"count_none": func(_ *Task, r *DoneRecord) int64 { return r.Counts.None },
		"count_star": func(_ *Task, r *DoneRecord) int64 { return r.Counts.Star },
	}
	nullable := map[string]func(r *DoneRecord) *float64{
		"bh_mass_p05": func(r *DoneRecord) *float64 { return r.BHMass.P05 },
		"bh_mass_p50": func(r *DoneRecord) *float64 { return r.BHMass.P50 },
		"bh_mass_p95": func(r *DoneRecord) *float64 { return r.BHMass.P95 },
		"bh_mass_max": func(r *DoneRecord) *float64 { return r.BHMass.Max },
	}
	for row := range m.Tasks {
		t, r := &m.Tasks[row], recs[row]
		for name, f := range ints {
			col(name).I64[row] = f(t, r)
		}
		for name, f := range nullable {
			c := col(name)
			if v := f(r); v != nil {
				c.F64[row], c.Valid[row] = *v, true
			} else {
				c.F64[row], c.Valid[row] = 0, false
			}
		}
		col("mass_represented").F64[row] = r.MassRepresented
		col("seconds").F64[row] = r.Seconds
		for k, key := range m.Keys {
			if k >= len(t.Vary) || t.Vary[k].Key != key.Key {
				return CollectResult{}, fmt.Errorf("sweep: manifest task %d does not list key %s in place %d; the manifest was altered: plan again", t.Index, key.Key, k)
			}
			a := t.Vary[k]
			c := col(key.Column)
			if key.Numeric {
				if a.Number == nil {
					return CollectResult{}, fmt.Errorf("sweep: manifest task %d: %s has no number; the manifest was altered: plan again", t.Index, key.Key)
				}
				c.F64[row] = *a.Number
				continue
			}
			idx := -1
			for j, l := range key.Labels {
				if l == a.Label {
					idx = j
				}
			}
			if idx < 0 {
				return CollectResult{}, fmt.Errorf("sweep: manifest task %d: %s = %q is not among the key's values; the manifest was altered: plan again", t.Index, key.Key, a.Label)
			}
			c.Cat[row] = uint8(idx)
		}
	}
	keysJSON, _ := json.Marshal(m.Keys) // plain strings and bools always marshal
	w, err := catalog.Create(path, schema, catalog.Options{
		Format: catalog.Parquet,
		Metadata: map[string]string{
			catalog.MetaVersion: popsynth.Version,
			MetaSweepKeys:       string(keysJSON),
			MetaSweepTasks:      strconv.Itoa(len(m.Tasks)),
			MetaSweepSeed:       strconv.FormatUint(m.BaseSeed, 10),
			MetaSweepYAML:       m.Text,
		},
	})
	if err != nil {
		return CollectResult{}, err
	}
	if err := w.Write(b); err != nil {
		w.Abort()
		return CollectResult{}, err
	}
	if err := w.Close(); err != nil {
		w.Abort()
		return CollectResult{}, err
	}
	return CollectResult{Path: path, Rows: len(m.Tasks)}, nil
}
