package binary

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Distribution is a one-dimensional distribution of an initial orbital
// parameter, sampled by exact inverse CDF. Every distribution type of this
// package implements it.
type Distribution interface {
	// CDF returns P(X <= x).
	CDF(x float64) float64
	// Quantile returns the x with CDF(x) = p for p in [0, 1], NaN otherwise.
	Quantile(p float64) float64
	// Rand draws one value using src.
	Rand(src *rand.Rand) float64
}

var (
	_ Distribution = MassRatio{}
	_ Distribution = SanaPeriod{}
	_ Distribution = OpikSeparation{}
	_ Distribution = Thermal{}
	_ Distribution = Circular{}
	_ Distribution = PowerLawEcc{}
)

// powerLaw is the density f(x) ∝ x^k on [lo, hi] with 0 <= lo < hi, where
// lo > 0 if k <= -1. With s = k+1 and L = ln(hi/lo), its integrals are
// written with expm1 and log1p so that they stay accurate for k near -1 and
// are exact (logarithmic) at k = -1.
type powerLaw struct{ lo, hi, k float64 }

func (p powerLaw) prob(x float64) float64 {
	if !(x >= p.lo && x <= p.hi) {
		return 0
	}
	s := p.k + 1
	if p.lo == 0 {
		return s / p.hi * math.Pow(x/p.hi, p.k)
	}
	l := math.Log(p.hi / p.lo)
	if s == 0 {
		return 1 / (x * l)
	}
	return s / (p.lo * math.Expm1(s*l)) * math.Pow(x/p.lo, p.k)
}

func (p powerLaw) cdf(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x <= p.lo:
		return 0
	case x >= p.hi:
		return 1
	}
	s := p.k + 1
	if p.lo == 0 {
		return math.Pow(x/p.hi, s)
	}
	l := math.Log(p.hi / p.lo)
	lx := math.Log(x / p.lo)
	if s == 0 {
		return lx / l
	}
	return math.Expm1(s*lx) / math.Expm1(s*l)
}

func (p powerLaw) quantile(u float64) float64 {
	if !(u >= 0 && u <= 1) {
		return math.NaN()
	}
	s := p.k + 1
	var x float64
	switch {
	case p.lo == 0:
		x = p.hi * math.Pow(u, 1/s)
	case s == 0:
		x = p.lo * math.Exp(u*math.Log(p.hi/p.lo))
	default:
		x = p.lo * math.Exp(math.Log1p(u*math.Expm1(s*math.Log(p.hi/p.lo)))/s)
	}
	return math.Min(math.Max(x, p.lo), p.hi)
}

// fastLaw is a powerLaw with the constants of its inverse CDF computed once, for drawing many
// values: quantile gives the same values as powerLaw.quantile.
type fastLaw struct {
	p          powerLaw
	invS, l, e float64 // 1/(k+1), ln(hi/lo), expm1((k+1) ln(hi/lo))
}

func (p powerLaw) fast() *fastLaw {
	f := &fastLaw{p: p}
	s := p.k + 1
	if s != 0 {
		f.invS = 1 / s
	}
	if p.lo > 0 {
		f.l = math.Log(p.hi / p.lo)
		f.e = math.Expm1(s * f.l)
	}
	return f
}

