package sweep

import (
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/corefall/corefall/popsynth"
)

// gridSweep is a 2 x 3 grid with a zipped pair of keys and 2 repeats: 2*3*2*2 = 24 tasks.
const gridSweep = `
base:
  systems: 2000
  seed: 77
  explosion:
    max_ns_mass: 2.4
vary:
  explosion.engine: [rapid, delayed]
  metallicity.fixed: [0.0002, 0.002, 0.0142]
zip:
  kicks.ns_sigma: [265, 150]
  kicks.bh_mode: [fallback, momentum]
repeats: 2
`

func mustSpec(t *testing.T, text string) *Spec {
	t.Helper()
	s, err := ParseSpec("test.yaml", []byte(text))
	if err != nil {
		t.Fatalf("ParseSpec: %v", err)
	}
	return s
}

func mustPlan(t *testing.T, text string) *Manifest {
	t.Helper()
	m, err := mustSpec(t, text).Plan()
	if err != nil {
		t.Fatalf("Plan: %v", err)
	}
	return m
}

// TestPlanGrid checks the expansion of a grid: the number and order of tasks (first key outermost,
// zip after the vary keys, repeats innermost), that each task's effective config carries its values
// and the base, the seeds (popsynth.DeriveSeed(base seed, index), as the sweep design requires) and
// the hive part paths.
func TestPlanGrid(t *testing.T) {
	m := mustPlan(t, gridSweep)
	if len(m.Tasks) != 24 || m.Cells != 12 || m.Repeats != 2 {
		t.Fatalf("got %d tasks, %d cells, %d repeats; want 24, 12, 2", len(m.Tasks), m.Cells, m.Repeats)
	}
	if m.BaseSeed != 77 {
		t.Errorf("base seed %d, want 77 (from base)", m.BaseSeed)
	}
	engines := []string{"rapid", "delayed"}
	zs := []float64{0.0002, 0.002, 0.0142}
	sigmas := []float64{265, 150}
	modes := []string{"fallback", "momentum"}
	seeds := map[uint64]int{}
	for i, task := range m.Tasks {
		cell, rep := i/2, i%2
		e, z, k := cell/6, (cell/2)%3, cell%2
		if task.Index != i || task.Cell != cell || task.Repeat != rep {
			t.Errorf("task %d: index %d cell %d repeat %d; want %d %d %d", i, task.Index, task.Cell, task.Repeat, i, cell, rep)
		}
		cfg, err := popsynth.ParseYAMLConfig("task", task.Config)
		if err != nil {
			t.Fatalf("task %d config does not load: %v", i, err)
		}
		if cfg.Explosion.Engine != engines[e] || cfg.Metallicity.Fixed != zs[z] || cfg.Kicks.NSSigma != sigmas[k] || cfg.Kicks.BHMode != modes[k] {
			t.Errorf("task %d: config has engine %s Z %g sigma %g mode %s; want %s %g %g %s", i,
				cfg.Explosion.Engine, cfg.Metallicity.Fixed, cfg.Kicks.NSSigma, cfg.Kicks.BHMode, engines[e], zs[z], sigmas[k], modes[k])
		}
		if cfg.Systems != 2000 || cfg.Explosion.MaxNSMass != 2.4 || task.Systems != 2000 {
			t.Errorf("task %d: base values lost: systems %d (task %d), max_ns_mass %g", i, cfg.Systems, task.Systems, cfg.Explosion.MaxNSMass)
		}
		if want := popsynth.DeriveSeed(77, uint64(i)); cfg.Seed != want || task.Seed != want {
			t.Errorf("task %d: seed %d (config %d); want DeriveSeed(77, %d) = %d", i, task.Seed, cfg.Seed, i, want)
		}
		if j, dup := seeds[task.Seed]; dup {
			t.Errorf("tasks %d and %d share the seed %d", j, i, task.Seed)
		}
		seeds[task.Seed] = i
		want := fmt.Sprintf("catalogue/explosion_engine=%s/metallicity_fixed=%g/kicks_ns_sigma=%g/kicks_bh_mode=%s/repeat=%d/part-%05d.parquet",
			engines[e], zs[z], sigmas[k], modes[k], rep, i)
		if task.Part != want || cfg.Output.Path != want || cfg.Output.Format != "parquet" {
			t.Errorf("task %d: part %q (config %q, %s); want %q", i, task.Part, cfg.Output.Path, cfg.Output.Format, want)
		}
		if got := CellLabel(task.Vary); got != fmt.Sprintf("explosion.engine=%s, metallicity.fixed=%g, kicks.ns_sigma=%g, kicks.bh_mode=%s", engines[e], zs[z], sigmas[k], modes[k]) {
			t.Errorf("task %d: cell label %q", i, got)
		}
	}
	wantKeys := []KeyInfo{
		{Key: "explosion.engine", Column: "explosion_engine", Labels: []string{"rapid", "delayed"}},
		{Key: "metallicity.fixed", Column: "metallicity_fixed", Numeric: true, Labels: []string{"0.0002", "0.002", "0.0142"}},
		{Key: "kicks.ns_sigma", Column: "kicks_ns_sigma", Numeric: true, Labels: []string{"265", "150"}},
		{Key: "kicks.bh_mode", Column: "kicks_bh_mode", Labels: []string{"fallback", "momentum"}},
	}
	if fmt.Sprint(m.Keys) != fmt.Sprint(wantKeys) {
		t.Errorf("keys %v\nwant %v", m.Keys, wantKeys)
	}
}

