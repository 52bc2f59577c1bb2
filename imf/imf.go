package imf

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// IMF is a normalised initial mass function over [Min(), Max()]: the number
// density of stars in mass, dN/dm, with unit integral. Masses are in Msun.
type IMF interface {
	// Prob returns the normalised dN/dm at mass m, in 1/Msun; 0 outside
	// [Min, Max].
	Prob(m float64) float64
	// CDF returns the fraction of stars (by number) with mass below m.
	CDF(m float64) float64
	// Quantile returns the mass m with CDF(m) = p, the exact inverse of CDF.
	// It returns NaN for p outside [0, 1].
	Quantile(p float64) float64
	// Rand draws a mass by inverting the CDF at a uniform deviate from src.
	Rand(src *rand.Rand) float64
	// Mean returns the mean stellar mass, in Msun.
	Mean() float64
	// NumberFraction returns the fraction of stars (by number) with
	// lo <= m < hi. The interval is clipped to [Min, Max].
	NumberFraction(lo, hi float64) float64
	// MassFraction returns the fraction of the total stellar mass in stars
	// with lo <= m < hi. The interval is clipped to [Min, Max].
	MassFraction(lo, hi float64) float64
	// Min returns the lowest mass of the IMF, in Msun.
	Min() float64
	// Max returns the highest mass of the IMF, in Msun.
	Max() float64
}

// restricter is implemented by families whose restriction to a sub-range is
// again a member of the family, which is then evaluated and sampled directly.
type restricter interface {
	restrict(lo, hi float64) (IMF, error)
}

// Truncated is an IMF conditioned on the sample range [SampleMin, SampleMax]
// inside the range of its Parent: its density is Parent.Prob(m) divided by
// the parent's number fraction in the sample range, and zero elsewhere.
//
// Build it with Restrict. When the parent is a *BrokenPowerLaw or a
// *Chabrier2003, the conditioned law is itself a law of the same family over
// the sample range and is evaluated and sampled as such (per-segment exact
// inversion). For any other parent, Quantile maps p to
// Parent.Quantile(CDF_parent(SampleMin) + p (CDF_parent(SampleMax) -
// CDF_parent(SampleMin))), whose resolution in p is the parent's ulp
// divided by ParentFraction.
type Truncated struct {
	Parent               IMF
	SampleMin, SampleMax float64 // Msun

	frac     float64 // parent's number fraction in the sample range
	massFrac float64 // parent's mass fraction in the sample range
	plo, phi float64 // parent CDF at SampleMin and SampleMax
	mean     float64
	exact    IMF             // the same law renormalised on the sample range, or nil
	bpl      *BrokenPowerLaw // exact, when a broken power law (direct call in Rand)
}

// Restrict returns the IMF f conditioned on lo <= m <= hi (masses in Msun).
// The sample range must lie inside [f.Min(), f.Max()] with lo < hi and hold
// a positive fraction of f's stars.
func Restrict(f IMF, lo, hi float64) (*Truncated, error) {
	if f == nil {
		return nil, fmt.Errorf("imf: cannot restrict a nil IMF")
	}
	min, max := f.Min(), f.Max()
	if math.IsNaN(lo) || math.IsNaN(hi) || !(lo < hi) {
		return nil, fmt.Errorf("imf: sample range [sample_min, sample_max] = [%g, %g] Msun must have sample_min < sample_max", lo, hi)
	}
	if lo < min || hi > max {
		return nil, fmt.Errorf("imf: sample range [sample_min, sample_max] = [%g, %g] Msun must lie inside the IMF range [min, max] = [%g, %g] Msun", lo, hi, min, max)
	}
	t := &Truncated{Parent: f, SampleMin: lo, SampleMax: hi}
	t.frac = f.NumberFraction(lo, hi)
	t.massFrac = f.MassFraction(lo, hi)
	if !(t.frac > 0) || !(t.massFrac > 0) {
		return nil, fmt.Errorf("imf: sample range [sample_min, sample_max] = [%g, %g] Msun holds no stars of the IMF (number fraction %g); choose a range where the IMF is positive", lo, hi, t.frac)
	}
	t.plo, t.phi = f.CDF(lo), f.CDF(hi)
	t.mean = f.Mean() * t.massFrac / t.frac
	if r, ok := f.(restricter); ok {
		e, err := r.restrict(lo, hi)
		if err != nil {
			return nil, err
		}
		t.exact = e
		t.bpl, _ = e.(*BrokenPowerLaw)
		t.mean = e.Mean()
	}
	return t, nil
}

