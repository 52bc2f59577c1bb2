package binary

import (
	"math"
	"math/rand/v2"
)

// Vec3 is a Cartesian vector. Velocities are in km/s and positions in AU.
type Vec3 [3]float64

func (v Vec3) add(w Vec3) Vec3      { return Vec3{v[0] + w[0], v[1] + w[1], v[2] + w[2]} }
func (v Vec3) scale(c float64) Vec3 { return Vec3{c * v[0], c * v[1], c * v[2]} }
func (v Vec3) dot(w Vec3) float64   { return v[0]*w[0] + v[1]*w[1] + v[2]*w[2] }
func (v Vec3) norm() float64        { return math.Sqrt(v.dot(v)) }
func (v Vec3) cross(w Vec3) Vec3 {
	return Vec3{v[1]*w[2] - v[2]*w[1], v[2]*w[0] - v[0]*w[2], v[0]*w[1] - v[1]*w[0]}
}

// Norm returns the Euclidean length of v.
func (v Vec3) Norm() float64 { return v.norm() }

// SNResult is the outcome of a supernova in a binary. Velocities are in km/s
// in the rest frame of the binary's centre of mass before the explosion.
type SNResult struct {
	// Bound reports whether the two bodies remain bound.
	Bound bool
	// Orbit is the new orbit if Bound, and the zero Orbit otherwise.
	Orbit Orbit
	// Systemic is the velocity of the centre of mass of the remnant and
	// the companion (the new system), km/s. When the exploding star leaves
	// no remnant it is the companion's velocity.
	Systemic Vec3
	// SystemicSpeed is the length of Systemic, km/s.
	SystemicSpeed float64
	// VInfExploder and VInfCompanion are the speeds, km/s, of the remnant
	// and of the companion once far apart, if the binary is disrupted (zero
	// if Bound). Each is the vector sum of Systemic and the body's share of
	// the relative velocity at infinity of the hyperbolic relative orbit
	// (m2/M' and -m1New/M' of it, M' = m1New + m2), so the two bodies'
	// momenta add up to M' Systemic. With no remnant, VInfExploder is 0 and
	// VInfCompanion is the companion's orbital speed.
	VInfExploder, VInfCompanion float64
	// Tilt is the angle, radians in [0, pi], between the orbital angular
	// momentum after the explosion and before it (the misalignment a natal
	// kick gives the orbital plane); NaN for a radial relative orbit.
	Tilt float64
}

func nanSN() SNResult {
	n := math.NaN()
	return SNResult{
		Orbit:    Orbit{A: n, E: n},
		Systemic: Vec3{n, n, n}, SystemicSpeed: n,
		VInfExploder: n, VInfCompanion: n, Tilt: n,
	}
}

