package rates

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// TestParametricSFRValues recomputes the published formulas at z = 0, 1, 2, 6.
func TestParametricSFRValues(t *testing.T) {
	// Madau & Dickinson (2014, ARA&A 52, 415; formula from memory):
	// psi = 0.015 (1+z)^2.7 / (1 + ((1+z)/2.9)^5.6).
	md := func(z float64) float64 { return 0.015 * math.Pow(1+z, 2.7) / (1 + math.Pow((1+z)/2.9, 5.6)) }
	// Madau & Fragos (2017, ApJ 840, 39; from memory):
	// psi = 0.01 (1+z)^2.6 / (1 + ((1+z)/3.2)^6.2).
	mf := func(z float64) float64 { return 0.01 * math.Pow(1+z, 2.6) / (1 + math.Pow((1+z)/3.2, 6.2)) }
	for _, z := range []float64{0, 1, 2, 6} {
		if got, want := MadauDickinson2014().Density(z), md(z); !scalar.EqualWithinRel(got, want, 1e-14) {
			t.Errorf("MadauDickinson2014 psi(%v) = %v; formula gives %v", z, got, want)
		}
		if got, want := MadauFragos2017().Density(z), mf(z); !scalar.EqualWithinRel(got, want, 1e-14) {
			t.Errorf("MadauFragos2017 psi(%v) = %v; formula gives %v", z, got, want)
		}
	}
	// At z = 0 the denominators are 1 + 2.9^-5.6 and 1 + 3.2^-6.2.
	if got := MadauDickinson2014().Density(0); !scalar.EqualWithinRel(got, 0.015/(1+math.Pow(2.9, -5.6)), 1e-14) {
		t.Errorf("MadauDickinson2014 psi(0) = %v", got)
	}
	if !math.IsNaN(MadauDickinson2014().Density(-0.5)) {
		t.Error("psi(-0.5): want NaN")
	}
	if MadauDickinson2014().Name() != "Madau & Dickinson (2014)" || !strings.Contains(ParametricSFR{A: 1, B: 2, C: 3, D: 4}.Name(), "(1+z)^2") {
		t.Error("Name: unexpected description")
	}
}

// TestSFRPeak finds the maximum of Madau & Dickinson's history numerically
// and checks it against the analytic stationary point of the formula,
// 1+z = C (B/(D-B))^(1/D), and against "peaked at z ≈ 1.9" (Madau &
// Dickinson 2014, abstract; verified).
func TestSFRPeak(t *testing.T) {
	sfr := MadauDickinson2014()
	// Golden-section search for the maximum on [0, 6].
	lo, hi := 0.0, 6.0
	g := (math.Sqrt(5) - 1) / 2
	for hi-lo > 1e-9 {
		a, b := hi-g*(hi-lo), lo+g*(hi-lo)
		if sfr.Density(a) > sfr.Density(b) {
			hi = b
		} else {
			lo = a
		}
	}
	peak := (lo + hi) / 2
	analytic := sfr.C*math.Pow(sfr.B/(sfr.D-sfr.B), 1/sfr.D) - 1
	if math.Abs(peak-analytic) > 1e-6 {
		t.Errorf("numerical peak z = %v; analytic stationary point %v", peak, analytic)
	}
	if math.Abs(peak-1.9) > 0.1 {
		t.Errorf("Madau & Dickinson (2014) peak at z = %v; their abstract says ≈ 1.9", peak)
	}
}

func TestParametricSFRValidate(t *testing.T) {
	for _, p := range []ParametricSFR{MadauDickinson2014(), MadauFragos2017()} {
		if err := p.Validate(); err != nil {
			t.Errorf("%s: %v", p.Name(), err)
		}
	}
	bad := []struct {
		p    ParametricSFR
		want string
	}{
		{ParametricSFR{A: -1, B: 1, C: 1, D: 1}, "normalisation A"},
		{ParametricSFR{A: 1, B: math.NaN(), C: 1, D: 1}, "slope B"},
		{ParametricSFR{A: 1, B: 1, C: 0, D: 1}, "turnover C"},
		{ParametricSFR{A: 1, B: 1, C: 1, D: math.Inf(1)}, "slope D"},
	}
	for _, b := range bad {
		if err := b.p.Validate(); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("Validate(%+v) = %v; want an error naming %s", b.p, err, b.want)
		}
	}
}

