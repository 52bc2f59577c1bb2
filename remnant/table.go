package remnant

import (
	"fmt"
	"math"
	"slices"
	"sort"
)

// TableRow is one stellar model of a Table: the end state of a star of
// given initial mass and metallicity. Masses are in Msun, the lifetime in
// Myr, the radius in Rsun.
type TableRow struct {
	InitialMass float64 // Msun
	Metallicity float64 // metal mass fraction Z
	FinalMass   float64 // Msun
	HeCoreMass  float64 // Msun
	COCoreMass  float64 // Msun
	LifetimeMyr float64 // Myr
	MaxRadius   float64 // largest radius in life, Rsun; 0 = absent (then in every row)
}

// gridTol is the relative tolerance within which two initial masses or two
// metallicities are the same grid value, and within which a query may lie
// outside the grid's range (or off a single metallicity).
const gridTol = 1e-9

// Table is a CoreModel that interpolates a user's grid of stellar models. The
// rows form a rectangular grid in initial mass and metallicity, and Core
// interpolates bilinearly in (log10 M, log10 Z): every quantity is linear in
// log10 M and in log10 Z within a grid cell. With a single metallicity only
// that metallicity (to a relative 1e-9) can be queried and the interpolation
// is linear in log10 M. Queries outside the grid are errors, never
// extrapolated.
//
// Linear interpolation keeps what holds at the grid points between them:
// CO <= He <= final <= initial mass, and monotonicity along either axis.
//
// Build a Table with NewTable; a Table is not modified afterwards and may be
// used from several goroutines.
type Table struct {
	masses, metals []float64  // grid axes, ascending
	logM, logZ     []float64  // their log10
	rows           []TableRow // grid order: rows[j*len(masses)+i] has masses[i], metals[j]
	hasRadius      bool
}

// NewTable checks rows and builds a Table from them. The rows may come in any
// order. It returns an error if there are no rows; if a value is not a finite
// number > 0 (MaxRadius may be 0, meaning absent, but then in every row); if
// a row has COCoreMass > HeCoreMass, HeCoreMass > FinalMass or FinalMass >
// InitialMass (beyond a relative 1e-6); if two rows share an (initial mass,
// metallicity) point; if there are fewer than 2 initial masses; or if the
// rows do not fill the rectangular grid of their masses and metallicities
// (the error names a missing point). Initial masses (and metallicities)
// that agree to a relative 1e-9 are the same grid value.
func NewTable(rows []TableRow) (*Table, error) {
	if len(rows) == 0 {
		return nil, fmt.Errorf("remnant: table has no rows")
	}
	hasRadius := rows[0].MaxRadius != 0
	for i, r := range rows {
		if err := checkRow(i, r, hasRadius); err != nil {
			return nil, err
		}
	}
	masses := gridAxis(rows, func(r TableRow) float64 { return r.InitialMass })
	metals := gridAxis(rows, func(r TableRow) float64 { return r.Metallicity })
	if len(masses) < 2 {
		return nil, fmt.Errorf("remnant: table needs at least 2 initial masses, got %d (%g Msun)", len(masses), masses[0])
	}
	nm := len(masses)
	grid := make([]TableRow, nm*len(metals))
	filled := make([]bool, len(grid))
	for _, r := range rows {
		i, j := axisIndex(masses, r.InitialMass), axisIndex(metals, r.Metallicity)
		k := j*nm + i
		if filled[k] {
			return nil, fmt.Errorf("remnant: table has two rows for initial mass %g Msun at metallicity %g", masses[i], metals[j])
		}
		filled[k] = true
		r.InitialMass, r.Metallicity = masses[i], metals[j]
		grid[k] = r
	}
	for k, ok := range filled {
		if !ok {
			return nil, fmt.Errorf("remnant: table has no row for initial mass %g Msun at metallicity %g (rows must fill a grid of %d masses x %d metallicities, got %d rows)",
				masses[k%nm], metals[k/nm], nm, len(metals), len(rows))
		}
	}
	t := &Table{masses: masses, metals: metals, rows: grid, hasRadius: hasRadius}
	t.logM = logs(masses)
	t.logZ = logs(metals)
	return t, nil
}

