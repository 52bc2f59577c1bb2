package sweep

import (
	"fmt"
	"path"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
)

// ManifestFormat names the layout of manifest.json.
const ManifestFormat = "corefall-sweep/1"

// Manifest is the list of a sweep's tasks, stored as DIR/manifest.json.
type Manifest struct {
	Format   string `json:"format"`
	Version  string `json:"corefall_version"`
	Sweep    string `json:"sweep_file"` // the sweep file's name when planned
	Text     string `json:"sweep_yaml"` // the sweep file's text
	BaseSeed uint64 `json:"base_seed"`
	Cells    int    `json:"cells"`
	Repeats  int    `json:"repeats"`
	// Keys are the varied keys, in grid order.
	Keys  []KeyInfo `json:"keys"`
	Tasks []Task    `json:"tasks"`
}

// KeyInfo describes a varied key.
type KeyInfo struct {
	Key     string `json:"key"`     // config key, e.g. explosion.engine
	Column  string `json:"column"`  // partition key and summary column, e.g. explosion_engine
	Numeric bool   `json:"numeric"` // every value is a number (a float64 column in the summary)
	// Labels are the distinct partition values, in the order of the sweep file.
	Labels []string `json:"labels"`
}

// Task is one run of the sweep.
type Task struct {
	Index  int    `json:"index"`
	Cell   int    `json:"cell"`
	Repeat int    `json:"repeat"`
	Seed   uint64 `json:"seed"` // popsynth.DeriveSeed(base seed, index)
	// Vary holds the task's values of the varied keys, in the order of Manifest.Keys.
	Vary []Assignment `json:"vary"`
	// Part is the path of the task's catalogue part, relative to the sweep directory, with '/'.
	Part    string `json:"part"`
	Systems int64  `json:"systems"`
	// Config is the task's effective configuration as YAML (popsynth.Config.YAML).
	Config string `json:"config"`
}

// Assignment is one varied key's value in a task.
type Assignment struct {
	Key    string   `json:"key"`
	Value  string   `json:"value"`            // as given to --set
	Label  string   `json:"label"`            // partition value
	Number *float64 `json:"number,omitempty"` // the value, when numeric
}

// String returns "key=value".
func (a Assignment) String() string { return a.Key + "=" + a.Value }

// CellLabel returns a task's assignments as "k1=v1, k2=v2" (or "no varied keys").
func CellLabel(vary []Assignment) string {
	if len(vary) == 0 {
		return "no varied keys"
	}
	parts := make([]string, len(vary))
	for i, a := range vary {
		parts[i] = a.String()
	}
	return strings.Join(parts, ", ")
}

// NumCells returns the number of grid cells (1 when nothing varies).
func (s *Spec) NumCells() int {
	n := 1
	for _, a := range s.Axes {
		n *= a.Len()
	}
	return n
}

// Cell returns the assignments of grid cell c (0 <= c < NumCells), the last axis varying fastest.
func (s *Spec) Cell(c int) []Assignment {
	pos := make([]int, len(s.Axes))
	for i := len(s.Axes) - 1; i >= 0; i-- {
		n := s.Axes[i].Len()
		pos[i] = c % n
		c /= n
	}
	var out []Assignment
	for i, a := range s.Axes {
		for k, key := range a.Keys {
			v := a.Values[k][pos[i]]
			as := Assignment{Key: key, Value: v.Text, Label: v.Label}
			if v.IsNumber {
				x := v.Number
				as.Number = &x
			}
			out = append(out, as)
		}
	}
	return out
}

// keys returns the varied keys with their partition column names.
func (s *Spec) keys() ([]KeyInfo, error) {
	var out []KeyInfo
	cols := map[string]string{}
	for _, a := range s.Axes {
		for k, key := range a.Keys {
			ki := KeyInfo{Key: key, Column: ColumnName(key), Numeric: true}
			for _, v := range a.Values[k] {
				ki.Numeric = ki.Numeric && v.IsNumber
				ki.Labels = append(ki.Labels, v.Label)
			}
			if other, dup := cols[ki.Column]; dup {
				return nil, fmt.Errorf("sweep: %s: keys %s and %s both give the partition column %s; vary only one of them", s.Name, other, key, ki.Column)
			}
			cols[ki.Column] = key
			if !ki.Numeric && len(ki.Labels) > catalog.MaxCategories {
				return nil, fmt.Errorf("sweep: %s: %s has %d values that are not all numbers; at most %d are allowed (the summary stores them as categories)",
					s.Name, key, len(ki.Labels), catalog.MaxCategories)
			}
			out = append(out, ki)
		}
	}
	return out, nil
}

