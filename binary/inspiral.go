package binary

import (
	"math"
	"sync"
)

// Exponents and coefficients of Peters (1964, Phys. Rev. 136, B1224).
const (
	petersAlpha = 121.0 / 304.0   // e^2 coefficient in a(e) and de/dt
	petersExpA  = 870.0 / 2299.0  // exponent of (1 + alpha e^2) in a(e)
	petersExpI  = 1181.0 / 2299.0 // exponent of (1 + alpha e^2) in the time integral
)

// MergeTime returns the time in Myr for gravitational radiation to bring a
// binary of point masses m1 and m2 (Msun) with semi-major axis aAU (AU) and
// eccentricity e to coalescence, from the orbit-averaged equations of Peters
// (1964, Phys. Rev. 136, B1224).
//
// For a circular orbit the time is T_c = a^4 / (4 beta), beta = (64/5) G^3
// m1 m2 (m1+m2) / c^5. For e > 0, Peters' relation a(e) = c0 e^(12/19) /
// (1-e^2) (1 + 121/304 e^2)^(870/2299), with c0 fixed by (aAU, e), gives
//
//	T = (12/19) c0^4/beta ∫_0^e x^(29/19) (1 + 121/304 x^2)^(1181/2299) / (1-x^2)^(3/2) dx.
//
// MergeTime evaluates T = T_c s^7 G(s) with s = sqrt(1-e^2), where the
// dimensionless G(s) = T / (T_c (1-e^2)^(7/2)) is analytic on 0 <= s <= 1,
// with G = 1 at e = 0 and G = 768/425 at e = 1 (the e -> 1 form T ≈ (768/425)
// T_c (1-e^2)^(7/2) of Peters 1964). G is represented by a Chebyshev series
// in s fitted to the integral computed by double-exponential quadrature;
// the series is accurate to a few 1e-15 relative (see petersTerms), so
// MergeTime keeps that accuracy for all 0 <= e <= 1, including e -> 1, and
// costs a few tens of nanoseconds. e = 0 gives T_c exactly and e = 1 gives 0.
//
// It returns NaN unless m1 > 0, m2 > 0, aAU >= 0 and 0 <= e <= 1.
func MergeTime(m1, m2, aAU, e float64) float64 {
	if !(m1 > 0) || !(m2 > 0) || !(aAU >= 0) || !(e >= 0 && e <= 1) {
		return math.NaN()
	}
	a2 := aAU * aAU
	tc := petersCirc * a2 * a2 / (m1 * m2 * (m1 + m2))
	if e == 0 {
		return tc
	}
	s2 := (1 - e) * (1 + e)
	s := math.Sqrt(s2)
	return tc * s2 * s2 * s2 * s * petersSeries().eval(s)
}

// MergeTimeGyr is MergeTime in Gyr.
func MergeTimeGyr(m1, m2, aAU, e float64) float64 { return MergeTime(m1, m2, aAU, e) / 1e3 }

// The Chebyshev series of G(s) is fitted at petersNodes points and
// truncated to petersTerms terms. G is analytic in s within the Bernstein
// ellipse through the nearest singularity, 1 + alpha e^2 = 0 at s =
// 1.874 (x = 2s-1 = 2.75, rho = 5.3), so the coefficients fall by about
// 1/rho per term: c_20 is 1.2e-14 and the later coefficients are at the
// rounding level (about 1e-15) of the quadrature values. Dropping them
// keeps the truncation error near 1e-15 without fitting that noise.
const (
	petersNodes = 32
	petersTerms = 22
)

// chebyshev is a Chebyshev series sum c[k] T_k(2s-1) on 0 <= s <= 1.
type chebyshev [petersTerms]float64

// eval sums the series at s by Clenshaw's recurrence.
func (c *chebyshev) eval(s float64) float64 {
	x := 2*s - 1
	var b1, b2 float64
	for k := petersTerms - 1; k >= 1; k-- {
		b1, b2 = 2*x*b1-b2+c[k], b1
	}
	return x*b1 - b2 + c[0]
}