// checkRow returns an error if row i of a table is not a valid stellar model.
func checkRow(i int, r TableRow, hasRadius bool) error {
	fields := []struct {
		name string
		v    float64
	}{
		{"InitialMass", r.InitialMass}, {"Metallicity", r.Metallicity}, {"FinalMass", r.FinalMass},
		{"HeCoreMass", r.HeCoreMass}, {"COCoreMass", r.COCoreMass}, {"LifetimeMyr", r.LifetimeMyr},
	}
	for _, f := range fields {
		if !(f.v > 0) || math.IsInf(f.v, 1) {
			return fmt.Errorf("remnant: table row %d (M = %g Msun, Z = %g): %s = %g, want a finite number > 0", i, r.InitialMass, r.Metallicity, f.name, f.v)
		}
	}
	if r.Metallicity >= 1 {
		return fmt.Errorf("remnant: table row %d (M = %g Msun): Metallicity = %g, want a metal mass fraction 0 < Z < 1", i, r.InitialMass, r.Metallicity)
	}
	if hasRadius && (!(r.MaxRadius > 0) || math.IsInf(r.MaxRadius, 1)) {
		return fmt.Errorf("remnant: table row %d (M = %g Msun, Z = %g): MaxRadius = %g, want a finite number > 0 (MaxRadius is given in the first row, so it must be in every row)", i, r.InitialMass, r.Metallicity, r.MaxRadius)
	}
	if !hasRadius && r.MaxRadius != 0 {
		return fmt.Errorf("remnant: table row %d (M = %g Msun, Z = %g): MaxRadius = %g, want 0 (MaxRadius is absent from the first row, so it must be absent from every row)", i, r.InitialMass, r.Metallicity, r.MaxRadius)
	}
	const tol = 1 + 1e-6
	order := []struct {
		inner, outer         string
		innerMass, outerMass float64
	}{
		{"COCoreMass", "HeCoreMass", r.COCoreMass, r.HeCoreMass},
		{"HeCoreMass", "FinalMass", r.HeCoreMass, r.FinalMass},
		{"FinalMass", "InitialMass", r.FinalMass, r.InitialMass},
	}
	for _, o := range order {
		if o.innerMass > o.outerMass*tol {
			return fmt.Errorf("remnant: table row %d (M = %g Msun, Z = %g): %s = %g exceeds %s = %g, want CO core <= He core <= final mass <= initial mass",
				i, r.InitialMass, r.Metallicity, o.inner, o.innerMass, o.outer, o.outerMass)
		}
	}
	return nil
}

// gridAxis returns the distinct values of key over rows, ascending, merging
// values that agree to a relative gridTol.
func gridAxis(rows []TableRow, key func(TableRow) float64) []float64 {
	v := make([]float64, len(rows))
	for i, r := range rows {
		v[i] = key(r)
	}
	slices.Sort(v)
	axis := v[:1]
	for _, x := range v[1:] {
		if x > axis[len(axis)-1]*(1+gridTol) {
			axis = append(axis, x)
		}
	}
	return slices.Clip(axis)
}

// axisIndex returns the index of the axis value that agrees with x to a
// relative gridTol; x must be one of the values the axis was built from.
func axisIndex(axis []float64, x float64) int {
	i := sort.SearchFloat64s(axis, x)
	if i == len(axis) || (i > 0 && x-axis[i-1] <= axis[i-1]*gridTol) {
		return i - 1
	}
	return i
}

func logs(v []float64) []float64 {
	l := make([]float64, len(v))
	for i, x := range v {
		l[i] = math.Log10(x)
	}
	return l
}

// cell returns the index i of the grid interval [logs[i], logs[i+1]] holding
// x and the fraction t of the way across it; x must lie in the axis range.
func cell(logs []float64, x float64) (i int, t float64) {
	i = sort.SearchFloat64s(logs, x) - 1
	i = max(0, min(i, len(logs)-2))
	t = (x - logs[i]) / (logs[i+1] - logs[i])
	return i, clamp01(t)
}

