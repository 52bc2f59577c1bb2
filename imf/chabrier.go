package imf

import (
	"math"
	"math/rand/v2"
)

// Parameters of the Chabrier (2003, PASP 115, 763) single-star IMF.
const (
	ChabrierMc    = 0.079 // characteristic mass m_c of the lognormal, Msun
	ChabrierSigma = 0.69  // width sigma of the lognormal in log10 m
	ChabrierKnee  = 1.0   // mass where the lognormal joins the power law, Msun
	ChabrierSlope = 2.3   // alpha of dN/dm ∝ m^-alpha above the knee
)

// Chabrier2003 is the single-star IMF of Chabrier (2003, PASP 115, 763),
// normalised over [MinMass, MaxMass] Msun:
//
//	dN/dlog10 m ∝ exp(-(log10 m - log10 Mc)^2 / (2 Sigma^2))   for m <= Knee,
//	dN/dm       ∝ m^-Slope                                       for m > Knee,
//
// continuous in dN/dm at the knee, with Mc = 0.079 Msun, Sigma = 0.69,
// Knee = 1 Msun and Slope = 2.3. The number and mass integrals of the
// lognormal part are error functions, evaluated in closed form; its
// Quantile is the root of the erf form, found to machine precision.
//
// Build it with NewChabrier2003; a value made by hand is not ready for use.
type Chabrier2003 struct {
	MinMass, MaxMass float64 // Msun
	Mc               float64 // Msun
	Sigma            float64 // dex
	Knee             float64 // Msun
	Slope            float64

	mu       float64 // log10 Mc
	xlo, xtp float64 // standardised lognormal coordinate at MinMass and at the top of the lognormal part
	philo    float64 // Phi(xlo)
	amp      float64 // normalised dN/dlog10 m at the lognormal peak
	numC     float64 // number fraction per unit of Phi difference
	massC    float64 // mass per star per unit of shifted-Phi difference, Msun
	shift    float64 // ln(10) Sigma, shift of the mass integrand's Gaussian
	fLN      float64 // number fraction in the lognormal part
	hasLN    bool
	hasPL    bool
	pl       segment // power-law part
	mean     float64
}

// NewChabrier2003 returns the Chabrier (2003, PASP 115, 763) single-star IMF
// over [min, max] Msun, with 0 < min < max < +Inf.
func NewChabrier2003(min, max float64) (*Chabrier2003, error) {
	if err := checkRange("Chabrier (2003)", min, max); err != nil {
		return nil, err
	}
	c := &Chabrier2003{
		MinMass: min, MaxMass: max,
		Mc: ChabrierMc, Sigma: ChabrierSigma, Knee: ChabrierKnee, Slope: ChabrierSlope,
	}
	c.init()
	return c, nil
}

// x returns the standardised lognormal coordinate of mass m.
func (c *Chabrier2003) x(m float64) float64 {
	return (math.Log10(m) - c.mu) / c.Sigma
}

func (c *Chabrier2003) init() {
	const sqrt2Pi = 2.5066282746310002 // sqrt(2 pi)
	c.mu = math.Log10(c.Mc)
	c.shift = math.Ln10 * c.Sigma
	c.hasLN = c.MinMass < c.Knee
	c.hasPL = c.MaxMass > c.Knee
	// Unnormalised: dN/dlog10 m = exp(-x^2/2), so dN/dm = exp(-x^2/2)/(m ln 10).
	var nLN, mLN float64
	if c.hasLN {
		top := math.Min(c.MaxMass, c.Knee)
		c.xlo, c.xtp = c.x(c.MinMass), c.x(top)
		c.philo = phi(c.xlo)
		// ∫ dN = Sigma sqrt(2 pi) [Phi(x)], and with 10^(mu + Sigma x)
		// = Mc exp(shift x): ∫ m dN = Sigma sqrt(2 pi) Mc exp(shift^2/2)
		// [Phi(x - shift)].
		c.numC = c.Sigma * sqrt2Pi
		c.massC = c.numC * c.Mc * math.Exp(c.shift*c.shift/2)
		nLN = c.numC * phiDiff(c.xlo, c.xtp)
		mLN = c.massC * phiDiff(c.xlo-c.shift, c.xtp-c.shift)
	}
	var nPL, mPL float64
	if c.hasPL {
		xk := c.x(c.Knee)
		dk := math.Exp(-xk*xk/2) / (c.Knee * math.Ln10) // dN/dm at the knee
		start := math.Max(c.MinMass, c.Knee)
		d := dk * math.Pow(start/c.Knee, -c.Slope)
		c.pl = newSegment(start, c.MaxMass, c.Slope, d)
		nPL, mPL = c.pl.num, c.pl.mass
	}
	k := 1 / (nLN + nPL)
	c.amp = k
	c.numC *= k
	c.massC *= k
	c.fLN = nLN * k
	if c.hasPL {
		c.pl.scale(k)
	}
	c.mean = (mLN + mPL) * k
}

// phi is the standard normal CDF, accurate in relative terms for x < 0.
func phi(x float64) float64 {
	return 0.5 * math.Erfc(-x/math.Sqrt2)
}

