package popsynth

import (
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

var updateDemoGrid = flag.Bool("update-demo-grid", false, "rewrite testdata/demo-grid.csv from the builtin core model")

const demoGridPath = "../testdata/demo-grid.csv"

var (
	demoMasses        = []float64{5, 8, 10, 12, 15, 20, 25, 30, 40, 50, 60, 80, 100, 120, 150}
	demoMetallicities = []float64{0.0001, 0.0002, 0.001, 0.002, 0.006, 0.0142, 0.03}
)

func formatDemoGrid(rows []remnant.TableRow) string {
	var b strings.Builder
	b.WriteString("# Demo grid made by corefall's builtin core model (remnant.DefaultBuiltin), NOT a stellar-evolution grid.\n")
	b.WriteString("# It shows the format of core.table; regenerate: go test ./popsynth -run TestDemoGrid -update-demo-grid\n")
	b.WriteString("initial_mass,metallicity,final_mass,he_core_mass,co_core_mass,lifetime_myr,max_radius\n")
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', 10, 64) }
	for _, r := range rows {
		fmt.Fprintf(&b, "%s,%s,%s,%s,%s,%s,%s\n", g(r.InitialMass), g(r.Metallicity), g(r.FinalMass),
			g(r.HeCoreMass), g(r.COCoreMass), g(r.LifetimeMyr), g(r.MaxRadius))
	}
	return b.String()
}

// TestDemoGrid reads the shipped demo grid and checks the table model against the builtin model
// that made it: at every grid point they agree (to the 10 digits written), and the table model's
// interpolation stays close to the builtin relations between points.
func TestDemoGrid(t *testing.T) {
	b := remnant.DefaultBuiltin()
	if *updateDemoGrid {
		text := formatDemoGrid(remnant.DemoGrid(b, demoMasses, demoMetallicities))
		if err := os.WriteFile(demoGridPath, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	rows, err := ReadStellarTable(demoGridPath)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := remnant.NewTable(rows)
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range demoMasses {
		for _, z := range demoMetallicities {
			want, _ := b.Core(m, z)
			got, err := tab.Core(m, z)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range [][2]float64{{got.FinalMass, want.FinalMass}, {got.COCoreMass, want.COCoreMass}, {got.LifetimeMyr, want.LifetimeMyr}} {
				if math.Abs(p[0]-p[1]) > 1e-8*math.Abs(p[1]) {
					t.Errorf("M=%v Z=%v: table %v, builtin %v; the demo grid is stale (regenerate with -update-demo-grid)", m, z, p[0], p[1])
				}
			}
		}
	}
	// Between grid points, linear interpolation in (log M, log Z) of a smooth model stays within a
	// few per cent of it where the model has no kink (a property check of the interpolation).
	got, err := tab.Core(17, 0.0005)
	if err != nil {
		t.Fatal(err)
	}
	want, _ := b.Core(17, 0.0005)
	if math.Abs(got.COCoreMass-want.COCoreMass) > 0.05*want.COCoreMass {
		t.Errorf("interpolated CO core at (17, 0.0005): %v vs builtin %v", got.COCoreMass, want.COCoreMass)
	}
	// The engine runs on the table model.
	cfg := load(t, "systems=3000", "core.model=table", "core.table="+demoGridPath, "imf.sample_max=150")
	path := filepath.Join(t.TempDir(), "c.parquet")
	runTo(t, cfg, path)
}

// TestBadStellarTables: unreadable or malformed grids are errors naming the file and the problem.
func TestBadStellarTables(t *testing.T) {
	header := "initial_mass,metallicity,final_mass,he_core_mass,co_core_mass,lifetime_myr\n"
	cases := []struct {
		name, text, want string
	}{
		{"missing column", "initial_mass,metallicity,final_mass,he_core_mass,lifetime_myr\n10,0.01,9,3,20\n", "co_core_mass"},
		{"not a number", header + "10,0.01,9,3,abc,20\n", "abc"},
		{"empty", "", "empty"},
		{"header only", header, "no rows"},
		{"ragged grid", header + "10,0.01,9,3,2,20\n20,0.01,15,6,4,9\n10,0.02,9,3,2,20\n", "0.02"},
		{"short line", header + "10,0.01,9\n", "line 2"},
	}
	for _, c := range cases {
		p := writeFile(t, "grid.csv", c.text)
		rows, err := ReadStellarTable(p)
		if err == nil {
			_, err = remnant.NewTable(rows)
		}
		if err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %q does not mention %q", c.name, err, c.want)
		}
	}
	if _, err := ReadStellarTable(filepath.Join(t.TempDir(), "nope.csv")); err == nil || !strings.Contains(err.Error(), "nope.csv") {
		t.Errorf("missing file: %v", err)
	}
	// A query outside the grid is refused before the run starts, naming the keys to change.
	_, err := NewEngine(load(t, "core.model=table", "core.table="+demoGridPath, "metallicity.fixed=0.05"))
	if err == nil || !strings.Contains(err.Error(), "metallicity") {
		t.Errorf("outside the grid: %v", err)
	}
}

// TestStellarTableParquet: the same grid read from Parquet and from CSV gives the same rows.
func TestStellarTableParquet(t *testing.T) {
	rows, err := ReadStellarTable(demoGridPath)
	if err != nil {
		t.Fatal(err)
	}
	names := append(append([]string(nil), StellarTableColumns...), "max_radius")
	cols := make([]catalog.Column, len(names))
	for i, n := range names {
		cols[i] = catalog.Column{Name: n, Unit: "1", Kind: catalog.Float64}
	}
	s, err := catalog.NewSchema(cols)
	if err != nil {
		t.Fatal(err)
	}
	b := catalog.NewBatch(s, len(rows))
	b.Reset(len(rows))
	for i, r := range rows {
		for j, x := range []float64{r.InitialMass, r.Metallicity, r.FinalMass, r.HeCoreMass, r.COCoreMass, r.LifetimeMyr, r.MaxRadius} {
			b.Cols[j].F64[i] = x
		}
	}
	path := filepath.Join(t.TempDir(), "grid.parquet")
	w, err := catalog.Create(path, s, catalog.Options{Format: catalog.Parquet})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Write(b); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	back, err := ReadStellarTable(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(back) != len(rows) {
		t.Fatalf("%d rows from Parquet, %d from CSV", len(back), len(rows))
	}
	for i := range rows {
		if back[i] != rows[i] {
			t.Fatalf("row %d: Parquet %+v, CSV %+v", i, back[i], rows[i])
		}
	}
}
