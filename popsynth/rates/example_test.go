package rates_test

import (
	"fmt"
	"log"

	"github.com/corefall/corefall/popsynth/rates"
)

func ExampleCosmology() {
	c := rates.Planck18()
	fmt.Printf("age today %.3f Gyr\n", c.AgeGyr(0))
	fmt.Printf("lookback time to z = 1: %.3f Gyr\n", c.LookbackTimeGyr(1))
	z, err := c.RedshiftAtLookback(10)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("10 Gyr ago: z = %.3f\n", z)
	// Output:
	// age today 13.804 Gyr
	// lookback time to z = 1: 7.941 Gyr
	// 10 Gyr ago: z = 1.712
}

func ExampleEstimator() {
	est := rates.Estimator{
		Cosmology:   rates.Planck18(),
		SFR:         rates.MadauFragos2017(),
		Metallicity: rates.MadauFragos2017Metallicity(0.5),
		Sampling:    rates.DiscreteZ(0.0002, 0.002, 0.02),
	}
	tally, err := est.NewTally()
	if err != nil {
		log.Fatal(err)
	}
	// In practice one event per catalogue row; weights are events per Msun
	// of star formation in the row's sub-population.
	events := []rates.Event{
		{Kind: rates.BBHMerger, DelayMyr: 3000, Metallicity: 0.0002, Weight: 1e-5},
		{Kind: rates.BBHMerger, DelayMyr: 800, Metallicity: 0.002, Weight: 5e-6},
		{Kind: rates.NSFormation, DelayMyr: 20, Metallicity: 0.02, Weight: 7e-3},
	}
	if err := tally.AddEvents(events); err != nil {
		log.Fatal(err)
	}
	grid, err := rates.RedshiftGrid(2, 1)
	if err != nil {
		log.Fatal(err)
	}
	res, err := tally.Rates(grid)
	if err != nil {
		log.Fatal(err)
	}
	for i, z := range res.Z {
		fmt.Printf("z = %g: BBH %.3g ± %.2g %s\n", z, res.Rates.BBHMerger[i], res.Uncertainty.BBHMerger[i], res.Units)
	}
}