// phiDiff returns phi(b) - phi(a) for a <= b, avoiding cancellation in
// either tail.
func phiDiff(a, b float64) float64 {
	switch {
	case b <= 0:
		return 0.5 * (math.Erfc(-b/math.Sqrt2) - math.Erfc(-a/math.Sqrt2))
	case a >= 0:
		return 0.5 * (math.Erfc(a/math.Sqrt2) - math.Erfc(b/math.Sqrt2))
	default:
		return 0.5 * (math.Erf(b/math.Sqrt2) - math.Erf(a/math.Sqrt2))
	}
}

// Min returns MinMass, in Msun.
func (c *Chabrier2003) Min() float64 { return c.MinMass }

// Max returns MaxMass, in Msun.
func (c *Chabrier2003) Max() float64 { return c.MaxMass }

// Mean returns the mean stellar mass, in Msun.
func (c *Chabrier2003) Mean() float64 { return c.mean }

// Prob returns the normalised dN/dm at m, in 1/Msun; 0 outside
// [MinMass, MaxMass].
func (c *Chabrier2003) Prob(m float64) float64 {
	if !(m >= c.MinMass && m <= c.MaxMass) {
		return 0
	}
	if c.hasLN && m <= c.Knee {
		x := c.x(m)
		return c.amp * math.Exp(-x*x/2) / (m * math.Ln10)
	}
	return c.pl.prob(m)
}

// CDF returns the fraction of stars with mass below m.
func (c *Chabrier2003) CDF(m float64) float64 {
	if m <= c.MinMass {
		return 0
	}
	if m >= c.MaxMass {
		return 1
	}
	return c.NumberFraction(c.MinMass, m)
}

// NumberFraction returns the fraction of stars with lo <= m < hi.
func (c *Chabrier2003) NumberFraction(lo, hi float64) float64 {
	lo, hi = math.Max(lo, c.MinMass), math.Min(hi, c.MaxMass)
	if !(lo < hi) {
		return 0
	}
	sum := 0.0
	if c.hasLN && lo < c.Knee {
		sum += c.numC * phiDiff(c.x(lo), c.x(math.Min(hi, c.Knee)))
	}
	if c.hasPL && hi > c.Knee {
		sum += c.pl.number(math.Max(lo, c.pl.lo), hi)
	}
	return sum
}

// MassFraction returns the fraction of the total stellar mass in stars with
// lo <= m < hi.
func (c *Chabrier2003) MassFraction(lo, hi float64) float64 {
	lo, hi = math.Max(lo, c.MinMass), math.Min(hi, c.MaxMass)
	if !(lo < hi) {
		return 0
	}
	sum := 0.0
	if c.hasLN && lo < c.Knee {
		sum += c.massC * phiDiff(c.x(lo)-c.shift, c.x(math.Min(hi, c.Knee))-c.shift)
	}
	if c.hasPL && hi > c.Knee {
		sum += c.pl.massIn(math.Max(lo, c.pl.lo), hi)
	}
	return sum / c.mean
}

// Quantile returns the mass m with CDF(m) = p; NaN for p outside [0, 1].
// In the lognormal part it solves the erf form of the CDF by safeguarded
// Newton iteration to machine precision; in the power-law part it inverts
// analytically.
func (c *Chabrier2003) Quantile(p float64) float64 {
	if !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	if p == 0 {
		return c.MinMass
	}
	if p == 1 {
		return c.MaxMass
	}
	if p < c.fLN {
		return c.lognormalQuantile(p)
	}
	return c.pl.quantile(p - c.fLN)
}

// Rand draws a mass by exact inverse-CDF sampling with a uniform deviate
// from src.
func (c *Chabrier2003) Rand(src *rand.Rand) float64 {
	u := src.Float64()
	if u < c.fLN {
		return c.lognormalQuantile(u)
	}
	return c.pl.quantile(u - c.fLN)
}

// lognormalQuantile solves numC (Phi(x) - Phi(xlo)) = p for x in
// [xlo, xtp] and returns 10^(mu + Sigma x).
func (c *Chabrier2003) lognormalQuantile(p float64) float64 {
	const invSqrt2Pi = 0.3989422804014327 // 1/sqrt(2 pi)
	v := c.philo + p/c.numC               // target Phi(x)
	a, b := c.xlo, c.xtp                  // bracket
	x := -math.Sqrt2 * math.Erfcinv(2*v)  // initial guess
	if !(x > a && x < b) {
		x = 0.5 * (a + b)
	}
	for range 60 {
		g := phi(x) - v
		if g == 0 {
			break
		}
		if g > 0 {
			b = x
		} else {
			a = x
		}
		dx := g / (invSqrt2Pi * math.Exp(-x*x/2))
		xn := x - dx
		if !(xn > a && xn < b) {
			xn = 0.5 * (a + b) // Newton left the bracket: bisect
		}
		if math.Abs(xn-x) <= 1e-15*math.Max(1, math.Abs(x)) {
			x = xn
			break
		}
		x = xn
	}
	m := math.Exp(math.Ln10 * (c.mu + c.Sigma*x))
	return clamp(m, c.MinMass, math.Min(c.MaxMass, c.Knee))
}

// restrict returns the same law renormalised on [lo, hi].
func (c *Chabrier2003) restrict(lo, hi float64) (IMF, error) {
	r := &Chabrier2003{MinMass: lo, MaxMass: hi, Mc: c.Mc, Sigma: c.Sigma, Knee: c.Knee, Slope: c.Slope}
	r.init()
	return r, nil
}
