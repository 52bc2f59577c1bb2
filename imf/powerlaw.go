package imf

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
)

// SalpeterSlope is the index alpha of dN/dm ∝ m^-alpha of Salpeter (1955,
// ApJ 121, 161).
const SalpeterSlope = 2.35

// BrokenPowerLaw is an IMF with dN/dm ∝ m^-Slopes[i] on segment i, that is
// for Breaks[i] <= m < Breaks[i+1], continuous at the inner breaks and
// normalised to unit integral over [Breaks[0], Breaks[len(Breaks)-1]].
// Breaks are in Msun; Slopes are the dimensionless indices alpha_i (2.35 is
// Salpeter's). Any finite slopes are allowed, including alpha = 1 and
// alpha = 2, whose number and mass integrals are logarithms.
//
// Build it with NewBrokenPowerLaw, NewSalpeter or NewKroupa2001; a value
// made by hand is not ready for use.
type BrokenPowerLaw struct {
	Breaks []float64 // [min, b1, ..., max], Msun, strictly increasing
	Slopes []float64 // len(Breaks)-1 indices alpha_i

	seg  []segment
	cum  []float64 // normalised CDF at Breaks[i]; cum[len(seg)] = 1
	mean float64
}

// segment is one power-law piece dN/dm = dens (m/lo)^-alpha on [lo, hi],
// with dens the normalised density at lo.
type segment struct {
	lo, hi float64
	alpha  float64
	k1, k2 float64 // 1-alpha and 2-alpha, exponents of the number and mass integrands in ln m
	dens   float64 // dN/dm at lo, 1/Msun
	inv    float64 // 1 / (dens lo), to map a number fraction to expInt units
	near1  bool    // |1-alpha| < 0.25: invert with Log1p to keep precision
	invK1  float64 // 1/(1-alpha), when not near1
	lnr    float64 // ln(hi/lo)
	num    float64 // number fraction in the segment
	mass   float64 // mass per star of the whole IMF contributed by the segment, Msun
}

// expInt returns ∫_0^L exp(k s) ds = expm1(k L)/k, which is L when k = 0.
// With s = ln(m/m0) it gives the power-law integrals
// ∫ (m/m0)^-alpha dm = m0 expInt(1-alpha, ln(m/m0)) and
// ∫ m (m/m0)^-alpha dm = m0^2 expInt(2-alpha, ln(m/m0)), exact for alpha = 1
// and 2 and accurate for slopes near them.
func expInt(k, l float64) float64 {
	if k == 0 {
		return l
	}
	return math.Expm1(k*l) / k
}

// invExpInt returns l with expInt(k, l) = y.
func invExpInt(k, y float64) float64 {
	if k == 0 {
		return y
	}
	return math.Log1p(k*y) / k
}

func newSegment(lo, hi, alpha, dens float64) segment {
	s := segment{lo: lo, hi: hi, alpha: alpha, k1: 1 - alpha, k2: 2 - alpha, dens: dens, lnr: math.Log(hi / lo)}
	s.near1 = math.Abs(s.k1) < 0.25
	if !s.near1 {
		s.invK1 = 1 / s.k1
	}
	s.num = dens * lo * expInt(s.k1, s.lnr)
	s.mass = dens * lo * lo * expInt(s.k2, s.lnr)
	return s
}

// scale multiplies the density by c.
func (s *segment) scale(c float64) {
	s.dens *= c
	s.num *= c
	s.mass *= c
	s.inv = 1 / (s.dens * s.lo)
}

// prob returns dN/dm at m in [lo, hi].
func (s *segment) prob(m float64) float64 {
	if s.alpha == 0 {
		return s.dens
	}
	return s.dens * math.Pow(m/s.lo, -s.alpha)
}

// number returns the number fraction in [x1, x2] ⊆ [lo, hi], integrating
// from x1 so that narrow intervals keep full relative precision.
func (s *segment) number(x1, x2 float64) float64 {
	return s.prob(x1) * x1 * expInt(s.k1, math.Log(x2/x1))
}

// massIn returns the mass per star of the whole IMF in [x1, x2] ⊆ [lo, hi].
func (s *segment) massIn(x1, x2 float64) float64 {
	return s.prob(x1) * x1 * x1 * expInt(s.k2, math.Log(x2/x1))
}

// quantile returns the mass at number fraction q (0 <= q <= num) above lo:
// m = lo (1 + k1 q/(dens lo))^(1/k1), or lo exp(q/(dens lo)) for alpha = 1.
//
// Rounding 1 + k1 y costs a relative error of about 1/|k1| ulps in m, so
// math.Log (twice as fast as math.Log1p) is used unless |k1| is small.
func (s *segment) quantile(q float64) float64 {
	y := q * s.inv
	var l float64
	if s.near1 {
		l = invExpInt(s.k1, y)
	} else {
		l = math.Log(1+s.k1*y) * s.invK1
	}
	return clamp(s.lo*math.Exp(l), s.lo, s.hi)
}