// Core returns the end state of a star of initial mass m (Msun) and
// metallicity z, interpolated bilinearly in (log10 M, log10 Z). It returns an
// error if m or z is not a finite positive number, or lies outside the
// grid (beyond a relative 1e-9); the error gives the grid's range. MaxRadius
// is 0 if the table has no radii. It does not allocate.
func (t *Table) Core(m, z float64) (Core, error) {
	if err := checkStar(m, z); err != nil {
		return Core{}, err
	}
	mlo, mhi := t.masses[0], t.masses[len(t.masses)-1]
	if m < mlo*(1-gridTol) || m > mhi*(1+gridTol) {
		return Core{}, fmt.Errorf("remnant: initial mass %g Msun outside the table's range [%g, %g] Msun", m, mlo, mhi)
	}
	zlo, zhi := t.metals[0], t.metals[len(t.metals)-1]
	if len(t.metals) == 1 {
		if math.Abs(z-zlo) > zlo*gridTol {
			return Core{}, fmt.Errorf("remnant: metallicity %g not in the table, which holds only Z = %g", z, zlo)
		}
	} else if z < zlo*(1-gridTol) || z > zhi*(1+gridTol) {
		return Core{}, fmt.Errorf("remnant: metallicity %g outside the table's range [%g, %g]", z, zlo, zhi)
	}

	nm := len(t.masses)
	i, tm := cell(t.logM, math.Log10(m))
	j, tz := 0, 0.0
	if len(t.metals) > 1 {
		j, tz = cell(t.logZ, math.Log10(z))
	}
	r00 := &t.rows[j*nm+i]
	r10 := &t.rows[j*nm+i+1]
	r01, r11 := r00, r10
	if len(t.metals) > 1 {
		r01 = &t.rows[(j+1)*nm+i]
		r11 = &t.rows[(j+1)*nm+i+1]
	}
	w00, w10, w01, w11 := (1-tm)*(1-tz), tm*(1-tz), (1-tm)*tz, tm*tz
	lerp := func(f func(*TableRow) float64) float64 {
		return w00*f(r00) + w10*f(r10) + w01*f(r01) + w11*f(r11)
	}
	return Core{
		InitialMass: m,
		Metallicity: z,
		LifetimeMyr: lerp(func(r *TableRow) float64 { return r.LifetimeMyr }),
		FinalMass:   lerp(func(r *TableRow) float64 { return r.FinalMass }),
		HeCoreMass:  lerp(func(r *TableRow) float64 { return r.HeCoreMass }),
		COCoreMass:  lerp(func(r *TableRow) float64 { return r.COCoreMass }),
		MaxRadius:   lerp(func(r *TableRow) float64 { return r.MaxRadius }),
	}, nil
}

// Rows returns a copy of the table's rows in grid order: by metallicity,
// then by initial mass, both ascending.
func (t *Table) Rows() []TableRow {
	return slices.Clone(t.rows)
}

// MassRange returns the smallest and largest initial mass of the grid, Msun.
func (t *Table) MassRange() (lo, hi float64) {
	return t.masses[0], t.masses[len(t.masses)-1]
}

// MetallicityRange returns the smallest and largest metallicity of the grid
// (equal if the table has a single metallicity).
func (t *Table) MetallicityRange() (lo, hi float64) {
	return t.metals[0], t.metals[len(t.metals)-1]
}

// HasRadius reports whether the table gives the largest radius (MaxRadius).
func (t *Table) HasRadius() bool { return t.hasRadius }

// DemoGrid evaluates the builtin core model b at every pair of masses (Msun)
// and metallicities and returns the rows in grid order (by metallicity, then
// by mass, in the order given). It is meant for shipping a demonstration
// grid made from fixed, known-good values, and so panics, like the Must
// functions of the standard library, if b is invalid or a mass or
// metallicity is rejected by b.Core.
func DemoGrid(b Builtin, masses, metallicities []float64) []TableRow {
	if err := b.Validate(); err != nil {
		panic("remnant: DemoGrid: " + err.Error())
	}
	rows := make([]TableRow, 0, len(masses)*len(metallicities))
	for _, z := range metallicities {
		for _, m := range masses {
			c, err := b.Core(m, z)
			if err != nil {
				panic("remnant: DemoGrid: " + err.Error())
			}
			rows = append(rows, TableRow{
				InitialMass: c.InitialMass, Metallicity: c.Metallicity, FinalMass: c.FinalMass,
				HeCoreMass: c.HeCoreMass, COCoreMass: c.COCoreMass, LifetimeMyr: c.LifetimeMyr,
				MaxRadius: c.MaxRadius,
			})
		}
	}
	return rows
}
