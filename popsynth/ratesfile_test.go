package popsynth

import (
	"math"
	"path/filepath"
	"testing"

	"github.com/corefall/corefall/popsynth/rates"
)

// TestCatalogueRatesNormalisation is the end-to-end check of the rate chain: a Salpeter (1955)
// population over 0.1-100 Msun, sampled 8-100 Msun at one fixed metallicity, with the collapse
// threshold lowered so that every sampled star collapses. Its z = 0 core-collapse (NS + BH)
// formation rate must equal psi(0) times the number of 8-100 Msun stars per unit mass formed,
// the closed-form Salpeter integral (0.00742 /Msun in REFERENCES.md, recomputed here).
// The stars collapse 3-45 Myr after birth, when the star-formation rate was slightly higher than
// today's: the expected rate lies between psi(0) n and psi(z(45 Myr)) n, and the test allows that
// band plus four Monte Carlo standard errors.
func TestCatalogueRatesNormalisation(t *testing.T) {
	path := filepath.Join(t.TempDir(), "s.parquet")
	runTo(t, load(t, "systems=300000", "imf.law=salpeter", "imf.min=0.1", "imf.max=100", "imf.sample_max=100",
		"explosion.collapse_min_co=0.5", "metallicity.fixed=0.0142"), path)
	sfr := rates.MadauDickinson2014()
	cosmo := rates.Planck18()
	res, err := CatalogueRates(path, RatesOptions{Cosmology: cosmo, SFR: sfr, MetallicitySigma: 0.5, ZMax: 1, DZ: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	num := func(a, b float64) float64 { return (math.Pow(a, -1.35) - math.Pow(b, -1.35)) / 1.35 }
	mass := func(a, b float64) float64 { return (math.Pow(a, -0.35) - math.Pow(b, -0.35)) / 0.35 }
	perMsun := num(8, 100) / mass(0.1, 100)
	if math.Abs(perMsun-0.00742) > 0.000005 {
		t.Fatalf("Salpeter 8-100 Msun stars per Msun %v, REFERENCES.md gives 0.00742", perMsun)
	}
	const gpc3 = 1e9 // Mpc^3 per Gpc^3
	lo := sfr.Density(0) * perMsun * gpc3
	zOld, err := cosmo.RedshiftAtLookback(0.045) // Gyr
	if err != nil {
		t.Fatal(err)
	}
	hi := sfr.Density(zOld) * perMsun * gpc3
	got := res.Rates.NSFormation[0] + res.Rates.BHFormation[0]
	sigma := math.Hypot(res.Uncertainty.NSFormation[0], res.Uncertainty.BHFormation[0])
	if got < lo-4*sigma || got > hi+4*sigma {
		t.Errorf("core-collapse rate at z = 0: %.5g Gpc^-3 yr^-1, want %.5g-%.5g (+- %.3g)", got, lo, hi, 4*sigma)
	}
	// The Poisson error of a fixed-Z catalogue with short delays is psi sqrt(sum w^2) = rate/sqrt(N).
	if rel := sigma / got; math.Abs(rel-1/math.Sqrt(300000)) > 0.05/math.Sqrt(300000) {
		t.Errorf("relative uncertainty %v, want 1/sqrt(N) = %v", rel, 1/math.Sqrt(300000))
	}
	if res.Z[0] != 0 || len(res.Z) != 3 {
		t.Errorf("grid %v, want [0 0.5 1]", res.Z)
	}
}

// TestCatalogueRatesList: a catalogue sampled from a list of two nearly equal metallicities
// (0.0141 and 0.0142, whose stars end alike) stands, after the reweighting, for all star formation
// (the two bins span every log Z and their shares of star formation add up to one), as a fixed-Z
// catalogue at 0.0142 does: the two give the same rates within their Monte Carlo errors. Each listed
// value carries the mass of the rows drawn at it: weighting every row by the whole catalogue's mass
// instead would halve the rates, which this test would catch.
func TestCatalogueRatesList(t *testing.T) {
	dir := t.TempDir()
	fixed, list := filepath.Join(dir, "f.parquet"), filepath.Join(dir, "l.parquet")
	runTo(t, load(t, "systems=100000", "seed=5", "binary_fraction=0.3"), fixed)
	runTo(t, load(t, "systems=100000", "seed=6", "binary_fraction=0.3", "metallicity.sampling=list", "metallicity.values=[0.0141, 0.0142]"), list)
	opt := RatesOptions{Cosmology: rates.Planck18(), SFR: rates.MadauFragos2017(), MetallicitySigma: 0.5, ZMax: 2, DZ: 1}
	a, err := CatalogueRates(fixed, opt)
	if err != nil {
		t.Fatal(err)
	}
	b, err := CatalogueRates(list, opt)
	if err != nil {
		t.Fatal(err)
	}
	for i := range a.Z {
		for _, k := range []rates.EventKind{rates.NSFormation, rates.BHFormation} {
			x, y := a.Rates.Of(k)[i], b.Rates.Of(k)[i]
			sig := math.Hypot(a.Uncertainty.Of(k)[i], b.Uncertainty.Of(k)[i])
			if x == 0 || math.Abs(x-y) > 4*sig {
				t.Errorf("z = %v, %v: fixed %v, two-value list %v (4 sigma = %v)", a.Z[i], k, x, y, 4*sig)
			}
		}
	}
}
