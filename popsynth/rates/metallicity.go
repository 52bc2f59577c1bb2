package rates

import (
	"fmt"
	"math"
)

// SolarMetallicity is the present-day solar metal mass fraction of Asplund
// et al. (2009, ARA&A 47, 481), Z_sun = 0.0142, the solar value the rest of
// this program uses.
const SolarMetallicity = 0.0142

// MetallicityDist is the distribution of metallicity Z (metal mass
// fraction) among the stars formed at redshift z, expressed over log10 Z.
type MetallicityDist interface {
	// BinProb returns the fraction of the stellar mass formed at redshift
	// z whose log10 Z lies in [lo, hi). lo may be -Inf and hi +Inf.
	BinProb(lo, hi, z float64) float64
	// Name describes the distribution for output and provenance.
	Name() string
}

// FixedMetallicity puts all star formation, at every redshift, at the
// single metallicity Z (mass fraction).
type FixedMetallicity struct {
	Z float64
}

// BinProb returns 1 if lo <= log10 Z < hi and 0 otherwise.
func (f FixedMetallicity) BinProb(lo, hi, z float64) float64 {
	x := math.Log10(f.Z)
	if lo <= x && x < hi {
		return 1
	}
	return 0
}

// Name returns a description such as "fixed Z = 0.0142".
func (f FixedMetallicity) Name() string { return fmt.Sprintf("fixed Z = %g", f.Z) }

// Validate reports whether 0 < Z <= 1.
func (f FixedMetallicity) Validate() error {
	if !(f.Z > 0 && f.Z <= 1) {
		return fmt.Errorf("rates: fixed metallicity Z = %v; want 0 < Z <= 1", f.Z)
	}
	return nil
}

// LogNormalMetallicity gives log10 Z of the stars formed at redshift z a
// normal distribution of standard deviation Sigma (dex) about the mean
//
//	mu(z) = log10(ZSun) + Offset - Slope z^Power,
//
// that is log10(Z/ZSun) = Offset - Slope z^Power on average. Its density over
// x = log10 Z is PDF(x, z) = exp(-(x-mu)^2 / (2 Sigma^2)) / (Sigma sqrt(2π)),
// per dex.
//
// The mean relation is taken as the mean of log10 Z (the median of Z). Some
// authors instead match the mean of Z itself, which lowers mu by
// Sigma^2 ln(10)/2 (0.29 dex for Sigma = 0.5); set Offset accordingly to
// follow that convention.
type LogNormalMetallicity struct {
	ZSun   float64 // solar metallicity the relation is scaled to (mass fraction)
	Sigma  float64 // standard deviation of log10 Z, dex
	Offset float64 // log10(Z/ZSun) at z = 0, dex
	Slope  float64 // dex
	Power  float64 // dimensionless
}

// MadauFragos2017Metallicity returns the log-normal distribution of width
// sigma (dex) about the mean relation log10(Z/Z_sun) = 0.153 - 0.074 z^1.34
// of Madau & Fragos (2017, ApJ 840, 39; coefficients from memory). The
// relation is given relative to the solar value; we convert it with
// Z_sun = SolarMetallicity = 0.0142 (Asplund et al. 2009), the solar value of
// this program's stellar models, so that "solar" means the same thing on
// both sides. Which Z_sun Madau & Fragos adopted was not re-read: if it was
// 0.02, their absolute metallicities are 0.15 dex higher than these; set
// ZSun to change it.
func MadauFragos2017Metallicity(sigma float64) LogNormalMetallicity {
	return LogNormalMetallicity{ZSun: SolarMetallicity, Sigma: sigma, Offset: 0.153, Slope: 0.074, Power: 1.34}
}

// Validate reports whether 0 < ZSun <= 1, 0 < Sigma < Inf, and Offset, Slope
// and Power are finite with Power >= 0.
func (l LogNormalMetallicity) Validate() error {
	switch {
	case !(l.ZSun > 0 && l.ZSun <= 1):
		return fmt.Errorf("rates: metallicity ZSun = %v; want 0 < ZSun <= 1", l.ZSun)
	case !(l.Sigma > 0) || math.IsInf(l.Sigma, 0):
		return fmt.Errorf("rates: metallicity spread Sigma = %v dex; want a finite value > 0", l.Sigma)
	case math.IsNaN(l.Offset) || math.IsInf(l.Offset, 0):
		return fmt.Errorf("rates: metallicity Offset = %v dex; want a finite value", l.Offset)
	case math.IsNaN(l.Slope) || math.IsInf(l.Slope, 0):
		return fmt.Errorf("rates: metallicity Slope = %v dex; want a finite value", l.Slope)
	case !(l.Power >= 0) || math.IsInf(l.Power, 0):
		return fmt.Errorf("rates: metallicity Power = %v; want a finite value >= 0", l.Power)
	}
	return nil
}

// Mean returns mu(z), the mean of log10 Z of the stars formed at redshift z.
func (l LogNormalMetallicity) Mean(z float64) float64 {
	return math.Log10(l.ZSun) + l.Offset - l.Slope*math.Pow(z, l.Power)
}

// PDF returns the probability density of log10 Z = x among the stars formed
// at redshift z, per dex.
func (l LogNormalMetallicity) PDF(x, z float64) float64 {
	d := (x - l.Mean(z)) / l.Sigma
	return math.Exp(-d*d/2) / (l.Sigma * math.Sqrt(2*math.Pi))
}

