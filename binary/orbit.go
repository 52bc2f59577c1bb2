package binary

import "math"

// Orbit is a Keplerian binary orbit: semi-major axis A in AU and
// eccentricity E (0 <= E < 1 for a bound orbit).
type Orbit struct {
	A float64 // semi-major axis, AU
	E float64 // eccentricity
}

// Periastron returns the periastron separation A(1-E) in AU.
func (o Orbit) Periastron() float64 { return o.A * (1 - o.E) }

// JeansWind returns the orbit after isotropic wind mass loss that is slow
// compared with the orbital period (the Jeans mode: each star loses mass
// with the specific orbital angular momentum it has), taking the total mass
// of the binary from mBefore to mAfter (Msun). The semi-major axis scales as
// a mBefore / mAfter so that a (M1+M2) is constant, and the eccentricity is
// an adiabatic invariant and does not change (Jeans 1924, MNRAS 85, 2;
// Hadjidemetriou 1963, Icarus 2, 440; common practice in population
// synthesis). The result has NaN A unless mBefore > 0 and mAfter > 0.
func JeansWind(o Orbit, mBefore, mAfter float64) Orbit {
	if !(mBefore > 0) || !(mAfter > 0) {
		return Orbit{A: math.NaN(), E: o.E}
	}
	return Orbit{A: o.A * (mBefore / mAfter), E: o.E}
}

// RocheLobe returns the volume-equivalent radius of the Roche lobe in units
// of the orbital separation, r_L / a, for the mass ratio q = M_donor /
// M_accretor (q > 0), from the fit of Eggleton (1983, ApJ 268, 368):
//
//	r_L / a = 0.49 q^(2/3) / (0.6 q^(2/3) + ln(1 + q^(1/3))),
//
// accurate to 1% for all q. It tends to 0.49 q^(1/3) as q -> 0 and to
// 0.49/0.6 as q -> infinity. It returns NaN for q < 0 or NaN and 0 at q = 0.
func RocheLobe(q float64) float64 {
	if !(q >= 0) {
		return math.NaN()
	}
	if math.IsInf(q, 1) {
		return 0.49 / 0.6
	}
	q3 := math.Cbrt(q)
	q23 := q3 * q3
	if q23 == 0 {
		return 0
	}
	return 0.49 * q23 / (0.6*q23 + math.Log1p(q3))
}

// FillsRocheLobe reports whether a donor of radius radiusRsun (solar radii)
// and mass mDonor (Msun), orbiting a companion of mass mOther (Msun) on the
// orbit o, reaches its Roche lobe (Eggleton 1983) at periastron, where the
// separation is o.A (1 - o.E).
func FillsRocheLobe(radiusRsun float64, o Orbit, mDonor, mOther float64) bool {
	r, ap := radiusRsun*rSunAU, o.Periastron()
	q := mDonor / mOther
	// r_L/a rises with q from 0 to 0.49/0.6: two cheap decisions before the full formula.
	switch {
	case r >= rocheLobeMax*ap:
		return true
	case q >= 1 && r < rocheLobeEqual*ap:
		return false
	}
	return r >= RocheLobe(q)*ap
}

// rocheLobeMax is the limit of RocheLobe as q -> infinity, and rocheLobeEqual its value at q = 1,
// 0.49 / (0.6 + ln 2); RocheLobe lies between them for every q >= 1 (it rises with q).
const (
	rocheLobeMax   = 0.49 / 0.6
	rocheLobeEqual = 0.49 / (0.6 + math.Ln2)
)
