package binary

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// Constants for the reference calculations, written out here: G M_sun
// (IAU 2015 B3), c (SI), AU (IAU 2012), Julian year.
const (
	gmSI   = 1.3271244e20
	cSI    = 299792458.0
	auSI   = 1.495978707e11
	myrSI  = 1e6 * 365.25 * 86400
	alphaP = 121.0 / 304.0 // Peters (1964)
)

// betaSI is Peters' (1964) beta = (64/5) G^3 m1 m2 (m1+m2) / c^5 in m^4/s.
func betaSI(m1, m2 float64) float64 {
	return 64.0 / 5.0 * gmSI * gmSI * gmSI * m1 * m2 * (m1 + m2) / (cSI * cSI * cSI * cSI * cSI)
}

// glNodes are 30-point Gauss-Legendre nodes and weights on [-1, 1] from
// gonum's integrate/quad (a general-purpose reference library).
var glNodes, glWeights = func() ([]float64, []float64) {
	x, w := make([]float64, 30), make([]float64, 30)
	quad.Legendre{}.FixedLocations(x, w, -1, 1)
	return x, w
}()

func gaussLegendre(f func(float64) float64, a, b float64) float64 {
	c, d := 0.5*(a+b), 0.5*(b-a)
	var s float64
	for i, x := range glNodes {
		s += glWeights[i] * f(c+d*x)
	}
	return d * s
}

// graded integrates f over [a, b] with 30-point Gauss-Legendre on a mesh
// refined geometrically (ratio 2) towards a over depthA levels and towards
// b over depthB levels, so that every panel is at least its own width away
// from an endpoint singularity: the composite rule then converges
// exponentially for integrands with algebraic endpoint singularities or
// with a pole just beyond an end.
func graded(f func(float64) float64, a, b float64, depthA, depthB int) float64 {
	m := 0.5 * (a + b)
	var s float64
	w := m - a
	for k := range depthA {
		s += gaussLegendre(f, a+w/math.Ldexp(1, k+1), a+w/math.Ldexp(1, k))
	}
	s += gaussLegendre(f, a, a+w/math.Ldexp(1, depthA))
	w = b - m
	for k := range depthB {
		s += gaussLegendre(f, b-w/math.Ldexp(1, k), b-w/math.Ldexp(1, k+1))
	}
	s += gaussLegendre(f, b-w/math.Ldexp(1, depthB), b)
	return s
}

// refMergeTime is the Peters (1964) merger time in Myr computed directly
// from T = (12/19) c0^4/beta ∫_0^e x^(29/19) (1+121/304 x^2)^(1181/2299) /
// (1-x^2)^(3/2) dx with c0 = a (1-e^2) e^(-12/19) (1+121/304 e^2)^(-870/2299),
// by graded Gauss-Legendre quadrature in e (independent of the package's
// change of variable and Chebyshev series). For e > 1/2 the variable is
// y = 1 - x, which keeps 1 - x^2 = y (2 - y) in full relative precision as
// e -> 1.
func refMergeTime(m1, m2, aAU, e float64) float64 {
	a := aAU * auSI
	beta := betaSI(m1, m2)
	if e == 0 {
		return a * a * a * a / (4 * beta) / myrSI
	}
	// Integrand with 1 - x^2 passed as (1-x)(1+x) in full relative precision.
	f := func(x, oneMinusX float64) float64 {
		return math.Pow(x, 29.0/19.0) * math.Pow(1+alphaP*x*x, 1181.0/2299.0) /
			math.Pow(oneMinusX*(1+x), 1.5)
	}
	var integral float64
	if e <= 0.5 {
		// In x: singular at x = 0, the pole at x = 1 is far.
		integral = graded(func(x float64) float64 { return f(x, 1-x) }, 0, e, 60, 0)
	} else {
		// In y = 1 - x, so that nodes near the pole keep their distance
		// to it exactly; the pole at y = 0 lies 1-e below the lower end.
		d := 1 - e
		depthA := max(0, int(math.Ceil(math.Log2(0.5*e/d)))+1)
		integral = graded(func(y float64) float64 { return f(1-y, y) }, d, 1, depthA, 60)
	}
	c0 := a * (1 - e) * (1 + e) / (math.Pow(e, 12.0/19.0) * math.Pow(1+alphaP*e*e, 870.0/2299.0))
	return 12.0 / 19.0 * c0 * c0 * c0 * c0 / beta * integral / myrSI
}

