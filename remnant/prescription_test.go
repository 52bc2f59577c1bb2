package remnant

import (
	"math"
	"strings"
	"testing"
)

// TestWhiteDwarf checks the white-dwarf branch: Kalirai et al. (2008, ApJ
// 676, 594) give M_init = 1.16 -> M_WD = 0.53 Msun (their abstract,
// verified); the linear relation must reproduce it within 0.01. The caps at
// the Chandrasekhar mass (1.44, common practice) and at the final mass, and
// the CO-core fallback for an unknown initial mass, are the documented rules.
func TestWhiteDwarf(t *testing.T) {
	p := DefaultPrescription()
	rows := []struct {
		name string
		c    Core
		want float64
		tol  float64
	}{
		// Kalirai et al. (2008), verified point.
		{"Kalirai 1.16", Core{InitialMass: 1.16, FinalMass: 1.1, COCoreMass: 0.1}, 0.53, 0.01},
		// Documented caps: 0.109*12 + 0.394 = 1.702 > 1.44.
		{"Chandrasekhar cap", Core{InitialMass: 12, FinalMass: 9, COCoreMass: 1.3}, 1.44, 0},
		{"final-mass cap", Core{InitialMass: 3, FinalMass: 0.6, COCoreMass: 0.5}, 0.6, 0},
		// Unknown initial mass: the CO core, capped.
		{"unknown initial mass", Core{FinalMass: 5, COCoreMass: 0.9}, 0.9, 0},
		{"unknown initial mass, capped", Core{FinalMass: 5, COCoreMass: 1.37}, 1.37, 0},
	}
	for _, row := range rows {
		r := p.Decide(row.c)
		if r.Type != WD || r.Fate != WDFate || math.Abs(r.Mass-row.want) > row.tol+1e-12 || r.BaryonicMass != r.Mass {
			t.Errorf("%s: %+v, want WD of %g +- %g", row.name, r, row.want, row.tol)
		}
	}
	p.ChandrasekharMass = 1.2
	if r := p.Decide(Core{FinalMass: 5, COCoreMass: 1.3}); r.Mass != 1.2 {
		t.Errorf("unknown initial mass with Chandrasekhar mass 1.2: %g, want 1.2", r.Mass)
	}
}

// TestMaxNSMass checks the NS/BH split on the delayed worked value of
// REFERENCES.md (M_CO 4, M_fin 15: baryonic 2.8963, NS mass 2.4472 from
// Fryer et al. 2012 formulas, computed).
func TestMaxNSMass(t *testing.T) {
	p := DefaultPrescription()
	p.Engine = Delayed
	c := Core{COCoreMass: 4, FinalMass: 15}
	if r := p.Decide(c); r.Type != NS {
		t.Errorf("max NS mass 2.5: %+v, want NS", r)
	}
	p.MaxNSMass = 2.4
	r := p.Decide(c)
	if r.Type != BH || math.Abs(r.Mass-0.9*r.BaryonicMass) > 1e-12 || math.Abs(r.BaryonicMass-2.8963) > 1e-4 {
		t.Errorf("max NS mass 2.4: %+v, want BH of 0.9 x 2.8963", r)
	}
}