// partPath returns the part path (relative, with '/') of task index in the given grid cell.
func partPath(keys []KeyInfo, vary []Assignment, repeats, repeat, index int) string {
	elems := []string{"catalogue"}
	for i, a := range vary {
		elems = append(elems, keys[i].Column+"="+a.Label)
	}
	if repeats > 1 {
		elems = append(elems, "repeat="+strconv.Itoa(repeat))
	}
	elems = append(elems, fmt.Sprintf("part-%05d.parquet", index))
	return path.Join(elems...)
}

// maxCellErrors bounds the number of invalid cells Plan reports at once.
const maxCellErrors = 5

// Plan expands s into its tasks and checks each configuration with popsynth.Load (the base
// section, then the cell's values as --set overrides) and popsynth.NewEngine, so that a bad value
// anywhere in the grid is reported, with its cell index and key=value assignments, before anything
// runs. COREFALL_* environment variables are not read: a task's configuration is the same on every
// machine. A relative core.table is taken relative to Spec.Dir and stored absolute.
func (s *Spec) Plan() (*Manifest, error) {
	keys, err := s.keys()
	if err != nil {
		return nil, err
	}
	cells := s.NumCells()
	m := &Manifest{
		Format:  ManifestFormat,
		Version: popsynth.Version,
		Sweep:   s.Name,
		Text:    s.Text,
		Cells:   cells,
		Repeats: s.Repeats,
		Keys:    keys,
		Tasks:   make([]Task, 0, cells*s.Repeats),
	}
	// Cells are independent: check them on every core, then keep the tasks in index order.
	results := make([]cellResult, cells)
	var (
		next atomic.Int64
		wg   sync.WaitGroup
	)
	for range min(runtime.GOMAXPROCS(0), cells) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				c := int(next.Add(1) - 1)
				if c >= cells {
					return
				}
				results[c] = s.planCell(c, keys)
			}
		}()
	}
	wg.Wait()
	var bad []string
	nbad := 0
	for c, r := range results {
		if r.err != nil {
			nbad++
			if len(bad) < maxCellErrors {
				bad = append(bad, fmt.Sprintf("cell %d (%s; tasks %s): %v", c, CellLabel(s.Cell(c)), taskRange(c, s.Repeats), r.err))
			}
			continue
		}
		m.BaseSeed = r.baseSeed // the same in every cell: seed cannot be varied
		m.Tasks = append(m.Tasks, r.tasks...)
	}
	if nbad > 0 {
		more := ""
		if nbad > len(bad) {
			more = fmt.Sprintf("\n  ... and %d more", nbad-len(bad))
		}
		return nil, fmt.Errorf("sweep: %s: %d of %d grid cells have an invalid configuration; nothing was planned:\n  %s%s",
			s.Name, nbad, cells, strings.Join(bad, "\n  "), more)
	}
	return m, nil
}

type cellResult struct {
	tasks    []Task
	baseSeed uint64
	err      error
}

