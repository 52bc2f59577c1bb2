package rates

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// TestMetallicityMean checks the mean relation of Madau & Fragos (2017,
// ApJ 840, 39; from memory), log10(Z/Z_sun) = 0.153 - 0.074 z^1.34, with
// Z_sun = 0.0142 (Asplund et al. 2009), recomputed here.
func TestMetallicityMean(t *testing.T) {
	m := MadauFragos2017Metallicity(0.5)
	for _, z := range []float64{0, 1, 2, 6} {
		want := math.Log10(0.0142) + 0.153 - 0.074*math.Pow(z, 1.34)
		if got := m.Mean(z); !scalar.EqualWithinAbs(got, want, 1e-14) {
			t.Errorf("Mean(%v) = %v; want %v", z, got, want)
		}
	}
}

// TestMetallicityPDFNormalised integrates the PDF over log10 Z (gonum
// Gauss–Legendre over ±12 sigma, an analytic integral: 1) and checks BinProb
// against the integral of the PDF over bins, including far tails.
func TestMetallicityPDFNormalised(t *testing.T) {
	for _, sigma := range []float64{0.1, 0.35, 1} {
		m := MadauFragos2017Metallicity(sigma)
		for _, z := range []float64{0, 2, 6} {
			mu := m.Mean(z)
			pdf := func(x float64) float64 { return m.PDF(x, z) }
			norm := quad.Fixed(pdf, mu-12*sigma, mu+12*sigma, 400, quad.Legendre{}, 0)
			if !scalar.EqualWithinAbs(norm, 1, 1e-12) {
				t.Errorf("sigma %v, z %v: ∫ PDF d log10 Z = %.15g; want 1", sigma, z, norm)
			}
			if got := m.BinProb(math.Inf(-1), math.Inf(1), z); got != 1 {
				t.Errorf("BinProb(-Inf, Inf) = %v; want 1", got)
			}
			if got := m.CDF(mu, z); !scalar.EqualWithinAbs(got, 0.5, 1e-15) {
				t.Errorf("CDF(mean) = %v; want 0.5", got)
			}
			// Bins on each side of the mean and across it, out to 9 sigma.
			for _, b := range [][2]float64{{-9, -8}, {-3, -1}, {-0.5, 0.7}, {1, 3}, {8, 9}} {
				lo, hi := mu+b[0]*sigma, mu+b[1]*sigma
				want := quad.Fixed(pdf, lo, hi, 200, quad.Legendre{}, 0)
				if got := m.BinProb(lo, hi, z); !scalar.EqualWithinRel(got, want, 1e-10) {
					t.Errorf("sigma %v, z %v: BinProb over %v sigma = %.12g; ∫ PDF = %.12g", sigma, z, b, got, want)
				}
			}
			// A partition of the axis sums to 1.
			edges := []float64{math.Inf(-1), -4, -3, -2.5, -2, -1.5, -1, math.Inf(1)}
			sum := 0.0
			for i := 0; i+1 < len(edges); i++ {
				sum += m.BinProb(edges[i], edges[i+1], z)
			}
			if !scalar.EqualWithinAbs(sum, 1, 1e-14) {
				t.Errorf("sigma %v, z %v: partition sums to %v", sigma, z, sum)
			}
		}
	}
	if got := MadauFragos2017Metallicity(0.5).BinProb(-1, -2, 0); got != 0 {
		t.Errorf("BinProb of an empty bin = %v; want 0", got)
	}
}

func TestFixedMetallicity(t *testing.T) {
	f := FixedMetallicity{Z: 0.0142}
	x := math.Log10(0.0142)
	cases := []struct {
		lo, hi, want float64
	}{
		{x - 0.1, x + 0.1, 1},
		{x, x + 0.1, 1},
		{x - 0.1, x, 0}, // half-open bin [lo, hi)
		{math.Inf(-1), math.Inf(1), 1},
		{x + 0.1, x + 1, 0},
	}
	for _, c := range cases {
		if got := f.BinProb(c.lo, c.hi, 3); got != c.want {
			t.Errorf("BinProb(%v, %v) = %v; want %v", c.lo, c.hi, got, c.want)
		}
	}
	if f.Validate() != nil || (FixedMetallicity{Z: 0}).Validate() == nil || (FixedMetallicity{Z: 2}).Validate() == nil {
		t.Error("FixedMetallicity.Validate: want Z in (0, 1]")
	}
}