// CDF returns the fraction of the stars formed at redshift z with
// log10 Z < x.
func (l LogNormalMetallicity) CDF(x, z float64) float64 {
	return 0.5 * math.Erfc(-(x-l.Mean(z))/(l.Sigma*math.Sqrt2))
}

// BinProb returns the fraction of the stars formed at redshift z with
// lo <= log10 Z < hi. Both tails are computed from erfc, so small
// probabilities far from the mean keep their relative precision.
func (l LogNormalMetallicity) BinProb(lo, hi, z float64) float64 {
	if !(lo < hi) {
		return 0
	}
	mu := l.Mean(z)
	k := 1 / (l.Sigma * math.Sqrt2)
	a, b := (lo-mu)*k, (hi-mu)*k
	switch {
	case a >= 0: // upper tail
		return 0.5 * (math.Erfc(a) - math.Erfc(b))
	case b <= 0: // lower tail
		return 0.5 * (math.Erfc(-b) - math.Erfc(-a))
	default:
		return 1 - 0.5*math.Erfc(-a) - 0.5*math.Erfc(b)
	}
}

// Name returns a description of the distribution and its parameters.
func (l LogNormalMetallicity) Name() string {
	return fmt.Sprintf("log-normal, sigma %g dex, about log10(Z/%g) = %g - %g z^%g", l.Sigma, l.ZSun, l.Offset, l.Slope, l.Power)
}

// fillBinProbs sets dst[i] = BinProb(edges[i], edges[i+1], z) with one
// erfc per edge: each edge's tail probability (lower tail below the mean,
// upper tail above it) is shared by the two bins it separates.
func (l LogNormalMetallicity) fillBinProbs(edges []float64, z float64, dst []float64) {
	mu := l.Mean(z)
	k := 1 / (l.Sigma * math.Sqrt2)
	tail := func(a float64) float64 {
		if a <= 0 {
			return 0.5 * math.Erfc(-a) // lower tail, P(x < edge)
		}
		return 0.5 * math.Erfc(a) // upper tail, P(x >= edge)
	}
	prevA := (edges[0] - mu) * k
	prevT := tail(prevA)
	for i := range dst {
		a := (edges[i+1] - mu) * k
		t := tail(a)
		switch {
		case prevA >= 0: // both edges above the mean
			dst[i] = prevT - t
		case a <= 0: // both below
			dst[i] = t - prevT
		default:
			dst[i] = 1 - prevT - t
		}
		prevA, prevT = a, t
	}
}

// maxUniformStep is the largest bin width, in units of Sigma, for which
// fillUniformBinProbs uses its series (see there).
const maxUniformStep = 0.1

// fillUniformBinProbs sets dst[i] to the probability of the bin
// [x0 + i h, x0 + (i+1) h) at redshift z, for bins narrow compared with the
// spread (δ = h/Sigma <= maxUniformStep); it reports false, and does
// nothing, for wider bins. With u the standardised bin centre and φ the
// standard normal density, the bin probability is the series
//
//	P = φ(u) [δ + δ^3 (u^2 - 1)/24 + δ^5 (u^4 - 6 u^2 + 3)/1920 + O(δ^7 He_6(u))],
//
// from integrating the Taylor series of φ over the bin (He_n are the
// Hermite polynomials: φ^(n)(u) = (-1)^n He_n(u) φ(u)); for δ <= 0.1 the
// neglected term is below 3e-6 relative out to 10 standard deviations.
// φ at successive centres follows from φ(u+δ) = φ(u) exp(-uδ - δ^2/2), a
// ratio that itself changes by the constant factor exp(-δ^2), walking
// outwards from the bin nearest the mean so that underflow only reaches
// bins whose probability is below the smallest float64. It costs two
// exponentials in all instead of one error function per bin.
func (l LogNormalMetallicity) fillUniformBinProbs(x0, h, z float64, dst []float64) bool {
	d := h / l.Sigma
	if !(d <= maxUniformStep) || len(dst) == 0 {
		return false
	}
	mu := l.Mean(z)
	n := len(dst)
	u0 := (x0 + h/2 - mu) / l.Sigma // centre of bin 0
	c := math.Exp(-d * d)
	d3, d5 := d*d*d/24, d*d*d*d*d/1920
	series := func(u float64) float64 {
		u2 := u * u
		return d + d3*(u2-1) + d5*(u2*u2-6*u2+3)
	}
	// Start at the bin whose centre is nearest the mean.
	s := min(max(int(math.Round(-u0/d)), 0), n-1)
	us := u0 + float64(s)*d
	phiS := math.Exp(-us*us/2) / math.Sqrt(2*math.Pi)
	// Upwards: φ_{k+1} = φ_k ρ_k, ρ_k = exp(-u_k δ - δ^2/2), ρ_{k+1} = ρ_k c.
	phi, rho := phiS, math.Exp(-us*d-d*d/2)
	for k := s; k < n; k++ {
		dst[k] = phi * series(u0+float64(k)*d)
		phi *= rho
		rho *= c
	}
	// Downwards: φ_{k-1} = φ_k τ_k, τ_k = exp(u_k δ - δ^2/2), τ_{k-1} = τ_k c.
	phi, tau := phiS, math.Exp(us*d-d*d/2)
	for k := s - 1; k >= 0; k-- {
		phi *= tau
		tau *= c
		dst[k] = phi * series(u0+float64(k)*d)
	}
	return true
}