// NewBrokenPowerLaw returns the broken power-law IMF with the given breaks
// (Msun, [min, b1, ..., max], strictly increasing, min > 0, max finite) and
// slopes (one finite alpha per segment, len(slopes) = len(breaks)-1). The
// slices are copied.
func NewBrokenPowerLaw(breaks, slopes []float64) (*BrokenPowerLaw, error) {
	if len(breaks) < 2 {
		return nil, fmt.Errorf("imf: broken power law needs at least 2 breaks [min, ..., max], got %d", len(breaks))
	}
	if len(slopes) != len(breaks)-1 {
		return nil, fmt.Errorf("imf: broken power law with %d breaks needs len(slopes) = %d, got %d", len(breaks), len(breaks)-1, len(slopes))
	}
	if !(breaks[0] > 0) || math.IsInf(breaks[0], 1) {
		return nil, fmt.Errorf("imf: minimum mass breaks[0] = %g Msun must be positive and finite", breaks[0])
	}
	for i := 1; i < len(breaks); i++ {
		if !(breaks[i] > breaks[i-1]) {
			return nil, fmt.Errorf("imf: breaks must increase strictly, got breaks[%d] = %g Msun after breaks[%d] = %g Msun", i, breaks[i], i-1, breaks[i-1])
		}
	}
	if last := breaks[len(breaks)-1]; math.IsInf(last, 1) {
		return nil, fmt.Errorf("imf: maximum mass breaks[%d] = %g Msun must be finite", len(breaks)-1, last)
	}
	for i, a := range slopes {
		if math.IsNaN(a) || math.IsInf(a, 0) {
			return nil, fmt.Errorf("imf: slopes[%d] = %g must be finite", i, a)
		}
	}
	b := &BrokenPowerLaw{
		Breaks: append([]float64(nil), breaks...),
		Slopes: append([]float64(nil), slopes...),
		seg:    make([]segment, len(slopes)),
		cum:    make([]float64, len(breaks)),
	}
	// Chain the densities for continuity, starting from 1 at min.
	dens, total, mass := 1.0, 0.0, 0.0
	for i, a := range slopes {
		s := newSegment(breaks[i], breaks[i+1], a, dens)
		b.seg[i] = s
		total += s.num
		mass += s.mass
		dens *= math.Exp(-a * s.lnr)
	}
	if !(total > 0) || math.IsInf(total, 0) || math.IsInf(mass, 0) || !(dens > 0) || math.IsInf(dens, 0) {
		return nil, fmt.Errorf("imf: broken power law over [%g, %g] Msun with slopes %v cannot be normalised in float64 (the integral over- or underflows); use a narrower mass range or milder slopes", breaks[0], breaks[len(breaks)-1], slopes)
	}
	c := 1 / total
	for i := range b.seg {
		b.seg[i].scale(c)
		b.cum[i+1] = b.cum[i] + b.seg[i].num
	}
	b.cum[len(b.seg)] = 1
	b.mean = mass * c
	return b, nil
}

// NewSalpeter returns the Salpeter (1955, ApJ 121, 161) IMF,
// dN/dm ∝ m^-2.35, over [min, max] Msun.
func NewSalpeter(min, max float64) (*BrokenPowerLaw, error) {
	if err := checkRange("Salpeter", min, max); err != nil {
		return nil, err
	}
	return NewBrokenPowerLaw([]float64{min, max}, []float64{SalpeterSlope})
}

// NewKroupa2001 returns the Kroupa (2001, MNRAS 322, 231) IMF over
// [min, max] Msun: dN/dm ∝ m^-0.3 below 0.08 Msun, m^-1.3 from 0.08 to
// 0.5 Msun and m^-2.3 above 0.5 Msun, continuous at the breaks. Segments are
// clipped to [min, max]. Kroupa's lowest segment starts at 0.01 Msun; a
// smaller min extends its slope.
func NewKroupa2001(min, max float64) (*BrokenPowerLaw, error) {
	if err := checkRange("Kroupa (2001)", min, max); err != nil {
		return nil, err
	}
	// Kroupa (2001, MNRAS 322, 231): alpha = 0.3 below 0.08 Msun, 1.3 from
	// 0.08 to 0.5 Msun, 2.3 above 0.5 Msun.
	kroupaBreaks := [...]float64{0.08, 0.5}
	kroupaSlopes := [...]float64{0.3, 1.3, 2.3}
	breaks := []float64{min}
	var slopes []float64
	for i, a := range kroupaSlopes {
		if i < len(kroupaBreaks) && kroupaBreaks[i] <= min {
			continue
		}
		slopes = append(slopes, a)
		if i == len(kroupaBreaks) || kroupaBreaks[i] >= max {
			break
		}
		breaks = append(breaks, kroupaBreaks[i])
	}
	breaks = append(breaks, max)
	return NewBrokenPowerLaw(breaks, slopes)
}