// ParentFraction returns the fraction of the parent's stars (by number) that
// lie in the sample range.
func (t *Truncated) ParentFraction() float64 { return t.frac }

// Min returns SampleMin, in Msun.
func (t *Truncated) Min() float64 { return t.SampleMin }

// Max returns SampleMax, in Msun.
func (t *Truncated) Max() float64 { return t.SampleMax }

// Prob returns the conditioned dN/dm at m, in 1/Msun; 0 outside the sample
// range.
func (t *Truncated) Prob(m float64) float64 {
	if t.exact != nil {
		return t.exact.Prob(m)
	}
	if !(m >= t.SampleMin && m <= t.SampleMax) {
		return 0
	}
	return t.Parent.Prob(m) / t.frac
}

// CDF returns the conditioned fraction of stars below m.
func (t *Truncated) CDF(m float64) float64 {
	if t.exact != nil {
		return t.exact.CDF(m)
	}
	if m <= t.SampleMin {
		return 0
	}
	if m >= t.SampleMax {
		return 1
	}
	return t.Parent.NumberFraction(t.SampleMin, m) / t.frac
}

// Quantile returns the mass m in the sample range with CDF(m) = p; NaN for
// p outside [0, 1].
func (t *Truncated) Quantile(p float64) float64 {
	if t.exact != nil {
		return t.exact.Quantile(p)
	}
	if !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	if p == 0 {
		return t.SampleMin
	}
	if p == 1 {
		return t.SampleMax
	}
	m := t.Parent.Quantile(t.plo + p*(t.phi-t.plo))
	return clamp(m, t.SampleMin, t.SampleMax)
}

// Rand draws a mass from the sample range by exact inverse-CDF sampling.
func (t *Truncated) Rand(src *rand.Rand) float64 {
	if t.bpl != nil {
		return t.bpl.Rand(src)
	}
	if t.exact != nil {
		return t.exact.Rand(src)
	}
	return t.Quantile(src.Float64())
}

// Mean returns the mean mass of stars in the sample range, in Msun.
func (t *Truncated) Mean() float64 { return t.mean }

// NumberFraction returns the conditioned fraction of stars with
// lo <= m < hi.
func (t *Truncated) NumberFraction(lo, hi float64) float64 {
	if t.exact != nil {
		return t.exact.NumberFraction(lo, hi)
	}
	lo, hi = math.Max(lo, t.SampleMin), math.Min(hi, t.SampleMax)
	if !(lo < hi) {
		return 0
	}
	return t.Parent.NumberFraction(lo, hi) / t.frac
}

// MassFraction returns the conditioned fraction of stellar mass in stars
// with lo <= m < hi.
func (t *Truncated) MassFraction(lo, hi float64) float64 {
	if t.exact != nil {
		return t.exact.MassFraction(lo, hi)
	}
	lo, hi = math.Max(lo, t.SampleMin), math.Min(hi, t.SampleMax)
	if !(lo < hi) {
		return 0
	}
	return t.Parent.MassFraction(lo, hi) / t.massFrac
}

// MassRepresented returns the total stellar mass, in Msun, of a population
// drawn from the whole IMF f over [f.Min(), f.Max()] that contains n stars
// with masses in [lo, hi): that is n * f.Mean() / f.NumberFraction(lo, hi).
//
// A synthesis that samples only [lo, hi) (say 8 to 150 Msun) produces n
// stars; the low-mass stars that were not sampled still formed, and this is
// the stellar mass they all add up to. Rates per unit star-forming mass
// divide by it. It counts single stars drawn from f only: the mass of
// binary companions is the caller's to add. It returns +Inf if [lo, hi)
// holds no stars of f, and NaN if n < 0.
func MassRepresented(f IMF, lo, hi float64, n int) float64 {
	if n < 0 {
		return math.NaN()
	}
	return float64(n) * f.Mean() / f.NumberFraction(lo, hi)
}

func clamp(x, lo, hi float64) float64 {
	if x < lo {
		return lo
	}
	if x > hi {
		return hi
	}
	return x
}
