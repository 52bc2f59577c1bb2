package remnant

import (
	"fmt"
	"math/rand/v2"
)

// Kicks is the natal-kick model: neutron stars get a kick of isotropic
// direction whose speed follows a Maxwellian distribution (each Cartesian
// component normal with standard deviation NSSigma), and black holes get
// that kick scaled as BHMode says. Speeds are in km/s, masses in Msun.
type Kicks struct {
	// NSSigma is the one-dimensional velocity dispersion of neutron-star
	// kicks, 265 km/s (Hobbs et al. 2005, MNRAS 360, 974); the mean speed is
	// 2 NSSigma sqrt(2/pi), about 400 km/s.
	NSSigma float64
	// BHMode says how black-hole kicks are scaled.
	BHMode BHKickMode
	// RefNSMass is the neutron-star mass whose momentum black holes receive
	// in KickMomentum mode, 1.4 (common practice).
	RefNSMass float64
}

// DefaultKicks returns the default kick model: Maxwellian neutron-star kicks
// with sigma 265 km/s (Hobbs et al. 2005) and black-hole kicks reduced by
// fallback (Fryer et al. 2012).
func DefaultKicks() Kicks {
	return Kicks{NSSigma: 265, BHMode: KickFallback, RefNSMass: 1.4}
}

// Validate returns an error naming the first parameter of k outside its
// allowed range, and the range.
func (k Kicks) Validate() error {
	if int(k.BHMode) >= len(kickWords) {
		return fmt.Errorf("remnant: Kicks.BHMode = %d, want one of %v, %v, %v, %v",
			uint8(k.BHMode), KickFallback, KickMomentum, KickFull, KickNone)
	}
	return checkParams("Kicks", []param{
		// 3e5 km/s: the speed of light.
		{"NSSigma", k.NSSigma, bound{0, 3e5, false, true}},
		{"RefNSMass", k.RefNSMass, positive},
	})
}

// Scale returns the factor by which the Maxwellian kick is multiplied for
// remnant r: 1 for a neutron star; for a black hole 1 - f_fb (KickFallback),
// min(1, RefNSMass / M_BH) (KickMomentum), 1 (KickFull) or 0 (KickNone);
// 0 for a white dwarf, no remnant, or a star.
func (k Kicks) Scale(r Remnant) float64 {
	switch r.Type {
	case NS:
		return 1
	case BH:
		switch k.BHMode {
		case KickFallback:
			return 1 - clamp01(r.FallbackFraction)
		case KickMomentum:
			if r.Mass <= 0 {
				return 0
			}
			return min(1, k.RefNSMass/r.Mass)
		case KickFull:
			return 1
		}
	}
	return 0
}

// Draw returns the natal kick velocity (km/s) of remnant r: three
// independent normal components of standard deviation NSSigma (an isotropic
// direction and a Maxwellian speed), multiplied by Scale(r). White dwarfs, no
// remnant and stars get zero.
//
// Draw takes exactly three normal variates from src whatever the remnant and
// the mode, so that changing a kick option or a star's fate does not shift
// the random numbers of later draws. It does not allocate.
func (k Kicks) Draw(r Remnant, src *rand.Rand) [3]float64 {
	x, y, z := src.NormFloat64(), src.NormFloat64(), src.NormFloat64()
	s := k.NSSigma * k.Scale(r)
	if s == 0 {
		return [3]float64{}
	}
	return [3]float64{s * x, s * y, s * z}
}