func checkRange(name string, min, max float64) error {
	if !(min > 0) || !(max > min) || math.IsInf(max, 1) {
		return fmt.Errorf("imf: %s IMF needs 0 < min < max < +Inf Msun, got min = %g, max = %g", name, min, max)
	}
	return nil
}

// Min returns the lowest mass, Breaks[0], in Msun.
func (b *BrokenPowerLaw) Min() float64 { return b.seg[0].lo }

// Max returns the highest mass, the last break, in Msun.
func (b *BrokenPowerLaw) Max() float64 { return b.seg[len(b.seg)-1].hi }

// Mean returns the mean stellar mass, in Msun.
func (b *BrokenPowerLaw) Mean() float64 { return b.mean }

// find returns the index of the segment holding mass m in [Min, Max].
func (b *BrokenPowerLaw) find(m float64) int {
	n := len(b.seg)
	if n <= 8 {
		i := 0
		for i < n-1 && m >= b.seg[i].hi {
			i++
		}
		return i
	}
	i := sort.Search(n, func(i int) bool { return b.seg[i].hi > m })
	return min(i, n-1)
}

// findP returns the index of the segment holding CDF value p in [0, 1].
func (b *BrokenPowerLaw) findP(p float64) int {
	n := len(b.seg)
	if n <= 8 {
		i := 0
		for i < n-1 && p >= b.cum[i+1] {
			i++
		}
		return i
	}
	i := sort.Search(n, func(i int) bool { return b.cum[i+1] > p })
	return min(i, n-1)
}

// Prob returns the normalised dN/dm at m, in 1/Msun; 0 outside [Min, Max].
func (b *BrokenPowerLaw) Prob(m float64) float64 {
	if !(m >= b.Min() && m <= b.Max()) {
		return 0
	}
	return b.seg[b.find(m)].prob(m)
}

// CDF returns the fraction of stars with mass below m.
func (b *BrokenPowerLaw) CDF(m float64) float64 {
	if m <= b.Min() {
		return 0
	}
	if m >= b.Max() {
		return 1
	}
	i := b.find(m)
	s := &b.seg[i]
	return b.cum[i] + s.dens*s.lo*expInt(s.k1, math.Log(m/s.lo))
}

// Quantile returns the mass m with CDF(m) = p by analytic inversion of the
// power law on the segment holding p; NaN for p outside [0, 1].
func (b *BrokenPowerLaw) Quantile(p float64) float64 {
	if !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	if p == 1 {
		return b.Max()
	}
	i := b.findP(p)
	return b.seg[i].quantile(p - b.cum[i])
}

// Rand draws a mass by exact inverse-CDF sampling with a uniform deviate
// from src.
func (b *BrokenPowerLaw) Rand(src *rand.Rand) float64 {
	u := src.Float64()
	i := b.findP(u)
	return b.seg[i].quantile(u - b.cum[i])
}

// NumberFraction returns the fraction of stars with lo <= m < hi.
func (b *BrokenPowerLaw) NumberFraction(lo, hi float64) float64 {
	return b.integrate(lo, hi, (*segment).number)
}

// MassFraction returns the fraction of the total stellar mass in stars with
// lo <= m < hi.
func (b *BrokenPowerLaw) MassFraction(lo, hi float64) float64 {
	return b.integrate(lo, hi, (*segment).massIn) / b.mean
}

// integrate sums f over the segments overlapping [lo, hi] ∩ [Min, Max].
func (b *BrokenPowerLaw) integrate(lo, hi float64, f func(*segment, float64, float64) float64) float64 {
	lo, hi = math.Max(lo, b.Min()), math.Min(hi, b.Max())
	if !(lo < hi) {
		return 0
	}
	sum := 0.0
	for i := b.find(lo); i < len(b.seg); i++ {
		s := &b.seg[i]
		if s.lo >= hi {
			break
		}
		x1, x2 := math.Max(lo, s.lo), math.Min(hi, s.hi)
		if x1 < x2 {
			sum += f(s, x1, x2)
		}
	}
	return sum
}

// restrict returns the same broken power law renormalised on [lo, hi].
func (b *BrokenPowerLaw) restrict(lo, hi float64) (IMF, error) {
	breaks := []float64{lo}
	var slopes []float64
	for i, s := range b.seg {
		if s.hi <= lo {
			continue
		}
		slopes = append(slopes, b.Slopes[i])
		if s.hi >= hi {
			break
		}
		breaks = append(breaks, s.hi)
	}
	breaks = append(breaks, hi)
	return NewBrokenPowerLaw(breaks, slopes)
}