// Supernova returns the outcome of the explosion of star 1 of a binary.
// Star 1, of mass m1 (Msun), becomes a remnant of mass m1New (Msun, >= 0;
// 0 for no remnant) and receives the natal kick `kick` (km/s, added to its
// velocity, in the exploding star's rest frame just before the explosion).
// The companion has mass m2 (Msun). The pre-explosion orbit is o, and the
// explosion happens at mean anomaly meanAnom (radians). The mass is lost
// instantaneously, so positions and the companion's velocity do not change.
//
// Frame: the orbit lies in the plane z = 0 with periastron on +x and the
// relative motion counter-clockwise about +z; `kick` and the returned
// vectors are in this frame, centred on the pre-explosion centre of mass.
// A caller that draws kick directions isotropically can ignore the
// orientation.
//
// From the relative position r and the new relative velocity v' = v + kick,
// the specific orbital energy eps = v'^2/2 - G M'/r, M' = m1New + m2, decides
// whether the binary stays bound (eps < 0); then a' = -G M' / (2 eps) and e'
// is the length of the Laplace-Runge-Lenz vector v' x h / (G M') - r/|r|,
// h = r x v'. For an unbound pair the relative velocity at infinity has the
// length sqrt(2 eps) and the direction of the outgoing asymptote of the
// hyperbola (Blaauw 1961, BAN 15, 265 for the symmetric, kick-free case;
// eccentric orbits with kicks: Hills 1983, ApJ 267, 322).
//
// Inputs outside o.A > 0, 0 <= o.E < 1, m1 > 0, m1New >= 0, m2 > 0 (or
// non-finite) give NaN fields.
func Supernova(o Orbit, m1, m1New, m2 float64, kick Vec3, meanAnom float64) SNResult {
	if !(o.A > 0) || math.IsInf(o.A, 1) || !(o.E >= 0 && o.E < 1) ||
		!(m1 > 0) || !(m1New >= 0) || !(m2 > 0) ||
		math.IsInf(m1, 1) || math.IsInf(m1New, 1) || math.IsInf(m2, 1) ||
		!finite(kick[0]) || !finite(kick[1]) || !finite(kick[2]) || !finite(meanAnom) {
		return nanSN()
	}
	m := m1 + m2
	ecc := Kepler(meanAnom, o.E)
	sE, cE := math.Sincos(ecc)
	b := math.Sqrt((1 - o.E) * (1 + o.E))
	den := 1 - o.E*cE
	sep := o.A * den
	// Relative position r = r1 - r2 and velocity in the orbital plane.
	r := Vec3{o.A * (cE - o.E), o.A * b * sE, 0}
	vf := math.Sqrt(gmKms*m/o.A) / den
	v := Vec3{-vf * sE, vf * b * cE, 0}
	// Velocities of the two bodies about the old centre of mass.
	v2 := v.scale(-m1 / m)
	if m1New == 0 {
		u := v2.norm()
		return SNResult{Systemic: v2, SystemicSpeed: u, VInfCompanion: u, Tilt: math.NaN()}
	}
	v1 := v.scale(m2 / m).add(kick)
	mNew := m1New + m2
	sys := v1.scale(m1New / mNew).add(v2.scale(m2 / mNew))
	res := SNResult{Systemic: sys, SystemicSpeed: sys.norm()}

	vn := v.add(kick)
	mu := gmKms * mNew
	eps := 0.5*vn.dot(vn) - mu/sep
	h := r.cross(vn)
	hn := h.norm()
	if hn > 0 {
		res.Tilt = math.Acos(math.Max(-1, math.Min(1, h[2]/hn)))
	} else {
		res.Tilt = math.NaN()
	}
	lrl := vn.cross(h).scale(1 / mu).add(r.scale(-1 / sep))
	e := lrl.norm()
	if eps < 0 {
		res.Bound = true
		res.Orbit = Orbit{A: -mu / (2 * eps), E: math.Min(e, math.Nextafter(1, 0))}
		return res
	}
	// Unbound: direction of the relative velocity as t -> infinity.
	var dir Vec3
	if hn > 1e-12*sep*vn.norm() && e > 0 {
		// Outgoing asymptote: true anomaly arccos(-1/e); in the perifocal
		// basis (p along the LRL vector, q = h x p / |h|) the unit velocity
		// there is (-p + sqrt(e^2-1) q) / e.
		p := lrl.scale(1 / e)
		q := h.scale(1 / hn).cross(p)
		dir = p.scale(-1 / e).add(q.scale(math.Sqrt(math.Max(0, e*e-1)) / e))
	} else {
		// Radial relative motion: outwards it stays along r; inwards the
		// point masses pass through each other and recede along -r.
		dir = r.scale(1 / sep)
		if r.dot(vn) < 0 {
			dir = dir.scale(-1)
		}
	}
	vinf := dir.scale(math.Sqrt(2 * eps))
	res.VInfExploder = sys.add(vinf.scale(m2 / mNew)).norm()
	res.VInfCompanion = sys.add(vinf.scale(-m1New / mNew)).norm()
	return res
}

// SupernovaRandom is Supernova at a mean anomaly drawn uniformly in
// [0, 2 pi) from src, that is at a time drawn uniformly over the orbit.
func SupernovaRandom(o Orbit, m1, m1New, m2 float64, kick Vec3, src *rand.Rand) SNResult {
	return Supernova(o, m1, m1New, m2, kick, 2*math.Pi*src.Float64())
}
