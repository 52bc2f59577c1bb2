package remnant

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// bilinearRow returns a grid row whose every quantity is bilinear in
// (x, y) = (log10 M, log10 Z): a + b x + c y + d x y. Bilinear interpolation
// reproduces such functions exactly (analytic), cross term included. The
// coefficients keep CO < He < final < initial mass on the test grid.
func bilinearRow(m, z float64) TableRow {
	x, y := math.Log10(m), math.Log10(z)
	f := func(a, b, c, d float64) float64 { return a + b*x + c*y + d*x*y }
	return TableRow{
		InitialMass: m, Metallicity: z,
		FinalMass:   f(8, 2, 0.5, 0.1),
		HeCoreMass:  f(3, 1, 0.2, 0.05),
		COCoreMass:  f(2, 0.5, 0.1, 0.02),
		LifetimeMyr: f(30, -10, 1, 0.3),
		MaxRadius:   f(500, 300, 20, 5),
	}
}

var (
	testMasses = []float64{10, 15, 25, 40, 100}
	testMetals = []float64{1e-4, 1e-3, 3e-3, 1e-2}
)

// shuffledGrid returns the rows of fn over the test grid in a random order.
func shuffledGrid(fn func(m, z float64) TableRow) []TableRow {
	var rows []TableRow
	for _, z := range testMetals {
		for _, m := range testMasses {
			rows = append(rows, fn(m, z))
		}
	}
	src := rand.New(rand.NewPCG(7, 8))
	src.Shuffle(len(rows), func(i, j int) { rows[i], rows[j] = rows[j], rows[i] })
	return rows
}

func TestTableBilinearExact(t *testing.T) {
	tab, err := NewTable(shuffledGrid(bilinearRow))
	if err != nil {
		t.Fatal(err)
	}
	src := rand.New(rand.NewPCG(1, 1))
	for range 2000 {
		m := 10 * math.Pow(10, src.Float64())     // 10-100 Msun
		z := 1e-4 * math.Pow(10, 2*src.Float64()) // 1e-4 to 1e-2
		c, err := tab.Core(m, z)
		if err != nil {
			t.Fatal(err)
		}
		want := bilinearRow(m, z)
		got := TableRow{m, z, c.FinalMass, c.HeCoreMass, c.COCoreMass, c.LifetimeMyr, c.MaxRadius}
		if !rowsClose(got, want, 1e-12) || c.InitialMass != m || c.Metallicity != z {
			t.Fatalf("Core(%g, %g) = %+v, want %+v", m, z, got, want)
		}
	}
}

func rowsClose(a, b TableRow, tol float64) bool {
	va := []float64{a.InitialMass, a.Metallicity, a.FinalMass, a.HeCoreMass, a.COCoreMass, a.LifetimeMyr, a.MaxRadius}
	vb := []float64{b.InitialMass, b.Metallicity, b.FinalMass, b.HeCoreMass, b.COCoreMass, b.LifetimeMyr, b.MaxRadius}
	for i := range va {
		if math.Abs(va[i]-vb[i]) > tol*math.Max(1, math.Abs(vb[i])) {
			return false
		}
	}
	return true
}

// TestTableRoundTrip: at grid points Core returns the rows, and Rows returns
// them in grid order (by metallicity, then mass).
func TestTableRoundTrip(t *testing.T) {
	tab, err := NewTable(shuffledGrid(bilinearRow))
	if err != nil {
		t.Fatal(err)
	}
	rows := tab.Rows()
	if len(rows) != len(testMasses)*len(testMetals) {
		t.Fatalf("Rows: %d rows", len(rows))
	}
	k := 0
	for _, z := range testMetals {
		for _, m := range testMasses {
			want := bilinearRow(m, z)
			if rows[k] != want {
				t.Errorf("Rows()[%d] = %+v, want %+v", k, rows[k], want)
			}
			c, err := tab.Core(m, z)
			if err != nil {
				t.Fatal(err)
			}
			got := TableRow{c.InitialMass, c.Metallicity, c.FinalMass, c.HeCoreMass, c.COCoreMass, c.LifetimeMyr, c.MaxRadius}
			if !rowsClose(got, want, 1e-14) {
				t.Errorf("Core at grid point (%g, %g) = %+v, want %+v", m, z, got, want)
			}
			k++
		}
	}
	rows[0].FinalMass = -1
	if r := tab.Rows()[0]; r.FinalMass < 0 {
		t.Error("Rows returned the table's own storage")
	}
	if lo, hi := tab.MassRange(); lo != 10 || hi != 100 {
		t.Errorf("MassRange = %g, %g", lo, hi)
	}
	if lo, hi := tab.MetallicityRange(); lo != 1e-4 || hi != 1e-2 {
		t.Errorf("MetallicityRange = %g, %g", lo, hi)
	}
	if !tab.HasRadius() {
		t.Error("HasRadius = false")
	}
}

// TestTableSingleMetallicity: with one metallicity, only that Z (to a
// relative 1e-9) is valid, and interpolation is linear in log10 M (analytic).
func TestTableSingleMetallicity(t *testing.T) {
	var rows []TableRow
	for _, m := range testMasses {
		r := bilinearRow(m, zSun)
		r.MaxRadius = 0 // absent
		rows = append(rows, r)
	}
	tab, err := NewTable(rows)
	if err != nil {
		t.Fatal(err)
	}
	c, err := tab.Core(20, zSun*(1+1e-10))
	if err != nil {
		t.Fatal(err)
	}
	if want := bilinearRow(20, zSun); math.Abs(c.FinalMass-want.FinalMass) > 1e-12 || c.MaxRadius != 0 {
		t.Errorf("Core(20) = %+v, want final mass %g and no radius", c, want.FinalMass)
	}
	_, err = tab.Core(20, 0.0143)
	if err == nil || !strings.Contains(err.Error(), "metallicity 0.0143") || !strings.Contains(err.Error(), "only Z = 0.0142") {
		t.Errorf("Core at another Z: error %v", err)
	}
	if tab.HasRadius() {
		t.Error("HasRadius = true for a table without radii")
	}
}

