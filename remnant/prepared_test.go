package remnant

import (
	"math"
	"testing"
)

// TestPreparedPaths: the fast path of the builtin model (powers of M built from M^0.2) gives the
// same cores as the general path (each power from its own exponential) to rounding, and both equal
// Builtin.Core, over the whole mass and metallicity range.
func TestPreparedPaths(t *testing.T) {
	b := DefaultBuiltin()
	fast := b.Prepare()
	if !fast.fifths {
		t.Fatal("the default parameters should take the fast path")
	}
	slow := b.Prepare()
	slow.fifths = false
	for _, z := range []float64{1e-4, 1e-3, 0.0142, 0.03} {
		for m := 0.5; m < 300; m *= 1.07 {
			a, _ := fast.Core(m, z)
			c, _ := slow.Core(m, z)
			d, _ := b.Core(m, z)
			for _, p := range [][3]float64{{a.FinalMass, c.FinalMass, d.FinalMass}, {a.HeCoreMass, c.HeCoreMass, d.HeCoreMass},
				{a.COCoreMass, c.COCoreMass, d.COCoreMass}, {a.MaxRadius, c.MaxRadius, d.MaxRadius}, {a.LifetimeMyr, c.LifetimeMyr, d.LifetimeMyr}} {
				if math.Abs(p[0]-p[1]) > 1e-12*p[1] || p[0] != p[2] {
					t.Fatalf("M=%v Z=%v: fast %v, general %v, Builtin.Core %v", m, z, p[0], p[1], p[2])
				}
			}
		}
	}
	// Exponents that are not multiples of 0.2 take the general path.
	b.HeCoreExponent = 1.43
	if b.Prepare().fifths {
		t.Error("HeCoreExponent 1.43 must take the general path")
	}
}
