package rates

import (
	"fmt"
	"math"
)

// Physical constants and unit conversions.
const (
	// SpeedOfLight is c in km/s (SI definition of the metre).
	SpeedOfLight = 299792.458
	// MpcKm is one megaparsec in km: 1 pc = 648000/π au with the IAU 2012
	// (Resolution B2) astronomical unit of 149 597 870 700 m.
	MpcKm = 3.0856775814913673e19
	// GyrSeconds is one gigayear of Julian years (365.25 d) in seconds.
	GyrSeconds = 3.15576e16

	// gravitationalConstant is G in m^3 kg^-1 s^-2 (CODATA 2018).
	gravitationalConstant = 6.67430e-11
	// stefanBoltzmann is sigma_SB in W m^-2 K^-4 (CODATA 2018, exact from h, k, c).
	stefanBoltzmann = 5.670374419e-8
	// speedOfLightSI is c in m/s.
	speedOfLightSI = 299792458.0
	// neutrinoFactor is (7/8) (4/11)^(4/3): the energy density of one species
	// of massless neutrinos (with antineutrinos) relative to the photons after
	// electron-positron annihilation (common practice; e.g. Weinberg 2008,
	// Cosmology, Oxford University Press, section 3.1).
	neutrinoFactor = 7.0 / 8.0 * 0.25955122018313026 // (4/11)^(4/3)
)

// Planck 2018 parameters (Planck Collaboration 2020, A&A 641, A6, table 2,
// TT,TE,EE+lowE+lensing+BAO), with the CMB temperature of Fixsen (2009,
// ApJ 707, 916) and the standard effective number of neutrino species
// (Mangano et al. 2005, Nucl. Phys. B 729, 221), as in astropy's Planck18.
const (
	Planck18H0     = 67.66   // km/s/Mpc
	Planck18OmegaM = 0.30966 // matter (cold dark matter, baryons and the 0.06 eV neutrino) today
	Planck18Tcmb   = 2.7255  // K
	Planck18Neff   = 3.046
	// Planck18AgeGyr is the age of the Universe quoted by the Planck
	// Collaboration (2020, A&A 641, A6, table 2), in Gyr.
	Planck18AgeGyr = 13.787
)

// Cosmology is a flat Lambda-CDM universe with radiation:
//
//	H(z) = H0 E(z),  E(z)^2 = OmegaR (1+z)^4 + OmegaM (1+z)^3 + OmegaL,
//
// with OmegaL = 1 - OmegaM - OmegaR (flatness). H0 is in km/s/Mpc; the
// density parameters are today's values in units of the critical density.
//
// OmegaR counts photons and massless neutrinos (see RadiationDensity).
// Not modelled: curvature, dark energy other than a cosmological constant,
// and neutrino masses. Planck18 keeps all Neff = 3.046 neutrino species as
// massless radiation and the 0.06 eV species' mass inside OmegaM = 0.30966
// (Planck's OmegaM includes it). astropy's Planck18 instead follows the
// 0.06 eV species through its transition from radiation to matter and adds
// its density (0.0014 today) on top of OmegaM, taking it from OmegaL. Between
// the two, the age today differs by 0.12% (13.804 here, 13.787 there), and
// H(z), times and distances by less than 0.25%, and dV/dz by less than 0.6%,
// for 0 <= z <= 10 (tested against astropy 5.2). With massless neutrinos,
// astropy and this package agree to 1e-8 (tested).
//
// Methods take a redshift z >= 0 and return NaN for z < 0 or NaN; z = +Inf
// is allowed where the result is finite. A Cosmology that fails Validate
// gives meaningless results.
type Cosmology struct {
	H0     float64 // Hubble constant today, km/s/Mpc
	OmegaM float64 // matter density today
	OmegaR float64 // radiation density today (photons and massless neutrinos)
}

// Planck18 returns the flat Lambda-CDM cosmology of Planck Collaboration
// (2020, A&A 641, A6): H0 = 67.66 km/s/Mpc, OmegaM = 0.30966, and OmegaR from
// Tcmb = 2.7255 K and Neff = 3.046 massless neutrinos (OmegaR h^2 = 4.18e-5).
func Planck18() Cosmology {
	return Cosmology{
		H0:     Planck18H0,
		OmegaM: Planck18OmegaM,
		OmegaR: RadiationDensity(Planck18H0, Planck18Tcmb, Planck18Neff),
	}
}