func TestTableErrors(t *testing.T) {
	full := func() []TableRow { return shuffledGrid(bilinearRow) }
	drop := func(m, z float64) []TableRow {
		var out []TableRow
		for _, r := range full() {
			if r.InitialMass != m || r.Metallicity != z {
				out = append(out, r)
			}
		}
		return out
	}
	rows := []struct {
		name string
		rows []TableRow
		want []string
	}{
		{"empty", nil, []string{"no rows"}},
		{"ragged", drop(25, 1e-3), []string{"no row for initial mass 25 Msun at metallicity 0.001", "5 masses x 4 metallicities"}},
		{"duplicate", append(full(), bilinearRow(40, 3e-3)), []string{"two rows for initial mass 40 Msun at metallicity 0.003"}},
		{"one mass", []TableRow{bilinearRow(20, 1e-3), bilinearRow(20, 1e-2)}, []string{"at least 2 initial masses, got 1"}},
		{"non-positive", append(full()[1:], func() TableRow { r := bilinearRow(10, 1e-4); r.LifetimeMyr = 0; return r }()),
			[]string{"LifetimeMyr = 0", "finite number > 0"}},
		{"NaN", append(full()[1:], func() TableRow { r := full()[0]; r.HeCoreMass = math.NaN(); return r }()),
			[]string{"HeCoreMass = NaN"}},
		{"order", []TableRow{{10, 0.01, 8, 3, 4, 20, 0}, {20, 0.01, 12, 5, 3, 9, 0}},
			[]string{"COCoreMass = 4 exceeds HeCoreMass = 3"}},
		{"final above initial", []TableRow{{10, 0.01, 11, 3, 2, 20, 0}, {20, 0.01, 12, 5, 3, 9, 0}},
			[]string{"FinalMass = 11 exceeds InitialMass = 10"}},
		{"radius missing", []TableRow{{10, 0.01, 8, 3, 2, 20, 500}, {20, 0.01, 12, 5, 3, 9, 0}},
			[]string{"MaxRadius = 0", "must be in every row"}},
		{"radius extra", []TableRow{{10, 0.01, 8, 3, 2, 20, 0}, {20, 0.01, 12, 5, 3, 9, 700}},
			[]string{"MaxRadius = 700", "absent from every row"}},
	}
	for _, row := range rows {
		_, err := NewTable(row.rows)
		if err == nil {
			t.Errorf("%s: no error", row.name)
			continue
		}
		for _, w := range row.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q does not contain %q", row.name, err, w)
			}
		}
	}
}

func TestTableOutside(t *testing.T) {
	tab, err := NewTable(shuffledGrid(bilinearRow))
	if err != nil {
		t.Fatal(err)
	}
	for _, row := range []struct {
		m, z float64
		want string
	}{
		{9.9, 1e-3, "initial mass 9.9 Msun outside the table's range [10, 100] Msun"},
		{150, 1e-3, "initial mass 150 Msun outside the table's range [10, 100] Msun"},
		{20, 5e-5, "metallicity 5e-05 outside the table's range [0.0001, 0.01]"},
		{20, 0.02, "metallicity 0.02 outside the table's range [0.0001, 0.01]"},
		{math.NaN(), 1e-3, "initial mass NaN"},
		{20, -1, "metallicity -1"},
	} {
		_, err := tab.Core(row.m, row.z)
		if err == nil || !strings.Contains(err.Error(), row.want) {
			t.Errorf("Core(%g, %g): error %v, want %q", row.m, row.z, err, row.want)
		}
	}
	// The edges themselves, and values within a relative 1e-9 of them, are inside.
	for _, q := range [][2]float64{{10, 1e-4}, {100, 1e-2}, {10 * (1 - 1e-10), 1e-2 * (1 + 1e-10)}} {
		if _, err := tab.Core(q[0], q[1]); err != nil {
			t.Errorf("Core(%g, %g) at the edge: %v", q[0], q[1], err)
		}
	}
}

// TestDemoGrid: DemoGrid evaluates the builtin model at the grid points, and
// a Table built from it returns those values there.
func TestDemoGrid(t *testing.T) {
	b := DefaultBuiltin()
	masses := []float64{8, 12, 20, 40, 80, 150}
	metals := []float64{1e-4, 1e-3, zSun}
	rows := DemoGrid(b, masses, metals)
	if len(rows) != len(masses)*len(metals) {
		t.Fatalf("DemoGrid: %d rows", len(rows))
	}
	tab, err := NewTable(rows)
	if err != nil {
		t.Fatal(err)
	}
	for _, z := range metals {
		for _, m := range masses {
			want, _ := b.Core(m, z)
			got, err := tab.Core(m, z)
			if err != nil || math.Abs(got.FinalMass-want.FinalMass) > 1e-12*want.FinalMass ||
				math.Abs(got.COCoreMass-want.COCoreMass) > 1e-12*want.COCoreMass ||
				math.Abs(got.MaxRadius-want.MaxRadius) > 1e-12*want.MaxRadius {
				t.Errorf("(%g, %g): table %+v, builtin %+v, %v", m, z, got, want, err)
			}
		}
	}
	defer func() {
		if r := recover(); r == nil || !strings.Contains(r.(string), "initial mass -1") {
			t.Errorf("DemoGrid with a negative mass: panic %v", r)
		}
	}()
	DemoGrid(b, []float64{-1}, metals)
}
