package imf_test

import (
	"fmt"
	"math/rand/v2"

	"github.com/corefall/corefall/imf"
)

// Sample only core-collapse progenitors from a Salpeter IMF and find the
// stellar mass the sample stands for.
func ExampleRestrict() {
	salpeter, err := imf.NewSalpeter(0.1, 100)
	if err != nil {
		panic(err)
	}
	massive, err := imf.Restrict(salpeter, 8, 100)
	if err != nil {
		panic(err)
	}
	src := rand.New(rand.NewPCG(1, 2))
	const n = 10000
	for range n {
		m := massive.Rand(src) // 8 <= m <= 100 Msun
		_ = m
	}
	fmt.Printf("stars of 8-100 Msun per Msun formed: %.5f\n", salpeter.NumberFraction(8, 100)/salpeter.Mean())
	fmt.Printf("%d such stars stand for %.4g Msun of stars\n", n, imf.MassRepresented(salpeter, 8, 100, n))
	// Output:
	// stars of 8-100 Msun per Msun formed: 0.00742
	// 10000 such stars stand for 1.347e+06 Msun of stars
}