// PhotonDensity returns Omega_gamma, the density of black-body radiation at
// temperature tcmb (K) in units of the critical density 3 H0^2 / (8 π G),
// for H0 in km/s/Mpc: Omega_gamma = (4 sigma_SB / c^3) tcmb^4 / rho_crit.
func PhotonDensity(h0, tcmb float64) float64 {
	h0SI := h0 * 1e3 / (MpcKm * 1e3) // s^-1
	rhoCrit := 3 * h0SI * h0SI / (8 * math.Pi * gravitationalConstant)
	c := speedOfLightSI
	return 4 * stefanBoltzmann / (c * c * c) * math.Pow(tcmb, 4) / rhoCrit
}

// RadiationDensity returns Omega_r = Omega_gamma (1 + (7/8) (4/11)^(4/3) neff),
// the density of photons at temperature tcmb (K) plus neff species of
// massless neutrinos, for H0 in km/s/Mpc.
func RadiationDensity(h0, tcmb, neff float64) float64 {
	return PhotonDensity(h0, tcmb) * (1 + neutrinoFactor*neff)
}

// Validate reports whether c describes a flat, expanding universe with a
// finite age: 0 < H0 < Inf, OmegaM >= 0, OmegaR >= 0, 0 < OmegaM + OmegaR <= 1
// (so that OmegaL >= 0).
func (c Cosmology) Validate() error {
	switch {
	case !(c.H0 > 0) || math.IsInf(c.H0, 0):
		return fmt.Errorf("rates: cosmology H0 = %v km/s/Mpc; want a finite value > 0", c.H0)
	case !(c.OmegaM >= 0) || math.IsInf(c.OmegaM, 0):
		return fmt.Errorf("rates: cosmology OmegaM = %v; want a finite value >= 0", c.OmegaM)
	case !(c.OmegaR >= 0) || math.IsInf(c.OmegaR, 0):
		return fmt.Errorf("rates: cosmology OmegaR = %v; want a finite value >= 0", c.OmegaR)
	case !(c.OmegaM+c.OmegaR > 0) || c.OmegaM+c.OmegaR > 1:
		return fmt.Errorf("rates: cosmology OmegaM + OmegaR = %v; want a value in (0, 1] (flat, OmegaL = 1 - OmegaM - OmegaR >= 0)", c.OmegaM+c.OmegaR)
	}
	return nil
}

// OmegaLambda returns the cosmological-constant density today,
// 1 - OmegaM - OmegaR.
func (c Cosmology) OmegaLambda() float64 { return 1 - c.OmegaM - c.OmegaR }

// E returns the dimensionless expansion rate H(z)/H0.
func (c Cosmology) E(z float64) float64 {
	if !(z >= 0) {
		return math.NaN()
	}
	zp := 1 + z
	zp3 := zp * zp * zp
	return math.Sqrt((c.OmegaR*zp+c.OmegaM)*zp3 + c.OmegaLambda())
}

// Hubble returns the Hubble parameter H(z) in km/s/Mpc.
func (c Cosmology) Hubble(z float64) float64 { return c.H0 * c.E(z) }

// HubbleTimeGyr returns 1/H0 in Gyr.
func (c Cosmology) HubbleTimeGyr() float64 { return MpcKm / c.H0 / GyrSeconds }

// HubbleDistanceMpc returns c/H0 in Mpc.
func (c Cosmology) HubbleDistanceMpc() float64 { return SpeedOfLight / c.H0 }

// scaleRoot returns s = (1+z)^-1/2, or NaN for z < 0 or NaN.
func scaleRoot(z float64) float64 {
	if !(z >= 0) {
		return math.NaN()
	}
	return 1 / math.Sqrt(1+z)
}

// LookbackTimeGyr returns the time elapsed between redshift z and today, in
// Gyr: t_L = (1/H0) ∫_0^z dz' / ((1+z') E(z')).
func (c Cosmology) LookbackTimeGyr(z float64) float64 {
	s := scaleRoot(z)
	if math.IsNaN(s) {
		return s
	}
	v, _ := c.integrate(timeIntegrand, s, 1)
	return v * c.HubbleTimeGyr()
}

// AgeGyr returns the age of the Universe at redshift z, in Gyr:
// t(z) = (1/H0) ∫_z^∞ dz' / ((1+z') E(z')).
func (c Cosmology) AgeGyr(z float64) float64 {
	s := scaleRoot(z)
	if math.IsNaN(s) {
		return s
	}
	v, _ := c.integrate(timeIntegrand, 0, s)
	return v * c.HubbleTimeGyr()
}

// ComovingDistanceMpc returns the line-of-sight comoving distance to
// redshift z, in Mpc: D_C = (c/H0) ∫_0^z dz'/E(z'). In a flat universe it is
// also the transverse comoving distance.
func (c Cosmology) ComovingDistanceMpc(z float64) float64 {
	s := scaleRoot(z)
	if math.IsNaN(s) {
		return s
	}
	v, _ := c.integrate(distanceIntegrand, s, 1)
	return v * c.HubbleDistanceMpc()
}

