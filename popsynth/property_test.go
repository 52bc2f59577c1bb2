package popsynth

import (
	"errors"
	"io"
	"math"
	"path/filepath"
	"testing"

	"github.com/corefall/corefall/popsynth/catalog"
)

// TestCatalogueProperties runs the engine over the widest input space it accepts (masses 0.5-300
// Msun, Z 1e-4 to 0.03, binaries with every orbit law, both engines) and checks every row for what
// must hold whatever the physics: no NaN or Inf anywhere, remnant mass at most the final mass,
// final mass at most the initial mass, CO core <= He core <= final mass (common practice: the
// cores lie inside the star), and bound final orbits with a > 0 and 0 <= e < 1.
func TestCatalogueProperties(t *testing.T) {
	for _, set := range [][]string{
		{"explosion.engine=rapid", "binary.orbit=sana2012", "binary.eccentricity=thermal"},
		{"explosion.engine=delayed", "binary.orbit=opik", "binary.eccentricity=sana2012", "kicks.bh_mode=full"},
	} {
		base := []string{"systems=60000", "imf.max=300", "imf.sample_min=0.5", "imf.sample_max=300",
			"metallicity.sampling=log-uniform", "metallicity.min=0.0001", "metallicity.max=0.03", "binary_fraction=0.8"}
		path := filepath.Join(t.TempDir(), "p.arrow")
		runTo(t, load(t, append(base, append(set, "output.format=arrow")...)...), path)
		r, err := catalog.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		s := r.Schema()
		idx := func(n string) int { return s.Index(n) }
		outcome := idx("outcome")
		bound := uint8(catalog.OutcomeBound)
		for {
			b, err := r.Next()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
			for c, cd := range b.Cols {
				if cd.F32 == nil {
					continue
				}
				for i, x := range cd.F32[:b.Len] {
					if math.IsNaN(float64(x)) || math.IsInf(float64(x), 0) {
						t.Fatalf("%v: column %s row %d is %v", set, s.Columns()[c].Name, i, x)
					}
				}
			}
			for _, pre := range []string{"", "companion_"} {
				m0, mf, mhe, mco, mr := idx(pre+"initial_mass"), idx(pre+"final_mass"), idx(pre+"he_core_mass"), idx(pre+"co_core_mass"), idx(pre+"remnant_mass")
				for i := range b.Len {
					if v := b.Cols[m0].Valid; v != nil && !v[i] {
						continue
					}
					f := func(c int) float32 { return b.Cols[c].F32[i] }
					const slack = 1 + 1e-6 // float32 rounding of values computed in float64
					if f(mr) > f(mf)*slack || f(mf) > f(m0)*slack || f(mco) > f(mhe)*slack || f(mhe) > f(mf)*slack {
						t.Fatalf("%v: %srow %d violates remnant <= final <= initial, CO <= He <= final: %v %v %v %v %v",
							set, pre, i, f(m0), f(mf), f(mhe), f(mco), f(mr))
					}
				}
			}
			a, e := idx("final_separation_au"), idx("final_eccentricity")
			for i := range b.Len {
				if b.Cols[outcome].Cat[i] != bound {
					continue
				}
				if av, ev := b.Cols[a].F32[i], b.Cols[e].F32[i]; !b.Cols[a].Valid[i] || !(av > 0) || ev < 0 || ev >= 1 {
					t.Fatalf("%v: bound system row %d has a = %v, e = %v", set, i, av, ev)
				}
			}
		}
		r.Close()
	}
}