// TestPairInstabilityBranches checks the pair-instability ranges of Farmer
// et al. (2019, ApJ 887, 53; thresholds from memory) on chosen cores: the fit
// below the gap (recomputed here), no remnant in it, direct collapse above.
func TestPairInstabilityBranches(t *testing.T) {
	p := DefaultPrescription()
	farmer := func(mco, z float64) float64 { // Farmer et al. (2019) fit, written out
		return -0.096*math.Pow(mco, 2) + 8.564*mco - 2.07*math.Log10(z) - 152.97
	}
	// Pulsations: CO 50 at Z = 0.001, final mass 60.
	r := p.Decide(Core{COCoreMass: 50, HeCoreMass: 55, FinalMass: 60, Metallicity: 0.001})
	if r.Type != BH || r.Fate != PPISN || math.Abs(r.Mass-farmer(50, 0.001)) > 1e-12 || r.BaryonicMass != r.Mass || r.FallbackFraction != 1 {
		t.Errorf("CO 50: %+v, want ppisn BH of %g", r, farmer(50, 0.001))
	}
	// The fit is capped at the final mass: CO 40 at Z = 1e-5 gives 46.3 > 41.
	if r := p.Decide(Core{COCoreMass: 40, HeCoreMass: 41, FinalMass: 41, Metallicity: 1e-5}); r.Mass != 41 || r.Fate != PPISN {
		t.Errorf("CO 40, final 41: %+v, want ppisn BH capped at 41 (fit %g)", r, farmer(40, 1e-5))
	}
	// Unknown metallicity: the fit's limit as Z falls, capped at the final mass.
	if r := p.Decide(Core{COCoreMass: 50, HeCoreMass: 55, FinalMass: 60}); r.Mass != 60 || r.Fate != PPISN {
		t.Errorf("CO 50, Z unknown: %+v, want ppisn BH of the final mass 60", r)
	}
	// Floored at MaxNSMass when thresholds move beyond the fit's range:
	// the fit at CO 75 is negative.
	q := p
	q.PISNMinCO = 80
	if f := farmer(75, 0.001); f >= 0 {
		t.Fatalf("fit at CO 75 = %g, expected negative", f)
	}
	if r := q.Decide(Core{COCoreMass: 75, HeCoreMass: 78, FinalMass: 80, Metallicity: 0.001}); r.Type != BH || r.Mass != q.MaxNSMass {
		t.Errorf("CO 75 with PISNMinCO 80: %+v, want BH floored at %g", r, q.MaxNSMass)
	}
	// The gap: no remnant (Heger & Woosley 2002, verified: helium cores of
	// 64-133 Msun leave nothing).
	for _, mco := range []float64{60, 100, 129.9} {
		if r := p.Decide(Core{COCoreMass: mco, HeCoreMass: mco, FinalMass: mco + 5, Metallicity: 1e-4}); r != (Remnant{Type: None, Fate: PISN}) {
			t.Errorf("CO %g: %+v, want none/pisn with zero masses", mco, r)
		}
	}
	// Above the gap: direct collapse of the whole star (Heger & Woosley 2002).
	r = p.Decide(Core{COCoreMass: 140, HeCoreMass: 145, FinalMass: 150, Metallicity: 1e-4})
	if r.Type != BH || r.Fate != Failed || math.Abs(r.Mass-0.9*150) > 1e-12 || r.BaryonicMass != 150 || r.FallbackFraction != 1 {
		t.Errorf("CO 140: %+v, want failed BH of 135", r)
	}
	// Turned off: CO 100 collapses directly through the engine.
	p.PairInstability = false
	if r := p.Decide(Core{COCoreMass: 100, HeCoreMass: 100, FinalMass: 105, Metallicity: 1e-4}); r.Type != BH || r.Fate != Failed || math.Abs(r.Mass-0.9*105) > 1e-12 {
		t.Errorf("CO 100 without pair instability: %+v, want failed BH of 94.5", r)
	}
}

func TestPrescriptionValidate(t *testing.T) {
	if err := DefaultPrescription().Validate(); err != nil {
		t.Fatalf("default prescription: %v", err)
	}
	rows := []struct {
		name   string
		mutate func(*Prescription)
		want   []string // substrings of the error
	}{
		{"engine", func(p *Prescription) { p.Engine = 7 }, []string{"Engine", "rapid", "delayed"}},
		{"collapse", func(p *Prescription) { p.CollapseMinCO = 0 }, []string{"CollapseMinCO = 0", "0 < x"}},
		{"direct", func(p *Prescription) { p.DirectCollapseCO = math.NaN() }, []string{"DirectCollapseCO = NaN"}},
		{"max NS", func(p *Prescription) { p.MaxNSMass = 4 }, []string{"MaxNSMass = 4", "x <= 3.2"}},
		{"WD slope", func(p *Prescription) { p.WDSlope = -0.1 }, []string{"WDSlope = -0.1", "0 <= x"}},
		{"Chandrasekhar", func(p *Prescription) { p.ChandrasekharMass = 0 }, []string{"ChandrasekharMass = 0"}},
		{"PI order", func(p *Prescription) { p.PISNMinCO = 30 }, []string{"PulsationMinCO = 38", "PISNMinCO = 30", "PulsationMinCO <= PISNMinCO <= PISNMaxCO"}},
		{"PI positive", func(p *Prescription) { p.PISNMaxCO = math.Inf(1) }, []string{"PISNMaxCO = +Inf"}},
	}
	for _, row := range rows {
		p := DefaultPrescription()
		row.mutate(&p)
		err := p.Validate()
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
	// Pair-instability thresholds are not checked when it is off.
	p := DefaultPrescription()
	p.PairInstability = false
	p.PISNMinCO = 0
	if err := p.Validate(); err != nil {
		t.Errorf("pair instability off: %v", err)
	}
}