// LuminosityDistanceMpc returns the luminosity distance (1+z) D_C to
// redshift z, in Mpc.
func (c Cosmology) LuminosityDistanceMpc(z float64) float64 {
	return (1 + z) * c.ComovingDistanceMpc(z)
}

// DifferentialComovingVolume returns dV_C/(dz dΩ) = (c/H0) D_C^2 / E(z),
// the comoving volume per unit redshift per steradian at z, in Mpc^3/sr
// (flat universe; Hogg 1999, arXiv:astro-ph/9905116, eq. 28).
func (c Cosmology) DifferentialComovingVolume(z float64) float64 {
	d := c.ComovingDistanceMpc(z)
	return c.HubbleDistanceMpc() * d * d / c.E(z)
}

// DifferentialComovingVolumeFullSky returns dV_C/dz = 4π
// DifferentialComovingVolume(z), the comoving volume of the whole sky per
// unit redshift at z, in Mpc^3.
func (c Cosmology) DifferentialComovingVolumeFullSky(z float64) float64 {
	return 4 * math.Pi * c.DifferentialComovingVolume(z)
}

// RedshiftAtLookback returns the redshift z >= 0 at which LookbackTimeGyr(z)
// equals tGyr, for 0 <= tGyr < AgeGyr(0). The root is found by safeguarded
// Newton iteration in ln(1+z) to a relative precision of about 1e-14.
func (c Cosmology) RedshiftAtLookback(tGyr float64) (float64, error) {
	age0 := c.AgeGyr(0)
	if !(tGyr >= 0 && tGyr < age0) {
		return math.NaN(), fmt.Errorf("rates: lookback time %v Gyr; want 0 <= t < %v Gyr (the age of the Universe)", tGyr, age0)
	}
	if tGyr == 0 {
		return 0, nil
	}
	// f(u) = lookback(u) - t increases with u = ln(1+z); df/du = t_H / E(z).
	th := c.HubbleTimeGyr()
	return c.solve(math.Log(age0/(age0-tGyr))*2/3, func(u float64) (float64, float64) {
		z := math.Expm1(u)
		return c.LookbackTimeGyr(z) - tGyr, th / c.E(z)
	})
}

// RedshiftAtAge returns the redshift z >= 0 at which the Universe was tGyr
// old, for 0 < tGyr <= AgeGyr(0). It is the formation redshift of a star
// born tGyr after the Big Bang. The root is found as in RedshiftAtLookback,
// directly on AgeGyr so that small ages keep their relative precision.
func (c Cosmology) RedshiftAtAge(tGyr float64) (float64, error) {
	age0 := c.AgeGyr(0)
	if !(tGyr > 0 && tGyr <= age0) {
		return math.NaN(), fmt.Errorf("rates: age %v Gyr; want 0 < t <= %v Gyr (the age of the Universe today)", tGyr, age0)
	}
	if tGyr == age0 {
		return 0, nil
	}
	// f(u) = t - age(u) increases with u; df/du = t_H / E(z).
	th := c.HubbleTimeGyr()
	return c.solve(math.Log(age0/tGyr)*2/3, func(u float64) (float64, float64) {
		z := math.Expm1(u)
		return tGyr - c.AgeGyr(z), th / c.E(z)
	})
}

// solve finds the root in u >= 0 of an increasing f with f(0) < 0, from the
// first guess u0, by Newton steps kept inside a bisection bracket.
func (c Cosmology) solve(u0 float64, f func(u float64) (val, deriv float64)) (float64, error) {
	const uMax = 700 // 1+z = e^700, near the largest float64
	lo, hi := 0.0, 1.0
	for {
		v, _ := f(hi)
		if v >= 0 {
			break
		}
		lo = hi
		hi *= 2
		if hi > uMax {
			return math.NaN(), fmt.Errorf("rates: no redshift below 1e300 matches the requested time")
		}
	}
	u := math.Min(math.Max(u0, lo), hi)
	for range 200 {
		v, d := f(u)
		if v == 0 {
			return math.Expm1(u), nil
		}
		if v < 0 {
			lo = u
		} else {
			hi = u
		}
		next := u - v/d
		if !(next > lo && next < hi) {
			next = (lo + hi) / 2
		}
		if math.Abs(next-u) <= 1e-15*(1+u) || hi-lo <= 1e-15*(1+u) {
			return math.Expm1(next), nil
		}
		u = next
	}
	return math.Expm1(u), nil
}