// TestMergeTimeCircular: T_c = a^4 / (4 beta) (Peters 1964), recomputed.
func TestMergeTimeCircular(t *testing.T) {
	for _, c := range []struct{ m1, m2, a float64 }{
		{1.4, 1.4, 0.01}, {10, 10, 0.1}, {30, 1.3, 0.05}, {60, 45, 1}, {1, 1, 1e-4},
	} {
		a := c.a * auSI
		want := a * a * a * a / (4 * betaSI(c.m1, c.m2)) / myrSI
		if got := MergeTime(c.m1, c.m2, c.a, 0); math.Abs(got-want) > 1e-13*want {
			t.Errorf("MergeTime(%g, %g, %g, 0) = %.15g Myr, want %.15g", c.m1, c.m2, c.a, got, want)
		}
		if got := MergeTimeGyr(c.m1, c.m2, c.a, 0); math.Abs(got-want/1e3) > 1e-13*want/1e3 {
			t.Errorf("MergeTimeGyr(%g, %g, %g, 0) = %.15g Gyr, want %.15g", c.m1, c.m2, c.a, got, want/1e3)
		}
	}
}

// TestMergeTimeAgainstQuadrature checks the fast Chebyshev path against
// the direct quadrature of Peters' integral over e in [0, 0.999] and
// closer to 1, to 1e-12 relative.
func TestMergeTimeAgainstQuadrature(t *testing.T) {
	es := []float64{1e-12, 1e-8, 1e-5, 1e-3, 0.9995, 1 - 1e-4, 1 - 1e-6, 1 - 1e-8}
	for i := 1; i <= 999; i += 2 {
		es = append(es, float64(i)/1000)
	}
	var worst float64
	for _, e := range es {
		got, want := MergeTime(1.4, 1.3, 0.02, e), refMergeTime(1.4, 1.3, 0.02, e)
		rel := math.Abs(got/want - 1)
		worst = max(worst, rel)
		if rel > 1e-13 {
			t.Errorf("e = %.10g: MergeTime %.15g Myr, quadrature %.15g (rel %.2g)", e, got, want, rel)
		}
	}
	t.Logf("largest relative difference from the quadrature: %.2g", worst)
}

