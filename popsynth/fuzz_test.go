package popsynth

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/corefall/corefall/remnant"
)

// FuzzConfig feeds arbitrary YAML to the config loader: it must return a valid config or an error,
// never panic, and a config it accepts must pass validation again after a YAML round trip.
func FuzzConfig(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "fuzz-seeds", "config", "*.yaml"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add([]byte("systems: 10\n"))
	f.Add([]byte("imf: {law: salpeter, min: 0.1, max: 100, sample_max: 100}\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		cfg, err := Load(Sources{File: "fuzz.yaml", Data: data})
		if err != nil {
			return
		}
		if err := cfg.Validate(); err != nil {
			t.Fatalf("accepted config fails validation: %v", err)
		}
		if _, err := ParseYAMLConfig("round trip", cfg.YAML()); err != nil {
			t.Fatalf("accepted config does not survive a YAML round trip: %v\n%s", err, cfg.YAML())
		}
	})
}

// FuzzStellarTable feeds arbitrary bytes to the stellar-grid reader and, when it parses, to the
// table model: errors are fine, panics and non-finite answers are not.
func FuzzStellarTable(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "fuzz-seeds", "table", "*"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add([]byte("initial_mass,metallicity,final_mass,he_core_mass,co_core_mass,lifetime_myr\n10,0.01,9,3,2,20\n20,0.01,15,6,4,9\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		rows, err := ParseStellarTable(data)
		if err != nil {
			return
		}
		tab, err := remnant.NewTable(rows)
		if err != nil {
			return
		}
		r := rows[0]
		c, err := tab.Core(r.InitialMass, r.Metallicity)
		if err != nil {
			t.Fatalf("grid point (%v, %v) is not answered: %v", r.InitialMass, r.Metallicity, err)
		}
		for _, x := range []float64{c.FinalMass, c.HeCoreMass, c.COCoreMass, c.LifetimeMyr} {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("non-finite answer at a grid point: %+v", c)
			}
		}
	})
}