// planCell loads and checks the configuration of grid cell c and makes its tasks.
func (s *Spec) planCell(c int, keys []KeyInfo) cellResult {
	vary := s.Cell(c)
	set := make([]string, len(vary))
	for i, a := range vary {
		set[i] = a.String()
	}
	src := popsynth.Sources{Set: set}
	if len(s.Base) > 0 {
		src.File, src.Data = s.Name+" (base)", s.Base
	}
	cfg, err := popsynth.Load(src)
	if err != nil {
		return cellResult{err: err}
	}
	if cfg.Core.Table != "" && !filepath.IsAbs(cfg.Core.Table) && s.Dir != "" {
		cfg.Core.Table = filepath.Join(s.Dir, cfg.Core.Table)
	}
	cfg.Output.Format = "parquet"
	cfg.Output.Path = partPath(keys, vary, s.Repeats, 0, c*s.Repeats)
	if _, err := popsynth.NewEngine(cfg); err != nil {
		return cellResult{err: err}
	}
	res := cellResult{baseSeed: cfg.Seed, tasks: make([]Task, s.Repeats)}
	for r := range s.Repeats {
		i := c*s.Repeats + r
		tc := cfg
		tc.Seed = popsynth.DeriveSeed(res.baseSeed, uint64(i))
		tc.Output.Path = partPath(keys, vary, s.Repeats, r, i)
		res.tasks[r] = Task{
			Index:   i,
			Cell:    c,
			Repeat:  r,
			Seed:    tc.Seed,
			Vary:    vary,
			Part:    tc.Output.Path,
			Systems: tc.Systems,
			Config:  tc.YAML(),
		}
	}
	return res
}

func taskRange(cell, repeats int) string {
	if repeats == 1 {
		return strconv.Itoa(cell)
	}
	return fmt.Sprintf("%d-%d", cell*repeats, cell*repeats+repeats-1)
}

// summaryFixedColumns are the columns of summary.parquet other than the varied keys.
var summaryFixedColumns = []catalog.Column{
	{Name: "task", Unit: "1", Kind: catalog.Int64, Doc: "task index in the sweep manifest"},
	{Name: "cell", Unit: "1", Kind: catalog.Int64, Doc: "grid cell of the task"},
	{Name: "repeat", Unit: "1", Kind: catalog.Int64, Doc: "repeat of the grid cell (each repeat has its own seed)"},
	{Name: "systems", Unit: "1", Kind: catalog.Int64, Doc: "systems evolved"},
	{Name: "binaries", Unit: "1", Kind: catalog.Int64, Doc: "binary systems evolved"},
	{Name: "rows", Unit: "1", Kind: catalog.Int64, Doc: "rows in the task's part"},
	{Name: "count_BH", Unit: "1", Kind: catalog.Int64, Doc: "black holes (primaries and companions)"},
	{Name: "count_NS", Unit: "1", Kind: catalog.Int64, Doc: "neutron stars"},
	{Name: "count_WD", Unit: "1", Kind: catalog.Int64, Doc: "white dwarfs"},
	{Name: "count_none", Unit: "1", Kind: catalog.Int64, Doc: "stars that left no remnant (pair-instability supernovae)"},
	{Name: "count_star", Unit: "1", Kind: catalog.Int64, Doc: "stars still alive at the end of the run"},
	{Name: "bh_mass_p05", Unit: "Msun", Kind: catalog.Float64, Nullable: true, Doc: "5th percentile of black-hole masses (to 0.005 Msun); null without black holes"},
	{Name: "bh_mass_p50", Unit: "Msun", Kind: catalog.Float64, Nullable: true, Doc: "median black-hole mass (to 0.005 Msun); null without black holes"},
	{Name: "bh_mass_p95", Unit: "Msun", Kind: catalog.Float64, Nullable: true, Doc: "95th percentile of black-hole masses (to 0.005 Msun); null without black holes"},
	{Name: "bh_mass_max", Unit: "Msun", Kind: catalog.Float64, Nullable: true, Doc: "heaviest black hole; null without black holes"},
	{Name: "mass_represented", Unit: "Msun", Kind: catalog.Float64, Doc: "stellar mass the task's catalogue represents (whole IMF, companions included)"},
	{Name: "seconds", Unit: "s", Kind: catalog.Float64, Doc: "wall time of the task"},
}

// reservedColumns returns the column names a varied key may not take as they are: those of the
// catalogue (with binaries) and of the summary.
func reservedColumns() map[string]bool {
	m := map[string]bool{}
	for _, c := range catalog.Columns(true) {
		m[c.Name] = true
	}
	for _, c := range summaryFixedColumns {
		m[c.Name] = true
	}
	return m
}