// TestMergeTimePetersODE integrates Peters' orbit-averaged equations
// (Peters 1964, eqs. 5.6-5.7; from memory, as in REFERENCES.md)
//
//	da/dt = -(64/5) b / (a^3 (1-e^2)^(7/2)) (1 + 73/24 e^2 + 37/96 e^4)
//	de/dt = -(304/15) b e / (a^4 (1-e^2)^(5/2)) (1 + 121/304 e^2),
//
// b = G^3 m1 m2 (m1+m2) / c^5, with RK4 in u = ln e down to e = 1e-5, and
// adds the circular time a^4 / (4 (64/5) b) of the remaining, nearly
// circular orbit (relative error O(e^2) = 1e-10 of that remainder). This
// checks the integral form and its constants against the raw equations.
func TestMergeTimePetersODE(t *testing.T) {
	for _, c := range []struct{ m1, m2, aAU, e float64 }{
		{1.4398, 1.3886, 0.013, 0.6171340},
		{10, 8, 0.1, 0.3},
		{30, 25, 0.5, 0.9},
		{1.4, 1.2, 0.02, 0.05},
	} {
		b := betaSI(c.m1, c.m2) * 5 / 64
		da := func(a, e float64) float64 {
			e2 := e * e
			return 12.0 / 19.0 * a * (1 + 73.0/24.0*e2 + 37.0/96.0*e2*e2) / ((1 - e2) * (1 + alphaP*e2))
		}
		dt := func(a, e float64) float64 {
			e2 := e * e
			return -15.0 / 304.0 * a * a * a * a * math.Pow(1-e2, 2.5) / (b * (1 + alphaP*e2))
		}
		u0, u1 := math.Log(c.e), math.Log(1e-5)
		const n = 20000
		h := (u1 - u0) / n
		a, tm := c.aAU*auSI, 0.0
		for i := range n {
			u := u0 + float64(i)*h
			e0, em, e1 := math.Exp(u), math.Exp(u+h/2), math.Exp(u+h)
			k1a, k1t := da(a, e0), dt(a, e0)
			k2a, k2t := da(a+h/2*k1a, em), dt(a+h/2*k1a, em)
			k3a, k3t := da(a+h/2*k2a, em), dt(a+h/2*k2a, em)
			k4a, k4t := da(a+h*k3a, e1), dt(a+h*k3a, e1)
			a += h / 6 * (k1a + 2*k2a + 2*k3a + k4a)
			tm += h / 6 * (k1t + 2*k2t + 2*k3t + k4t)
		}
		tm += a * a * a * a / (4 * 64.0 / 5.0 * b)
		want := tm / myrSI
		if got := MergeTime(c.m1, c.m2, c.aAU, c.e); math.Abs(got/want-1) > 1e-8 {
			t.Errorf("%+v: MergeTime %.12g Myr, integrated Peters equations %.12g", c, got, want)
		}
	}
}

// TestMergeTimeNearlyRadial checks the e -> 1 limit T ≈ (768/425) T_c
// (1-e^2)^(7/2) (Peters 1964, from memory) and its first correction. With
// s = sqrt(1-e^2), t = sqrt(1-x^2) turns the integral into ∫_s^1 g(t)/t^2 dt,
// g = x^(10/19) (1 + alpha x^2)^(1181/2299), which is A0/s + C + O(s) with
// A0 = g(0) = (1+alpha)^(1181/2299) and C = ∫_0^1 (g - A0)/t^2 dt - A0
// (analytic expansion, C by quadrature here). The prefactor of T/T_c is
// 1 + O(s^2) near s = 0, so T / ((768/425) T_c s^7) = 1 + (C/A0) s + O(s^2).
func TestMergeTimeNearlyRadial(t *testing.T) {
	a0 := math.Pow(1+alphaP, 1181.0/2299.0)
	r := func(tt float64) float64 {
		x2 := (1 - tt) * (1 + tt)
		return (math.Pow(x2, 5.0/19.0)*math.Pow(1+alphaP*x2, 1181.0/2299.0) - a0) / (tt * tt)
	}
	slope := (graded(r, 0, 1, 0, 60) - a0) / a0
	for _, s := range []float64{1e-2, 1e-3, 1e-4, 1e-5} {
		e := math.Sqrt(1 - s*s)
		sRecomputed := math.Sqrt((1 - e) * (1 + e))
		tc := MergeTime(20, 10, 0.3, 0)
		asym := 768.0 / 425.0 * tc * math.Pow(sRecomputed, 7)
		ratio := MergeTime(20, 10, 0.3, e) / asym
		if math.Abs(ratio-1) > 3*math.Abs(slope)*sRecomputed {
			t.Errorf("s = %g: T / asymptotic form = %.12g, not within O(s) of 1", s, ratio)
		}
		if got := (ratio - 1) / sRecomputed; math.Abs(got-slope) > 10*sRecomputed {
			t.Errorf("s = %g: (ratio - 1)/s = %.8g, first-order coefficient C/A0 = %.8g", s, got, slope)
		}
	}
	if got := MergeTime(20, 10, 0.3, 1); got != 0 {
		t.Errorf("MergeTime at e = 1 = %g, want 0", got)
	}
}