// TestTableSFR checks linear interpolation (exact for a linear function
// between nodes: common practice), the range error, and validation.
func TestTableSFR(t *testing.T) {
	tab, err := NewTableSFR([]float64{0, 1, 3}, []float64{0.01, 0.05, 0.03}, "test")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct{ z, want float64 }{
		{0, 0.01}, {0.25, 0.02}, {1, 0.05}, {2, 0.04}, {2.5, 0.035}, {3, 0.03},
	}
	for _, c := range cases {
		got, err := tab.At(c.z)
		if err != nil || !scalar.EqualWithinAbs(got, c.want, 1e-15) {
			t.Errorf("At(%v) = %v, %v; want %v", c.z, got, err, c.want)
		}
		if d := tab.Density(c.z); !scalar.EqualWithinAbs(d, c.want, 1e-15) {
			t.Errorf("Density(%v) = %v; want %v", c.z, d, c.want)
		}
	}
	for _, z := range []float64{-0.1, 3.0001, math.NaN()} {
		if _, err := tab.At(z); err == nil || !strings.Contains(err.Error(), "outside its range [0, 3]") {
			t.Errorf("At(%v): error %v; want an out-of-range error", z, err)
		}
		if !math.IsNaN(tab.Density(z)) {
			t.Errorf("Density(%v) = %v; want NaN outside the table", z, tab.Density(z))
		}
	}
	// The table owns copies of its slices.
	zs := []float64{0, 1}
	tab2, _ := NewTableSFR(zs, []float64{1, 2}, "")
	zs[1] = 5
	if tab2.Z[1] != 1 || tab2.Name() != "table" {
		t.Error("NewTableSFR must copy its inputs; Name of an unlabelled table is \"table\"")
	}

	bad := []struct {
		z, psi []float64
		want   string
	}{
		{[]float64{0, 1}, []float64{1}, "equal lengths"},
		{[]float64{0}, []float64{1}, "at least 2"},
		{[]float64{0, 0}, []float64{1, 1}, "strictly increasing"},
		{[]float64{1, 0.5}, []float64{1, 1}, "strictly increasing"},
		{[]float64{-1, 0}, []float64{1, 1}, ">= 0"},
		{[]float64{0, math.Inf(1)}, []float64{1, 1}, "finite"},
		{[]float64{0, 1}, []float64{1, -0.1}, "rate -0.1"},
		{[]float64{0, 1}, []float64{math.NaN(), 1}, "rate NaN"},
	}
	for _, b := range bad {
		if _, err := NewTableSFR(b.z, b.psi, "bad"); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("NewTableSFR(%v, %v) = %v; want an error containing %q", b.z, b.psi, err, b.want)
		}
	}
}

// TestTableMatchesFormula: a finely tabulated Madau & Dickinson history
// interpolates the formula to the linear-interpolation error h^2 max|psi”|/8
// (common practice), here below 1e-6 relative for h = 0.001.
func TestTableMatchesFormula(t *testing.T) {
	md := MadauDickinson2014()
	var zs, ps []float64
	for i := 0; i <= 10000; i++ {
		z := float64(i) * 0.001
		zs = append(zs, z)
		ps = append(ps, md.Density(z))
	}
	tab, err := NewTableSFR(zs, ps, "MD14 table")
	if err != nil {
		t.Fatal(err)
	}
	// The integral over 0 <= z <= 10 agrees too (Gauss–Legendre, gonum).
	f := func(z float64) float64 { return tab.Density(z) - md.Density(z) }
	if d := quad.Fixed(f, 0, 10, 2000, quad.Legendre{}, 0); math.Abs(d) > 1e-7 {
		t.Errorf("∫(table - formula) dz = %v", d)
	}
	for _, z := range []float64{0.0005, 1.2345, 5.5555, 9.9995} {
		if got, want := tab.Density(z), md.Density(z); !scalar.EqualWithinRel(got, want, 1e-6) {
			t.Errorf("table psi(%v) = %v; formula %v", z, got, want)
		}
	}
}

func TestParseSFRTable(t *testing.T) {
	in := "# star formation\n\nredshift,sfr\n0, 0.01\n1,0.05\n 3 , 0.03 \n"
	tab, err := ParseSFRTable(strings.NewReader(in), "file")
	if err != nil {
		t.Fatal(err)
	}
	if len(tab.Z) != 3 || tab.Z[2] != 3 || tab.Psi[1] != 0.05 || tab.Name() != "file" {
		t.Errorf("parsed %+v", tab)
	}
	bad := []struct{ in, want string }{
		{"", "empty"},
		{"z,psi\n0,1\n1,1\n", "header"},
		{"redshift,sfr\n0,1,2\n", "line 2: 3 fields"},
		{"redshift,sfr\nx,1\n1,1\n", "redshift \"x\""},
		{"redshift,sfr\n0,y\n1,1\n", "sfr \"y\""},
		{"redshift,sfr\n0,1\n", "at least 2"},
		{"redshift,sfr\n1,1\n0,1\n", "strictly increasing"},
	}
	for _, b := range bad {
		if _, err := ParseSFRTable(strings.NewReader(b.in), "bad"); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("ParseSFRTable(%q) = %v; want an error containing %q", b.in, err, b.want)
		}
	}
}
