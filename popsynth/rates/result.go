package rates

import (
	"fmt"
	"slices"
)

// Units is the unit of every rate density in a Result.
const Units = "Gpc^-3 yr^-1"

// Result holds rate densities over redshift, ready for encoding/json. All
// rates are source-frame event rates per comoving volume, in Gpc^-3 yr^-1.
type Result struct {
	Z           []float64     `json:"z"`           // redshift grid
	Rates       KindSeries    `json:"rates"`       // rate densities, Gpc^-3 yr^-1
	Uncertainty KindSeries    `json:"uncertainty"` // Poisson (Monte Carlo) standard errors, Gpc^-3 yr^-1
	Units       string        `json:"units"`       // always Units
	Cosmology   CosmologyInfo `json:"cosmology"`
	SFR         string        `json:"sfr"` // name of the star-formation history
	// Metallicity says how the catalogue's metallicities were turned into
	// cosmic star formation; for a fixed-Z catalogue it states that the one
	// Z stands for all star formation at every redshift.
	Metallicity string `json:"metallicity"`
}

// KindSeries holds one value per grid redshift for each event kind.
type KindSeries struct {
	NSFormation []float64 `json:"ns_formation"`
	BHFormation []float64 `json:"bh_formation"`
	BBHMerger   []float64 `json:"bbh_merger"`
	BHNSMerger  []float64 `json:"bhns_merger"`
	NSNSMerger  []float64 `json:"nsns_merger"`
}

// Of returns the series of kind k, or nil for an unknown kind.
func (s KindSeries) Of(k EventKind) []float64 { return s.of(k) }

func (s *KindSeries) ptr(k EventKind) *[]float64 {
	switch k {
	case NSFormation:
		return &s.NSFormation
	case BHFormation:
		return &s.BHFormation
	case BBHMerger:
		return &s.BBHMerger
	case BHNSMerger:
		return &s.BHNSMerger
	case NSNSMerger:
		return &s.NSNSMerger
	}
	return nil
}

func (s KindSeries) of(k EventKind) []float64 {
	if p := s.ptr(k); p != nil {
		return *p
	}
	return nil
}

// CosmologyInfo records the cosmology of a Result.
type CosmologyInfo struct {
	H0     float64 `json:"h0"`      // km/s/Mpc
	OmegaM float64 `json:"omega_m"` // matter density today
	AgeGyr float64 `json:"age_gyr"` // age of the Universe today, Gyr
}

// newResult returns a Result for t on the grid zs with zeroed series.
func newResult(t *Tally, zs []float64) Result {
	e := t.est
	res := Result{
		Z:     slices.Clone(zs),
		Units: Units,
		Cosmology: CosmologyInfo{
			H0:     e.Cosmology.H0,
			OmegaM: e.Cosmology.OmegaM,
			AgeGyr: e.Cosmology.AgeGyr(0),
		},
		SFR: e.SFR.Name(),
	}
	for k := range numKinds {
		*res.Rates.ptr(k) = make([]float64, len(zs))
		*res.Uncertainty.ptr(k) = make([]float64, len(zs))
	}
	switch s := e.Sampling; s.Kind {
	case SampledFixed:
		res.Metallicity = fmt.Sprintf("catalogue at fixed Z = %g: it stands for all star formation at every redshift (no metallicity reweighting)", s.Values[0])
	case SampledDiscrete:
		res.Metallicity = fmt.Sprintf("catalogue at %s, each value standing for the log10 Z nearer to it than to the others, reweighted to %s", s, e.Metallicity.Name())
	case SampledLogUniform:
		res.Metallicity = fmt.Sprintf("catalogue with %s, reweighted to %s; star formation outside that range is not counted", s, e.Metallicity.Name())
	}
	return res
}