// TestMergeTimeBinaryPulsars: PSR B1913+16 with the parameters of Weisberg &
// Huang (2016, ApJ 829, 55): Peters' integral gives 300.6 Myr (REFERENCES.md,
// computed; the literature quotes ~300 Myr), required within 0.5%. The
// double pulsar J0737-3039 (parameters from memory: m = 1.338, 1.249 Msun,
// P_b = 0.10225156248 d, e = 0.0877775) "will merge in about 85 Myr"
// (Burgay et al. 2003, Nature 426, 531, verified): accept 80-90 Myr.
func TestMergeTimeBinaryPulsars(t *testing.T) {
	m1, m2 := 1.4398, 1.3886
	a := SeparationAU(0.322997448918, m1+m2)
	if got := MergeTime(m1, m2, a, 0.6171340); math.Abs(got/300.6-1) > 0.005 {
		t.Errorf("PSR B1913+16: %.2f Myr, want 300.6 within 0.5%%", got)
	}
	m1, m2 = 1.338, 1.249
	a = SeparationAU(0.10225156248, m1+m2)
	if got := MergeTime(m1, m2, a, 0.0877775); got < 80 || got > 90 {
		t.Errorf("PSR J0737-3039: %.2f Myr, want 80-90", got)
	}
}

// TestMergeTimeEdges: a = 0 has nothing left to inspiral (T ∝ a^4,
// Peters 1964); invalid parameters give NaN; near e = 0, T / T_c = 1 + O(e^2)
// (the expansion of Peters' integral, analytic), so e = 1e-9 must agree
// with the circular closed form to rounding.
func TestMergeTimeEdges(t *testing.T) {
	if got := MergeTime(10, 10, 0, 0.5); got != 0 {
		t.Errorf("a = 0: %g, want 0", got)
	}
	for _, c := range [][4]float64{
		{0, 1, 1, 0}, {1, -1, 1, 0}, {1, 1, -1, 0}, {1, 1, 1, -0.1}, {1, 1, 1, 1.1}, {1, 1, math.NaN(), 0},
	} {
		if got := MergeTime(c[0], c[1], c[2], c[3]); !math.IsNaN(got) {
			t.Errorf("MergeTime%v = %g, want NaN", c, got)
		}
	}
	// Continuity at e = 0, where the series takes over from the closed form.
	if got, tc := MergeTime(10, 10, 0.1, 1e-9), MergeTime(10, 10, 0.1, 0); math.Abs(got/tc-1) > 1e-14 {
		t.Errorf("e = 1e-9: %.17g, circular %.17g", got, tc)
	}
}

// TestPetersSeriesTail: a-posteriori truncation check of the Chebyshev
// series (for a function analytic in a Bernstein ellipse the truncation
// error is bounded by the sum of the dropped coefficients, which fall
// geometrically; Trefethen 2013, Approximation Theory and Approximation
// Practice, Thm 8.2): refitting with all petersNodes coefficients, the
// dropped ones must be at the rounding level.
func TestPetersSeriesTail(t *testing.T) {
	var f [petersNodes]float64
	for j := range f {
		f[j] = petersG(0.5 * (1 + math.Cos(math.Pi*(float64(j)+0.5)/petersNodes)))
	}
	var tail float64
	for k := petersTerms; k < petersNodes; k++ {
		var c float64
		for j := range f {
			c += f[j] * math.Cos(math.Pi*float64(k)*(float64(j)+0.5)/petersNodes)
		}
		tail += math.Abs(2 * c / petersNodes)
	}
	if tail > 2e-14 {
		t.Errorf("sum of dropped Chebyshev coefficients %.3g, want below 2e-14", tail)
	}
}
