package binary

import "math"

// PeriodDays returns the orbital period in days of a binary with semi-major
// axis aAU (AU) and total mass mTotal (Msun), from Kepler's third law
// P = 2 pi sqrt(a^3 / (G M)). It returns NaN unless aAU >= 0 and mTotal > 0.
func PeriodDays(aAU, mTotal float64) float64 {
	if !(aAU >= 0) || !(mTotal > 0) {
		return math.NaN()
	}
	a := aAU * AU
	return 2 * math.Pi * math.Sqrt(a/(GMSun*mTotal)) * a / Day
}

// SeparationAU returns the semi-major axis in AU of a binary with orbital
// period pDays (days) and total mass mTotal (Msun), from Kepler's third law
// a = (G M P^2 / (4 pi^2))^(1/3). It returns NaN unless pDays >= 0 and
// mTotal > 0.
func SeparationAU(pDays, mTotal float64) float64 {
	if !(pDays >= 0) || !(mTotal > 0) {
		return math.NaN()
	}
	p := pDays * Day / (2 * math.Pi)
	return math.Cbrt(GMSun*mTotal*p*p) / AU
}

// Kepler returns the eccentric anomaly E (radians) that solves Kepler's
// equation M = E - e sin E for the mean anomaly M = meanAnomaly (radians) and
// eccentricity 0 <= e < 1, to machine precision. E lies in the same 2 pi
// period as M (|E - M| <= e), so Kepler(M + 2 pi, e) = Kepler(M, e) + 2 pi.
// It returns NaN for e outside [0, 1) or a non-finite M.
//
// M is reduced to [0, pi] by periodicity and the odd symmetry of the
// equation; there E - e sin E - M is increasing and convex, bracketed by
// [0, pi], and is solved by Halley's method (two to four steps) from the
// starting value min(M + 0.85 e, (6 M / e)^(1/3), pi) (the first after
// Danby 1987, Celest. Mech. 40, 303; the second from the cubic expansion of
// sin E near M = 0), with the bracket updated at every step and a bisection
// step whenever a Halley step would leave it.
func Kepler(meanAnomaly, e float64) float64 {
	if !(e >= 0 && e < 1) || math.IsNaN(meanAnomaly) || math.IsInf(meanAnomaly, 0) {
		return math.NaN()
	}
	if e == 0 {
		return meanAnomaly
	}
	k := math.Floor(meanAnomaly/(2*math.Pi) + 0.5)
	m := meanAnomaly - 2*math.Pi*k // in [-pi, pi]
	sign := 1.0
	if m < 0 {
		m, sign = -m, -1
	}
	return sign*keplerReduced(m, e) + 2*math.Pi*k
}

// keplerReduced solves m = E - e sin E for m in [0, pi], 0 < e < 1.
func keplerReduced(m, e float64) float64 {
	if m == 0 {
		return 0
	}
	if m >= math.Pi {
		return math.Pi
	}
	lo, hi := 0.0, math.Pi
	x := math.Min(m+0.85*e, math.Min(math.Cbrt(6*m/e), math.Pi))
	for range 100 {
		s, c := math.Sincos(x)
		f := x - e*s - m
		switch {
		case f > 0:
			hi = x
		case f < 0:
			lo = x
		default:
			return x
		}
		fp := 1 - e*c
		dx := f / (fp - 0.5*f*e*s/fp) // Halley: f'' = e sin x
		if math.Abs(dx) <= 1e-6*x {
			// Halley's error after this step is (f'''/(6f') -
			// f''^2/(4f'^2)) dx^3 to leading order. On [0, pi],
			// f' >= 1 - cos x >= 2x^2/pi^2, f'' <= x and f''' <= 1, so
			// the factor is below 7/x^2 and the error below 7e-18 x.
			return x - dx
		}
		x -= dx
		if !(x > lo && x < hi) {
			x = 0.5 * (lo + hi)
			if hi-lo <= 1e-15*hi {
				return x
			}
		}
	}
	return x
}