// TestZipListForm: zip given as a list of vary keys makes them one axis at the place of the first.
func TestZipListForm(t *testing.T) {
	s := mustSpec(t, `
vary:
  kicks.ns_sigma: [265, 150, 80]
  explosion.engine: [rapid, delayed]
  kicks.bh_mode: [fallback, momentum, none]
zip: [kicks.ns_sigma, kicks.bh_mode]
`)
	if len(s.Axes) != 2 || strings.Join(s.Axes[0].Keys, ",") != "kicks.ns_sigma,kicks.bh_mode" || s.Axes[1].Keys[0] != "explosion.engine" {
		t.Fatalf("axes %+v; want [ns_sigma+bh_mode] [engine]", s.Axes)
	}
	if s.NumCells() != 6 {
		t.Errorf("%d cells, want 3 x 2 = 6", s.NumCells())
	}
	if got := CellLabel(s.Cell(3)); got != "kicks.ns_sigma=150, kicks.bh_mode=momentum, explosion.engine=delayed" {
		t.Errorf("cell 3 = %s", got)
	}
}

// TestNoVary: a sweep of repeats alone is a list of independent runs of the base.
func TestNoVary(t *testing.T) {
	m := mustPlan(t, "base: {systems: 100}\nrepeats: 3\n")
	if len(m.Tasks) != 3 || len(m.Keys) != 0 {
		t.Fatalf("%d tasks, %d keys; want 3, 0", len(m.Tasks), len(m.Keys))
	}
	if m.Tasks[2].Part != "catalogue/repeat=2/part-00002.parquet" {
		t.Errorf("part %q", m.Tasks[2].Part)
	}
	if m.BaseSeed != popsynth.Default().Seed {
		t.Errorf("base seed %d; want the default %d", m.BaseSeed, popsynth.Default().Seed)
	}
}

