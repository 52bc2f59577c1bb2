package binary_test

import (
	"fmt"
	"math/rand/v2"

	"github.com/corefall/corefall/binary"
)

// The Hulse-Taylor pulsar PSR B1913+16 (Weisberg & Huang 2016 parameters):
// Peters' formula gives about 300 Myr to coalescence.
func ExampleMergeTime() {
	m1, m2 := 1.4398, 1.3886
	a := binary.SeparationAU(0.322997448918, m1+m2)
	fmt.Printf("%.0f Myr\n", binary.MergeTime(m1, m2, a, 0.6171340))
	// Output: 301 Myr
}

// Blaauw's (1961) kick-free case: a circular 20 Msun binary loses 2 Msun,
// so e' = 2/18 and a' = a 18/16.
func ExampleSupernova() {
	res := binary.Supernova(binary.Orbit{A: 1, E: 0}, 12, 10, 8, binary.Vec3{}, 0)
	fmt.Printf("bound=%v a=%.4f AU e=%.4f\n", res.Bound, res.Orbit.A, res.Orbit.E)
	// Output: bound=true a=1.1250 AU e=0.1111
}

// Drawing an initial orbit: Sana et al. (2012) period and eccentricity laws.
func ExampleSanaPeriod() {
	src := rand.New(rand.NewPCG(1, 2))
	period := binary.SanaPeriod{LogPMin: 0.15, LogPMax: 5.5, Exponent: -0.55}
	ecc := binary.PowerLawEcc{Exponent: -0.45, EMax: 0.9}
	p := period.Rand(src) // days
	o := binary.Orbit{A: binary.SeparationAU(p, 30+20), E: ecc.Rand(src)}
	fmt.Println(o.A > 0, o.E >= 0 && o.E <= 0.9)
	// Output: true true
}
