package remnant_test

import (
	"fmt"
	"math/rand/v2"

	"github.com/corefall/corefall/remnant"
)

// A star's life and remnant with the default models.
func Example() {
	b, p, k := remnant.DefaultBuiltin(), remnant.DefaultPrescription(), remnant.DefaultKicks()
	c, err := b.Core(1.16, 0.0142)
	if err != nil {
		fmt.Println(err)
		return
	}
	r := p.Decide(c)
	v := k.Draw(r, rand.New(rand.NewPCG(1, 2)))
	// Kalirai et al. (2008): a 1.16 Msun star leaves a 0.53 Msun white dwarf
	// (their linear fit gives 0.52); white dwarfs get no kick.
	fmt.Printf("%v (%v) of %.2f Msun, kick %v km/s\n", r.Type, r.Fate, r.Mass, v)
	// Output: WD (wd) of 0.52 Msun, kick [0 0 0] km/s
}

// The rapid engine of Fryer et al. (2012) on a core given directly: the
// worked value of M_CO = 9, M_fin = 25 Msun is a 13.995 Msun black hole.
func ExamplePrescription_Decide() {
	p := remnant.DefaultPrescription()
	r := p.Decide(remnant.Core{COCoreMass: 9, FinalMass: 25, Metallicity: 0.0142})
	fmt.Printf("%v %v %.3f Msun, fallback fraction %.4f\n", r.Type, r.Fate, r.Mass, r.FallbackFraction)
	// Output: BH sn 13.995 Msun, fallback fraction 0.6062
}

// A user's grid of stellar models, interpolated in log mass.
func ExampleNewTable() {
	t, err := remnant.NewTable([]remnant.TableRow{
		{InitialMass: 10, Metallicity: 0.0142, FinalMass: 9, HeCoreMass: 3, COCoreMass: 2, LifetimeMyr: 25},
		{InitialMass: 100, Metallicity: 0.0142, FinalMass: 30, HeCoreMass: 25, COCoreMass: 20, LifetimeMyr: 3},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	c, _ := t.Core(31.6227766, 0.0142) // halfway in log10 M
	fmt.Printf("final %.2f, CO core %.2f Msun\n", c.FinalMass, c.COCoreMass)
	_, err = t.Core(120, 0.0142)
	fmt.Println(err)
	// Output:
	// final 19.50, CO core 11.00 Msun
	// remnant: initial mass 120 Msun outside the table's range [10, 100] Msun
}