// TestSpecErrors: every malformed sweep file is refused with a message that names the problem.
func TestSpecErrors(t *testing.T) {
	for _, c := range []struct {
		name, text string
		want       []string // substrings of the error
	}{
		{"unknown top key", "vary: {explosion.engine: [rapid]}\nrepeat: 2\n", []string{`test.yaml:2`, `unknown key "repeat"`, "base, vary, zip, repeats"}},
		{"unknown base key", "base:\n  explosion:\n    engin: rapid\n", []string{"test.yaml:3", `"explosion.engin"`, `did you mean "explosion.engine"`}},
		{"base section as value", "base:\n  imf: kroupa2001\n", []string{`"imf" is a section`}},
		{"base output.path", "base:\n  output:\n    path: x.parquet\n", []string{"output.path is not allowed"}},
		{"base output.format", "base:\n  output:\n    format: csv\n", []string{"output.format", "Parquet"}},
		{"unknown vary key", "vary:\n  explosion.engien: [rapid]\n", []string{"test.yaml:2", `unknown config key "explosion.engien"`, "did you mean"}},
		{"vary section", "vary:\n  explosion: [rapid]\n", []string{`"explosion" is a section`}},
		{"vary scalar", "vary:\n  explosion.engine: rapid\n", []string{"must have a list of values"}},
		{"vary empty", "vary:\n  explosion.engine: []\n", []string{"empty list"}},
		{"vary seed", "vary:\n  seed: [1, 2]\n", []string{"seed cannot be varied", "repeats"}},
		{"vary workers", "vary:\n  workers: [1, 2]\n", []string{"workers cannot be varied"}},
		{"vary null", "vary:\n  explosion.engine: [rapid, ~]\n", []string{"value 2", "null"}},
		{"vary duplicate value", "vary:\n  metallicity.fixed: [0.01, 0.010]\n", []string{"lists the value 0.01 twice"}},
		{"labels collide", "vary:\n  explosion.engine: [\"a b\", \"a_b\"]\n", []string{`"a b" and "a_b"`, "same directory name"}},
		{"vary map value", "vary:\n  explosion.engine: [{a: 1}]\n", []string{"not a map"}},
		{"zip unequal", "zip:\n  kicks.ns_sigma: [265, 150]\n  kicks.bh_mode: [fallback]\n", []string{"kicks.bh_mode has 1 values but kicks.ns_sigma has 2", "equal lengths"}},
		{"zip list unknown", "vary:\n  kicks.ns_sigma: [265, 150]\nzip: [kicks.ns_sigma, kicks.bh_mode]\n", []string{`"kicks.bh_mode" is not a key of vary`}},
		{"zip list unequal", "vary:\n  kicks.ns_sigma: [265, 150]\n  kicks.bh_mode: [none]\nzip: [kicks.ns_sigma, kicks.bh_mode]\n", []string{"equal lengths"}},
		{"zip and vary", "vary:\n  kicks.ns_sigma: [265]\nzip:\n  kicks.ns_sigma: [150]\n", []string{"also in vary"}},
		{"repeats zero", "repeats: 0\n", []string{"repeats", "want a whole number >= 1"}},
		{"repeats text", "repeats: many\n", []string{"repeats"}},
		{"not a map", "- a\n- b\n", []string{"must be a map"}},
		{"empty", "", []string{"is empty"}},
		{"bad yaml", "vary: [\n", []string{"not valid YAML"}},
		{"too many", "vary:\n  kicks.ns_sigma: [" + numbers(1001) + "]\n  kicks.reference_ns_mass: [" + numbers(1000) + "]\n", []string{"more than 1000000 tasks", "split"}},
	} {
		_, err := ParseSpec("test.yaml", []byte(c.text))
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.name, err, w)
			}
		}
	}
}

// TestPlanNamesBadCell: a value the config rejects, and one that only the engine rejects (a
// missing stellar-model table), are errors before anything runs that name the cell, its index and
// its assignments.
func TestPlanNamesBadCell(t *testing.T) {
	for _, c := range []struct {
		name, text string
		want       []string
	}{
		{"bad engine", "vary:\n  explosion.engine: [rapid, fast]\n  metallicity.fixed: [0.01]\n",
			[]string{"1 of 2 grid cells", "cell 1 (explosion.engine=fast, metallicity.fixed=0.01; tasks 1)", "explosion.engine"}},
		{"bad range", "vary:\n  binary_fraction: [0.5, 1.5, 2]\nrepeats: 2\n",
			[]string{"2 of 3 grid cells", "cell 1 (binary_fraction=1.5; tasks 2-3)", "cell 2 (binary_fraction=2; tasks 4-5)", "binary_fraction"}},
		{"engine-only error", "base:\n  core:\n    model: table\nvary:\n  core.table: [no-such-grid.csv]\n",
			[]string{"cell 0 (core.table=no-such-grid.csv", "no-such-grid.csv"}},
	} {
		s := mustSpec(t, c.text)
		s.Dir = t.TempDir()
		_, err := s.Plan()
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", c.name, err, w)
			}
		}
	}
}

