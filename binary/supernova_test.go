package binary

import (
	"math"
	"math/rand/v2"
	"testing"
)

// gmTest is G M_sun in AU (km/s)^2 from G M_sun = 1.3271244e20 m^3 s^-2
// (IAU 2015 B3) and AU = 1.495978707e11 m (IAU 2012).
const gmTest = 1.3271244e20 / 1.495978707e11 / 1e6

// state is the test's own pre-explosion relative position (AU) and velocity
// (km/s) of star 1 with respect to star 2, built from the true anomaly
// (r = p / (1 + e cos nu), v = sqrt(mu/p) (-sin nu, e + cos nu); e.g.
// Murray & Dermott 1999, ch. 2) with E from plain bisection.
func state(a, e, mTot, meanAnom float64) (r, v [3]float64) {
	ea := bisectKepler(math.Remainder(meanAnom, 2*math.Pi), e)
	nu := 2 * math.Atan2(math.Sqrt(1+e)*math.Sin(ea/2), math.Sqrt(1-e)*math.Cos(ea/2))
	p := a * (1 - e*e)
	rr := p / (1 + e*math.Cos(nu))
	k := math.Sqrt(gmTest * mTot / p)
	return [3]float64{rr * math.Cos(nu), rr * math.Sin(nu), 0},
		[3]float64{-k * math.Sin(nu), k * (e + math.Cos(nu)), 0}
}