func TestLogNormalValidate(t *testing.T) {
	if err := MadauFragos2017Metallicity(0.5).Validate(); err != nil {
		t.Error(err)
	}
	ok := MadauFragos2017Metallicity(0.5)
	bad := []struct {
		mod  func(*LogNormalMetallicity)
		want string
	}{
		{func(l *LogNormalMetallicity) { l.ZSun = 0 }, "ZSun"},
		{func(l *LogNormalMetallicity) { l.Sigma = 0 }, "Sigma"},
		{func(l *LogNormalMetallicity) { l.Sigma = math.Inf(1) }, "Sigma"},
		{func(l *LogNormalMetallicity) { l.Offset = math.NaN() }, "Offset"},
		{func(l *LogNormalMetallicity) { l.Slope = math.Inf(-1) }, "Slope"},
		{func(l *LogNormalMetallicity) { l.Power = -1 }, "Power"},
	}
	for _, b := range bad {
		l := ok
		b.mod(&l)
		if err := l.Validate(); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("Validate(%+v) = %v; want an error naming %s", l, err, b.want)
		}
	}
}

// TestFillBinProbs checks the one-erfc-per-edge path used by the estimator
// against BinProb bin by bin.
func TestFillBinProbs(t *testing.T) {
	m := MadauFragos2017Metallicity(0.3)
	edges := []float64{math.Inf(-1), -6, -4, -3}
	for x := -2.9; x < 0; x += 0.1 {
		edges = append(edges, x)
	}
	edges = append(edges, math.Inf(1))
	dst := make([]float64, len(edges)-1)
	for _, z := range []float64{0, 1.5, 7} {
		m.fillBinProbs(edges, z, dst)
		for i, got := range dst {
			if want := m.BinProb(edges[i], edges[i+1], z); !scalar.EqualWithinAbsOrRel(got, want, 1e-300, 1e-13) {
				t.Errorf("z %v, bin [%v, %v): fillBinProbs %v, BinProb %v", z, edges[i], edges[i+1], got, want)
			}
		}
	}
}

// TestFillUniformBinProbs checks the series-and-recurrence path for
// equal-width bins against BinProb (erfc) out to 10 sigma, within twice the
// first neglected term of the series, δ^6 |He_6(u)| / 322560 relative (the
// Taylor series of the normal density integrated over a bin; analytic),
// plus 1e-10 for rounding; for means inside, below and above the bins.
func TestFillUniformBinProbs(t *testing.T) {
	const x0, n = -4.0, 125
	for _, sigma := range []float64{0.2, 0.35, 0.5, 1} {
		m := MadauFragos2017Metallicity(sigma)
		h := 2.5 / n // 0.02 dex: the estimator's log-uniform bins
		dst := make([]float64, n)
		for _, z := range []float64{0, 3, 12} {
			for _, shift := range []float64{0, -3, 3} { // move the mean relative to the bins
				mm := m
				mm.Offset += shift
				if !mm.fillUniformBinProbs(x0, h, z, dst) {
					t.Fatalf("sigma %v: fillUniformBinProbs declined bins of %v sigma", sigma, h/sigma)
				}
				mu := mm.Mean(z)
				for i, got := range dst {
					lo, hi := x0+float64(i)*h, x0+float64(i+1)*h
					want := mm.BinProb(lo, hi, z)
					u := math.Abs((lo+hi)/2-mu) / sigma
					d, u2 := h/sigma, u*u
					he6 := u2*u2*u2 - 15*u2*u2 + 45*u2 - 15
					tol := 2*math.Pow(d, 6)*math.Abs(he6)/322560 + 1e-10
					if u <= 10 && !scalar.EqualWithinRel(got, want, tol) {
						t.Errorf("sigma %v, z %v, shift %v, bin %d (%.1f sigma): %.12g; BinProb %.12g", sigma, z, shift, i, u, got, want)
					}
					if u > 10 && !(got >= 0 && got <= 2*want+1e-300) {
						t.Errorf("far tail bin %d (%.1f sigma): %g; BinProb %g", i, u, got, want)
					}
				}
			}
		}
	}
	if MadauFragos2017Metallicity(0.1).fillUniformBinProbs(-4, 0.02, 0, make([]float64, 3)) {
		t.Error("bins of 0.2 sigma: want the series path declined")
	}
}