// TestRelativeTablePath: a relative core.table is taken from the sweep file's directory, so tasks
// run from any working directory find it.
func TestRelativeTablePath(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "s.yaml")
	if err := os.WriteFile(path, []byte("base:\n  core:\n    table: grids/models.csv\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	s, err := ReadSpec(path)
	if err != nil {
		t.Fatal(err)
	}
	m, err := s.Plan()
	if err != nil {
		t.Fatal(err) // core.model is builtin, so the table is not read
	}
	cfg, err := popsynth.ParseYAMLConfig("task 0", m.Tasks[0].Config)
	if err != nil {
		t.Fatal(err)
	}
	if want := filepath.Join(dir, "grids", "models.csv"); cfg.Core.Table != want {
		t.Errorf("core.table = %q, want %q", cfg.Core.Table, want)
	}
}

// TestLabelsAndColumns: partition values and keys are path- and column-safe, numbers are written
// without exponents in the usual range, and a key whose column name a catalogue or summary column
// takes gets the cfg_ prefix.
func TestLabelsAndColumns(t *testing.T) {
	s := mustSpec(t, `
vary:
  imf.slopes: [[1.3, 2.3], [1.3, 2.7]]
  systems: [200000, 1e5]
  pair_instability.enabled: [true, false]
  metallicity.min: [1e-7, 0.00001]
  imf.law: [broken-power-law, "x/y z", .hidden]
`)
	want := map[string][]string{
		"imf.slopes":               {"1.3_2.3", "1.3_2.7"},
		"systems":                  {"200000", "100000"},
		"pair_instability.enabled": {"true", "false"},
		"metallicity.min":          {"1e-07", "0.00001"},
		"imf.law":                  {"broken-power-law", "x_y_z", "v.hidden"},
	}
	texts := map[string][]string{
		"imf.slopes": {"[1.3, 2.3]", "[1.3, 2.7]"},
		"systems":    {"200000", "100000"},
	}
	for _, a := range s.Axes {
		key := a.Keys[0]
		for j, v := range a.Values[0] {
			if v.Label != want[key][j] {
				t.Errorf("%s value %d: label %q, want %q", key, j, v.Label, want[key][j])
			}
			if tx, ok := texts[key]; ok && v.Text != tx[j] {
				t.Errorf("%s value %d: text %q, want %q", key, j, v.Text, tx[j])
			}
		}
	}
	for key, col := range map[string]string{
		"explosion.engine": "explosion_engine",
		"systems":          "cfg_systems", // a summary column
		"imf.sample_min":   "imf_sample_min",
		"binary_fraction":  "binary_fraction",
	} {
		if got := ColumnName(key); got != col {
			t.Errorf("ColumnName(%s) = %s, want %s", key, got, col)
		}
	}
	if got := safeLabel(strings.Repeat("a", 300)); len(got) > 96 || !strings.HasPrefix(got, "aaaa") {
		t.Errorf("long label %q (%d bytes) not shortened to <= 96", got, len(got))
	}
}

// TestNoPartitionColumnClashes: no config key maps to a partition column that equals a catalogue
// column (a hive reader would then see one name with two types).
func TestNoPartitionColumnClashes(t *testing.T) {
	reserved := reservedColumns()
	for _, k := range popsynth.KnownKeys() {
		if reserved[ColumnName(k)] {
			t.Errorf("config key %s gives the partition column %s, which a catalogue or summary column already has", k, ColumnName(k))
		}
	}
}

// numbers returns "1, 2, ..., n".
func numbers(n int) string {
	parts := make([]string, n)
	for i := range parts {
		parts[i] = fmt.Sprint(i + 1)
	}
	return strings.Join(parts, ", ")
}