// petersSeries returns the Chebyshev series of G(s), computed once on first
// use (a few milliseconds) from petersG at the Chebyshev points of the
// first kind; it is never modified afterwards.
var petersSeries = sync.OnceValue(func() *chebyshev {
	var f [petersNodes]float64
	for j := range f {
		s := 0.5 * (1 + math.Cos(math.Pi*(float64(j)+0.5)/petersNodes))
		f[j] = petersG(s)
	}
	c := new(chebyshev)
	for k := range c {
		var sum float64
		for j := range f {
			sum += f[j] * math.Cos(math.Pi*float64(k)*(float64(j)+0.5)/petersNodes)
		}
		c[k] = 2 * sum / petersNodes
	}
	c[0] /= 2
	return c
})

// petersG returns G(s) = T / (T_c s^7), s = sqrt(1-e^2), 0 < s < 1, by
// quadrature of Peters' integral. With x = sqrt(1-t^2),
//
//	I(e) = ∫_0^e x^(29/19) (1 + alpha x^2)^p / (1-x^2)^(3/2) dx = ∫_s^1 g(t) / t^2 dt,
//
// g(t) = x^(10/19) (1 + alpha x^2)^p, p = 1181/2299. The part A0/t^2, A0 =
// g(0) = (1+alpha)^p, is integrated exactly, which leaves a bounded
// integrand (with an integrable (1-t)^(5/19) endpoint behaviour at t = 1,
// handled by the double-exponential rule). Then
//
//	G = (48/19) s e^(-48/19) (1 + alpha e^2)^(-3480/2299) I(e).
func petersG(s float64) float64 {
	a0 := math.Pow(1+petersAlpha, petersExpI)
	rest := tanhSinh(func(t float64) float64 {
		x2 := (1 - t) * (1 + t)
		g := math.Pow(x2, 5.0/19.0) * math.Pow(1+petersAlpha*x2, petersExpI)
		return (g - a0) / (t * t)
	}, s, 1, 1e-15)
	integral := a0*(1-s)/s + rest
	e2 := (1 - s) * (1 + s)
	return 48.0 / 19.0 * s * math.Pow(e2, -24.0/19.0) *
		math.Pow(1+petersAlpha*e2, -4*petersExpA) * integral
}

// tanhSinh integrates f over [a, b] with the double-exponential (tanh-sinh)
// rule of Takahasi & Mori (1974, Publ. RIMS Kyoto Univ. 9, 721), halving the
// step until two successive estimates agree to the relative tolerance tol
// (or 12 halvings). Nodes near the ends are formed from their distance to the
// end, so integrable endpoint singularities are handled.
func tanhSinh(f func(float64) float64, a, b, tol float64) float64 {
	const tMax = 3.5
	c, d := 0.5*(a+b), 0.5*(b-a)
	// term returns the contribution of the nodes at +t and -t (t > 0).
	term := func(t float64) float64 {
		u := 0.5 * math.Pi * math.Sinh(t)
		ch := math.Cosh(u)
		w := 0.5 * math.Pi * math.Cosh(t) / (ch * ch)
		delta := 1 / (math.Exp(u) * ch) // 1 - tanh(u)
		return w * (f(b-d*delta) + f(a+d*delta))
	}
	h := 1.0
	sum := 0.5 * math.Pi * f(c)
	for t := h; t <= tMax; t += h {
		sum += term(t)
	}
	est := d * h * sum
	for level := 1; level <= 12; level++ {
		h /= 2
		for t := h; t <= tMax; t += 2 * h {
			sum += term(t)
		}
		next := d * h * sum
		if level >= 3 && math.Abs(next-est) <= tol*math.Abs(next) {
			return next
		}
		est = next
	}
	return est
}