func dot3(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }
func cross3(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

// TestSupernovaBlaauw: circular orbit, symmetric instantaneous mass loss dM
// of total mass M, no kick (Blaauw 1961, BAN 15, 265): e' = dM/(M-dM),
// a' = a (M-dM)/(M-2dM), disrupted iff dM > M/2; the new centre of mass
// moves at dM m2 v_orb / (M (M-dM)) (momentum conservation).
func TestSupernovaBlaauw(t *testing.T) {
	for _, c := range []struct {
		m1, m2, dm, a float64
	}{
		{12, 8, 0.5, 1},
		{12, 8, 2, 1},
		{12, 8, 5, 3},
		{12, 8, 9.9, 1},    // just below M/2 = 10: bound, a' = 50.5 a
		{12, 8, 9.999, 1},  // very close to M/2
		{12, 8, 10.001, 1}, // just above M/2: unbound
		{12, 8, 10.1, 1},
		{12, 8, 11, 1},
		{25, 25, 12, 0.1},
		{25, 25, 23.6, 0.1},
	} {
		m := c.m1 + c.m2
		for _, anom := range []float64{0, 1.3, 4} {
			res := Supernova(Orbit{A: c.a, E: 0}, c.m1, c.m1-c.dm, c.m2, Vec3{}, anom)
			bound := c.dm < m/2
			if res.Bound != bound {
				t.Errorf("%+v: Bound = %v, want %v", c, res.Bound, bound)
				continue
			}
			vorb := math.Sqrt(gmTest * m / c.a)
			wantV := c.dm * c.m2 * vorb / (m * (m - c.dm))
			if math.Abs(res.SystemicSpeed-wantV) > 1e-12*wantV {
				t.Errorf("%+v: systemic speed %.12g km/s, want %.12g", c, res.SystemicSpeed, wantV)
			}
			if math.Abs(res.Tilt) > 1e-15 {
				t.Errorf("%+v: tilt %g without a kick", c, res.Tilt)
			}
			if !bound {
				if res.Orbit != (Orbit{}) {
					t.Errorf("%+v: unbound but Orbit = %+v", c, res.Orbit)
				}
				continue
			}
			wantE := c.dm / (m - c.dm)
			wantA := c.a * (m - c.dm) / (m - 2*c.dm)
			// Relative tolerance grows as the orbit nears disruption (a' ∝ 1/(M-2dM)).
			tol := 1e-12 * m / (m - 2*c.dm)
			if math.Abs(res.Orbit.E-wantE) > tol || math.Abs(res.Orbit.A/wantA-1) > tol {
				t.Errorf("%+v: orbit %+v, want a = %.12g, e = %.12g", c, res.Orbit, wantA, wantE)
			}
		}
	}
}

// TestSupernovaNothingChanges: no mass lost and no kick leaves the orbit,
// and the centre of mass, as they were (identity).
func TestSupernovaNothingChanges(t *testing.T) {
	for _, o := range []Orbit{{1, 0}, {3, 0.4}, {0.05, 0.95}} {
		for _, anom := range []float64{0, 1, 2, 3, 4, 5, 6} {
			res := Supernova(o, 10, 10, 7, Vec3{}, anom)
			if !res.Bound || math.Abs(res.Orbit.A/o.A-1) > 1e-12 || math.Abs(res.Orbit.E-o.E) > 1e-12 ||
				res.SystemicSpeed > 1e-12 {
				t.Errorf("orbit %+v at M = %g: got %+v", o, anom, res)
			}
		}
	}
}

// TestSupernovaEccentricNoKick: mass loss at periastron or apastron of an
// eccentric orbit. The separation r and speed v at the explosion are
// unchanged, so vis-viva gives 1/a' = 2/r - v^2/(G M') with v^2 = G M
// (2/r - 1/a) (analytic), and since v is perpendicular to r there, r is an
// apsis of the new orbit: e' = |1 - r/a'|.
func TestSupernovaEccentricNoKick(t *testing.T) {
	for _, c := range []struct{ a, e, m1, m1n, m2 float64 }{
		{1, 0.3, 15, 10, 10},
		{2, 0.7, 20, 6, 14},
		{0.5, 0.9, 8, 1.4, 1.3},
	} {
		m, mn := c.m1+c.m2, c.m1n+c.m2
		for _, anom := range []float64{0, math.Pi} {
			r := c.a * (1 - c.e)
			if anom != 0 {
				r = c.a * (1 + c.e)
			}
			v2 := gmTest * m * (2/r - 1/c.a)
			inv := 2/r - v2/(gmTest*mn)
			res := Supernova(Orbit{c.a, c.e}, c.m1, c.m1n, c.m2, Vec3{}, anom)
			if (inv > 0) != res.Bound {
				t.Errorf("%+v at M = %g: Bound = %v, vis-viva 1/a' = %g", c, anom, res.Bound, inv)
				continue
			}
			if !res.Bound {
				continue
			}
			wantA := 1 / inv
			wantE := math.Abs(1 - r/wantA)
			if math.Abs(res.Orbit.A/wantA-1) > 1e-12 || math.Abs(res.Orbit.E-wantE) > 1e-12 {
				t.Errorf("%+v at M = %g: orbit %+v, want a = %.12g, e = %.12g", c, anom, res.Orbit, wantA, wantE)
			}
		}
	}
}

// TestSupernovaBookkeeping: for random orbits, phases and kicks, the
// returned orbit must carry the specific energy and angular momentum of the
// post-explosion state vector, built here independently:
// eps = v'^2/2 - G M'/r = -G M'/(2 a'), |h| = |r x v'| = sqrt(G M' a' (1-e'^2)),
// and the systemic velocity must be the total momentum over M'
// (Newtonian two-body mechanics).
func TestSupernovaBookkeeping(t *testing.T) {
	src := rand.New(rand.NewPCG(1961, 265))
	var nBound int
	for range 2000 {
		a := math.Exp(src.Float64()*8 - 3)
		e := 0.95 * src.Float64()
		m1 := 8 + 40*src.Float64()
		m2 := 1 + 40*src.Float64()
		m1n := 1.2 + (m1-1.2)*src.Float64()
		anom := 2 * math.Pi * src.Float64()
		kick := Vec3{100 * src.NormFloat64(), 100 * src.NormFloat64(), 100 * src.NormFloat64()}
		res := Supernova(Orbit{A: a, E: e}, m1, m1n, m2, kick, anom)

		m, mn := m1+m2, m1n+m2
		r, v := state(a, e, m, anom)
		vn := [3]float64{v[0] + kick[0], v[1] + kick[1], v[2] + kick[2]}
		rr := math.Sqrt(dot3(r, r))
		eps := 0.5*dot3(vn, vn) - gmTest*mn/rr
		h := cross3(r, vn)
		hh := math.Sqrt(dot3(h, h))
		// Momentum in the old centre-of-mass frame.
		var p [3]float64
		for i := range p {
			v1 := m2/m*v[i] + kick[i]
			v2 := -m1 / m * v[i]
			p[i] = (m1n*v1 + m2*v2) / mn
		}
		for i := range p {
			if math.Abs(res.Systemic[i]-p[i]) > 1e-9*(1+math.Abs(p[i])) {
				t.Fatalf("systemic %v, momentum/M' %v", res.Systemic, p)
			}
		}
		if math.Abs(res.SystemicSpeed-math.Sqrt(dot3(p, p))) > 1e-9 {
			t.Fatalf("SystemicSpeed %g, |Systemic| %g", res.SystemicSpeed, math.Sqrt(dot3(p, p)))
		}
		if wantTilt := math.Acos(h[2] / hh); math.Abs(res.Tilt-wantTilt) > 1e-7 {
			t.Fatalf("tilt %g, want %g", res.Tilt, wantTilt)
		}
		scale := gmTest * mn / rr // energy scale of the state
		if math.Abs(eps) < 1e-9*scale {
			continue // marginal case, bound flag not decidable at this precision
		}
		if res.Bound != (eps < 0) {
			t.Fatalf("a=%g e=%g kick=%v: Bound = %v but eps = %g", a, e, kick, res.Bound, eps)
		}
		if !res.Bound {
			continue
		}
		nBound++
		gotEps := -gmTest * mn / (2 * res.Orbit.A)
		if math.Abs(gotEps-eps) > 1e-10*scale {
			t.Errorf("energy: from orbit %.12g, from state %.12g", gotEps, eps)
		}
		gotH := math.Sqrt(gmTest * mn * res.Orbit.A * (1 - res.Orbit.E*res.Orbit.E))
		if math.Abs(gotH-hh) > 1e-8*math.Sqrt(gmTest*mn*rr) {
			t.Errorf("angular momentum: from orbit %.12g, from state %.12g (orbit %+v)", gotH, hh, res.Orbit)
		}
	}
	if nBound < 200 {
		t.Errorf("only %d bound cases: the test sample does not exercise bound orbits", nBound)
	}
}

// TestSupernovaSurvivalCircular: for a circular orbit and kicks of fixed
// speed w in isotropic directions, the binary stays bound iff
// |v + w|^2 < 2 G M'/a, i.e. cos(theta) < c* = (2GM'/a - v^2 - w^2)/(2 v w)
// with cos(theta) uniform on [-1, 1]: P = (1 + c*)/2 clamped to [0, 1]
// (analytic; cf. Brandt & Podsiadlowski 1995, MNRAS 274, 461, from memory).
// The observed fraction must lie within 4 binomial standard deviations.
func TestSupernovaSurvivalCircular(t *testing.T) {
	const n = 20000
	src := rand.New(rand.NewPCG(1995, 461))
	for _, c := range []struct{ a, m1, m1n, m2, w float64 }{
		{1, 10, 1.4, 10, 150},
		{1, 10, 1.4, 10, 50},
		{0.1, 30, 10, 20, 300},
		{5, 15, 1.3, 3, 20},
	} {
		vc2 := gmTest * (c.m1 + c.m2) / c.a
		esc2 := 2 * gmTest * (c.m1n + c.m2) / c.a
		cs := (esc2 - vc2 - c.w*c.w) / (2 * math.Sqrt(vc2) * c.w)
		want := math.Max(0, math.Min(1, (1+cs)/2))
		var nb int
		for range n {
			var d Vec3
			for {
				d = Vec3{src.NormFloat64(), src.NormFloat64(), src.NormFloat64()}
				if l := d.Norm(); l > 0 {
					d = d.scale(c.w / l)
					break
				}
			}
			if SupernovaRandom(Orbit{A: c.a}, c.m1, c.m1n, c.m2, d, src).Bound {
				nb++
			}
		}
		got := float64(nb) / n
		sigma := math.Sqrt(want * (1 - want) / n)
		if math.Abs(got-want) > 4*sigma+1e-12 {
			t.Errorf("%+v: bound fraction %.4f, analytic %.4f (sigma %.4f)", c, got, want, sigma)
		}
	}
}

// TestSupernovaSurvivalEccentric compares the bound fraction for eccentric
// orbits and Maxwellian kicks (sigma 265 km/s, Hobbs et al. 2005, MNRAS 360,
// 974) with a brute-force Monte Carlo written here: bodies placed at a time
// drawn uniformly over the orbit, Cartesian positions and velocities of
// both stars, kick added, and the bound test on the total two-body energy in
// the new centre-of-mass frame. Independent random streams; the fractions
// must agree within 4 binomial standard deviations of their difference.
func TestSupernovaSurvivalEccentric(t *testing.T) {
	const n = 40000
	const sigma = 265.0
	for _, c := range []struct{ a, e, m1, m1n, m2 float64 }{
		{2, 0.5, 12, 1.4, 8},
		{0.3, 0.8, 20, 8, 25},
		{10, 0.2, 40, 20, 30},
	} {
		maxwell := func(src *rand.Rand) Vec3 {
			return Vec3{sigma * src.NormFloat64(), sigma * src.NormFloat64(), sigma * src.NormFloat64()}
		}
		srcA := rand.New(rand.NewPCG(7, 1))
		var nA int
		for range n {
			k := maxwell(srcA)
			if SupernovaRandom(Orbit{c.a, c.e}, c.m1, c.m1n, c.m2, k, srcA).Bound {
				nA++
			}
		}
		srcB := rand.New(rand.NewPCG(7, 2))
		var nB int
		m := c.m1 + c.m2
		for range n {
			// Brute force: time uniform over the orbit <=> mean anomaly uniform.
			k := maxwell(srcB)
			r, v := state(c.a, c.e, m, 2*math.Pi*srcB.Float64())
			var x1, x2, u1, u2 [3]float64
			for i := range 3 {
				x1[i], x2[i] = c.m2/m*r[i], -c.m1/m*r[i]
				u1[i], u2[i] = c.m2/m*v[i]+k[i], -c.m1/m*v[i]
			}
			mn := c.m1n + c.m2
			var vcm [3]float64
			for i := range 3 {
				vcm[i] = (c.m1n*u1[i] + c.m2*u2[i]) / mn
				u1[i] -= vcm[i]
				u2[i] -= vcm[i]
			}
			d := [3]float64{x1[0] - x2[0], x1[1] - x2[1], x1[2] - x2[2]}
			energy := 0.5*c.m1n*dot3(u1, u1) + 0.5*c.m2*dot3(u2, u2) - gmTest*c.m1n*c.m2/math.Sqrt(dot3(d, d))
			if energy < 0 {
				nB++
			}
		}
		fa, fb := float64(nA)/n, float64(nB)/n
		p := 0.5 * (fa + fb)
		sd := math.Sqrt(2 * p * (1 - p) / n)
		if math.Abs(fa-fb) > 4*sd || p == 0 {
			t.Errorf("%+v: bound fraction %.4f, brute force %.4f (sd of difference %.4f)", c, fa, fb, sd)
		}
	}
}

// TestSupernovaVelocitiesAtInfinity integrates the post-explosion relative
// orbit, d^2r/dt^2 = -G M' r / r^3 (RK4 with steps a small fraction of the
// local dynamical and crossing times), from the test's own state vector out
// to 1e7 times the initial separation, and compares each body's final
// velocity, systemic velocity plus its mass share of the relative velocity,
// with the returned speeds at infinity (Newtonian two-body mechanics). The
// residual deceleration beyond that radius is below 1e-6 of the speed.
func TestSupernovaVelocitiesAtInfinity(t *testing.T) {
	for _, c := range []struct {
		o           Orbit
		m1, m1n, m2 float64
		kick        Vec3
		anom        float64
	}{
		{Orbit{1, 0}, 12, 1.4, 8, Vec3{0, 0, 0}, 0},           // Blaauw disruption
		{Orbit{1, 0.3}, 12, 1.4, 8, Vec3{300, -200, 150}, 1},  // outgoing
		{Orbit{0.5, 0.6}, 20, 8, 15, Vec3{-250, 50, -400}, 5}, // approaching periastron
		{Orbit{3, 0.9}, 30, 10, 10, Vec3{0, 0, 500}, 3.5},     // kick out of the plane
		{Orbit{2, 0.5}, 15, 1.3, 2, Vec3{-100, -600, 0}, 4.5}, // in-plane, swings round
	} {
		res := Supernova(c.o, c.m1, c.m1n, c.m2, c.kick, c.anom)
		if res.Bound {
			t.Fatalf("%+v: expected a disruption", c)
		}
		m, mn := c.m1+c.m2, c.m1n+c.m2
		r, v := state(c.o.A, c.o.E, m, c.anom)
		for i := range 3 {
			v[i] += c.kick[i]
		}
		mu := gmTest * mn
		acc := func(r [3]float64) [3]float64 {
			d := math.Sqrt(dot3(r, r))
			k := -mu / (d * d * d)
			return [3]float64{k * r[0], k * r[1], k * r[2]}
		}
		r0 := math.Sqrt(dot3(r, r))
		for math.Sqrt(dot3(r, r)) < 1e7*r0 {
			d := math.Sqrt(dot3(r, r))
			s := math.Sqrt(dot3(v, v))
			h := 2e-3 * math.Min(d/s, math.Sqrt(d*d*d/mu))
			// Classical RK4 on (r, v).
			k1r, k1v := v, acc(r)
			var r2, r3, r4, v2, v3, v4 [3]float64
			for i := range 3 {
				r2[i], v2[i] = r[i]+h/2*k1r[i], v[i]+h/2*k1v[i]
			}
			k2r, k2v := v2, acc(r2)
			for i := range 3 {
				r3[i], v3[i] = r[i]+h/2*k2r[i], v[i]+h/2*k2v[i]
			}
			k3r, k3v := v3, acc(r3)
			for i := range 3 {
				r4[i], v4[i] = r[i]+h*k3r[i], v[i]+h*k3v[i]
			}
			k4r, k4v := v4, acc(r4)
			for i := range 3 {
				r[i] += h / 6 * (k1r[i] + 2*k2r[i] + 2*k3r[i] + k4r[i])
				v[i] += h / 6 * (k1v[i] + 2*k2v[i] + 2*k3v[i] + k4v[i])
			}
		}
		var u1, u2 [3]float64
		for i := range 3 {
			u1[i] = res.Systemic[i] + c.m2/mn*v[i]
			u2[i] = res.Systemic[i] - c.m1n/mn*v[i]
		}
		s1, s2 := math.Sqrt(dot3(u1, u1)), math.Sqrt(dot3(u2, u2))
		scale := res.SystemicSpeed + math.Sqrt(dot3(v, v))
		if math.Abs(res.VInfExploder-s1) > 1e-5*scale || math.Abs(res.VInfCompanion-s2) > 1e-5*scale {
			t.Errorf("%+v: speeds at infinity %.6f, %.6f km/s; integration gives %.6f, %.6f",
				c, res.VInfExploder, res.VInfCompanion, s1, s2)
		}
	}
}

// TestSupernovaNoRemnant: when the exploding star leaves nothing, the
// companion flies off with its orbital velocity, m1/M of the relative
// velocity (circular orbit: v_rel = sqrt(G M / a), analytic).
func TestSupernovaNoRemnant(t *testing.T) {
	res := Supernova(Orbit{A: 2}, 60, 0, 20, Vec3{}, 0.7)
	want := 60.0 / 80 * math.Sqrt(gmTest*80/2)
	if res.Bound || math.Abs(res.VInfCompanion-want) > 1e-12*want || res.VInfExploder != 0 ||
		math.Abs(res.SystemicSpeed-want) > 1e-12*want {
		t.Errorf("no remnant: %+v, want companion speed %.10g", res, want)
	}
}

func TestSupernovaInvalid(t *testing.T) {
	for _, c := range []struct {
		o           Orbit
		m1, m1n, m2 float64
	}{
		{Orbit{0, 0}, 10, 1.4, 5},
		{Orbit{1, 1}, 10, 1.4, 5},
		{Orbit{1, -0.1}, 10, 1.4, 5},
		{Orbit{1, 0}, 0, 0, 5},
		{Orbit{1, 0}, 10, -1, 5},
		{Orbit{1, 0}, 10, 1.4, 0},
		{Orbit{math.NaN(), 0}, 10, 1.4, 5},
	} {
		res := Supernova(c.o, c.m1, c.m1n, c.m2, Vec3{}, 0)
		if res.Bound || !math.IsNaN(res.SystemicSpeed) || !math.IsNaN(res.Orbit.A) {
			t.Errorf("%+v: got %+v, want NaN fields", c, res)
		}
	}
}

// TestSupernovaRandomPhase: SupernovaRandom explodes at mean anomaly
// 2 pi u with u the next uniform draw of src.
func TestSupernovaRandomPhase(t *testing.T) {
	a := rand.New(rand.NewPCG(11, 12))
	b := rand.New(rand.NewPCG(11, 12))
	o := Orbit{A: 1.5, E: 0.6}
	for range 100 {
		got := SupernovaRandom(o, 14, 1.4, 9, Vec3{50, 0, 10}, a)
		want := Supernova(o, 14, 1.4, 9, Vec3{50, 0, 10}, 2*math.Pi*b.Float64())
		if got != want {
			t.Fatalf("SupernovaRandom %+v, Supernova at the drawn phase %+v", got, want)
		}
	}
}