func (f *fastLaw) quantile(u float64) float64 {
	p := &f.p
	if !(u >= 0 && u <= 1) {
		return math.NaN()
	}
	var x float64
	switch {
	case p.lo == 0:
		if u == 0 {
			return 0
		}
		x = p.hi * math.Exp(math.Log(u)*f.invS)
	case f.invS == 0:
		x = p.lo * math.Exp(u*f.l)
	default:
		x = p.lo * math.Exp(math.Log1p(u*f.e)*f.invS)
	}
	return math.Min(math.Max(x, p.lo), p.hi)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// MassRatio is the distribution of the mass ratio q = M2/M1 of a binary,
// with density f(q) ∝ q^Kappa on [QMin, 1] (dimensionless). Kappa = 0 is the
// uniform distribution; Sana et al. (2012, Science 337, 444) fit Kappa =
// -0.1 for Galactic O stars. QMin may be 0 only when Kappa > -1.
type MassRatio struct {
	Kappa float64 // power-law index of f(q)
	QMin  float64 // lower limit of q, 0 <= QMin < 1
	fast  *fastLaw
}

// NewMassRatio returns a validated MassRatio.
func NewMassRatio(kappa, qMin float64) (MassRatio, error) {
	d := MassRatio{Kappa: kappa, QMin: qMin}
	if err := d.Validate(); err != nil {
		return d, err
	}
	d.fast = d.law().fast()
	return d, nil
}

// Validate reports whether the parameters describe a proper distribution.
func (d MassRatio) Validate() error {
	if !finite(d.Kappa) {
		return fmt.Errorf("binary: mass-ratio index Kappa = %g must be finite", d.Kappa)
	}
	if !(d.QMin >= 0 && d.QMin < 1) {
		return fmt.Errorf("binary: minimum mass ratio QMin = %g out of range: want 0 <= QMin < 1", d.QMin)
	}
	if d.QMin == 0 && d.Kappa <= -1 {
		return fmt.Errorf("binary: minimum mass ratio QMin = 0 with Kappa = %g: the density q^Kappa cannot be normalised; want QMin > 0 or Kappa > -1", d.Kappa)
	}
	return nil
}

func (d MassRatio) law() powerLaw { return powerLaw{d.QMin, 1, d.Kappa} }

// Prob returns the probability density at q.
func (d MassRatio) Prob(q float64) float64 { return d.law().prob(q) }

// CDF returns the fraction of binaries with mass ratio below q.
func (d MassRatio) CDF(q float64) float64 { return d.law().cdf(q) }

// Quantile returns the mass ratio below which a fraction p of binaries lie.
func (d MassRatio) Quantile(p float64) float64 { return d.law().quantile(p) }

// Rand draws a mass ratio using src.
func (d MassRatio) Rand(src *rand.Rand) float64 {
	if d.fast != nil {
		return d.fast.quantile(src.Float64())
	}
	return d.law().quantile(src.Float64())
}

// SanaPeriod is the orbital-period distribution of Sana et al. (2012,
// Science 337, 444): with x = log10(P/day), f(x) ∝ x^Exponent on
// [LogPMin, LogPMax]. Their fit to Galactic O-star binaries is LogPMin =
// 0.15, LogPMax = 5.5, Exponent = -0.55.
//
// The random variable is the period P in days: CDF and Prob take P in
// days, Quantile and Rand return it. Prob is the density per day,
// f(log10 P) / (P ln 10).
type SanaPeriod struct {
	LogPMin  float64 // log10 of the shortest period in days, >= 0
	LogPMax  float64 // log10 of the longest period in days, > LogPMin
	Exponent float64 // power-law index of f(log10 P)
	fast     *fastLaw
}

// NewSanaPeriod returns a validated SanaPeriod.
func NewSanaPeriod(logPMin, logPMax, exponent float64) (SanaPeriod, error) {
	d := SanaPeriod{LogPMin: logPMin, LogPMax: logPMax, Exponent: exponent}
	if err := d.Validate(); err != nil {
		return d, err
	}
	d.fast = d.law().fast()
	return d, nil
}

// Validate reports whether the parameters describe a proper distribution.
func (d SanaPeriod) Validate() error {
	if !finite(d.Exponent) {
		return fmt.Errorf("binary: period index Exponent = %g must be finite", d.Exponent)
	}
	if !(d.LogPMin >= 0) || !finite(d.LogPMin) {
		return fmt.Errorf("binary: LogPMin = %g out of range: want a finite LogPMin >= 0 (periods of at least 1 day, where log10 P is not negative)", d.LogPMin)
	}
	if !(d.LogPMax > d.LogPMin) || !finite(d.LogPMax) {
		return fmt.Errorf("binary: LogPMax = %g out of range: want finite LogPMax > LogPMin = %g", d.LogPMax, d.LogPMin)
	}
	if d.LogPMin == 0 && d.Exponent <= -1 {
		return fmt.Errorf("binary: LogPMin = 0 with Exponent = %g: the density (log10 P)^Exponent cannot be normalised; want LogPMin > 0 or Exponent > -1", d.Exponent)
	}
	return nil
}

func (d SanaPeriod) law() powerLaw { return powerLaw{d.LogPMin, d.LogPMax, d.Exponent} }

// Prob returns the probability density per day at the period p (days).
func (d SanaPeriod) Prob(p float64) float64 {
	if !(p > 0) {
		return 0
	}
	return d.law().prob(math.Log10(p)) / (p * math.Ln10)
}

// CDF returns the fraction of binaries with period below p days.
func (d SanaPeriod) CDF(p float64) float64 {
	if p <= 0 {
		return 0
	}
	return d.law().cdf(math.Log10(p))
}

// Quantile returns the period in days below which a fraction u of binaries lie.
func (d SanaPeriod) Quantile(u float64) float64 { return math.Pow(10, d.law().quantile(u)) }

// Rand draws an orbital period in days using src.
func (d SanaPeriod) Rand(src *rand.Rand) float64 {
	if d.fast != nil {
		return math.Exp(math.Ln10 * d.fast.quantile(src.Float64()))
	}
	return d.Quantile(src.Float64())
}

// OpikSeparation is the separation distribution of Öpik (1924, Publ. Tartu
// Obs. 25, 6), flat in log a: f(a) ∝ 1/a on [AMin, AMax], a in AU.
type OpikSeparation struct {
	AMin float64 // smallest semi-major axis, AU, > 0
	AMax float64 // largest semi-major axis, AU, > AMin
}

// NewOpikSeparation returns a validated OpikSeparation.
func NewOpikSeparation(aMin, aMax float64) (OpikSeparation, error) {
	d := OpikSeparation{AMin: aMin, AMax: aMax}
	return d, d.Validate()
}

// Validate reports whether the parameters describe a proper distribution.
func (d OpikSeparation) Validate() error {
	if !(d.AMin > 0) || !finite(d.AMin) {
		return fmt.Errorf("binary: AMin = %g AU out of range: want a finite AMin > 0", d.AMin)
	}
	if !(d.AMax > d.AMin) || !finite(d.AMax) {
		return fmt.Errorf("binary: AMax = %g AU out of range: want finite AMax > AMin = %g AU", d.AMax, d.AMin)
	}
	return nil
}

func (d OpikSeparation) law() powerLaw { return powerLaw{d.AMin, d.AMax, -1} }

// Prob returns the probability density per AU at the separation a (AU).
func (d OpikSeparation) Prob(a float64) float64 { return d.law().prob(a) }

// CDF returns the fraction of binaries with separation below a AU.
func (d OpikSeparation) CDF(a float64) float64 { return d.law().cdf(a) }

// Quantile returns the separation in AU below which a fraction p of binaries lie.
func (d OpikSeparation) Quantile(p float64) float64 { return d.law().quantile(p) }

// Rand draws a semi-major axis in AU using src.
func (d OpikSeparation) Rand(src *rand.Rand) float64 { return d.law().quantile(src.Float64()) }

// Thermal is the thermal eccentricity distribution f(e) = 2e on [0, 1], the
// distribution of a population with energy equipartition (Jeans 1919;
// common practice for wide binaries). For a truncated thermal law use
// PowerLawEcc with Exponent 1.
type Thermal struct{}

// Prob returns the probability density at e.
func (Thermal) Prob(e float64) float64 {
	if !(e >= 0 && e <= 1) {
		return 0
	}
	return 2 * e
}

// CDF returns e^2 clamped to [0, 1].
func (Thermal) CDF(e float64) float64 {
	switch {
	case math.IsNaN(e):
		return math.NaN()
	case e <= 0:
		return 0
	case e >= 1:
		return 1
	}
	return e * e
}

// Quantile returns sqrt(p).
func (Thermal) Quantile(p float64) float64 {
	if !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	return math.Sqrt(p)
}

// Rand draws an eccentricity using src.
func (Thermal) Rand(src *rand.Rand) float64 { return math.Sqrt(src.Float64()) }

// Circular is the degenerate eccentricity distribution e = 0. Rand does not
// consume random numbers.
type Circular struct{}

// CDF returns 1 for e >= 0 and 0 below.
func (Circular) CDF(e float64) float64 {
	switch {
	case math.IsNaN(e):
		return math.NaN()
	case e >= 0:
		return 1
	}
	return 0
}

// Quantile returns 0 for p in [0, 1] and NaN otherwise.
func (Circular) Quantile(p float64) float64 {
	if !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	return 0
}

// Rand returns 0.
func (Circular) Rand(*rand.Rand) float64 { return 0 }

// PowerLawEcc is the eccentricity distribution f(e) ∝ e^Exponent on
// [0, EMax]. Sana et al. (2012, Science 337, 444) fit Exponent = -0.45 for
// Galactic O-star binaries; Exponent = 1 is a thermal law truncated at EMax.
type PowerLawEcc struct {
	Exponent float64 // power-law index, > -1
	EMax     float64 // largest eccentricity, 0 < EMax <= 1
	fast     *fastLaw
}

// NewPowerLawEcc returns a validated PowerLawEcc.
func NewPowerLawEcc(exponent, eMax float64) (PowerLawEcc, error) {
	d := PowerLawEcc{Exponent: exponent, EMax: eMax}
	if err := d.Validate(); err != nil {
		return d, err
	}
	d.fast = d.law().fast()
	return d, nil
}

// Validate reports whether the parameters describe a proper distribution.
func (d PowerLawEcc) Validate() error {
	if !(d.Exponent > -1) || !finite(d.Exponent) {
		return fmt.Errorf("binary: eccentricity index Exponent = %g out of range: want a finite Exponent > -1 (e^Exponent must be integrable at e = 0)", d.Exponent)
	}
	if !(d.EMax > 0 && d.EMax <= 1) {
		return fmt.Errorf("binary: EMax = %g out of range: want 0 < EMax <= 1", d.EMax)
	}
	return nil
}

func (d PowerLawEcc) law() powerLaw { return powerLaw{0, d.EMax, d.Exponent} }

// Prob returns the probability density at e.
func (d PowerLawEcc) Prob(e float64) float64 { return d.law().prob(e) }

// CDF returns the fraction of binaries with eccentricity below e.
func (d PowerLawEcc) CDF(e float64) float64 { return d.law().cdf(e) }

// Quantile returns the eccentricity below which a fraction p of binaries lie.
func (d PowerLawEcc) Quantile(p float64) float64 { return d.law().quantile(p) }

// Rand draws an eccentricity using src.
func (d PowerLawEcc) Rand(src *rand.Rand) float64 {
	if d.fast != nil {
		return d.fast.quantile(src.Float64())
	}
	return d.law().quantile(src.Float64())
}
