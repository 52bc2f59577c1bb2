package remnant

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// maxwellCDF is the Maxwell-Boltzmann speed distribution function for
// one-dimensional dispersion sigma (analytic):
// F(v) = erf(v / (sqrt(2) sigma)) - sqrt(2/pi) (v/sigma) exp(-v^2 / (2 sigma^2)).
func maxwellCDF(v, sigma float64) float64 {
	x := v / sigma
	return math.Erf(x/math.Sqrt2) - math.Sqrt(2/math.Pi)*x*math.Exp(-x*x/2)
}

func speed(v [3]float64) float64 { return math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2]) }

// TestKickDistribution draws 1e5 neutron-star kicks and checks the
// Maxwellian of Hobbs et al. (2005, MNRAS 360, 974; sigma = 265 km/s,
// verified): the mean speed 2 sigma sqrt(2/pi) = 422.9 km/s (analytic
// Maxwellian mean; Hobbs et al. quote ~400 km/s for the mean 3D speed of
// their sample), the Kolmogorov-Smirnov distance to the Maxwellian CDF, and
// isotropy (mean of each component and of cos(theta) zero, mean cos^2 = 1/3,
// analytic for a uniform direction).
func TestKickDistribution(t *testing.T) {
	const n = 100000
	k := DefaultKicks()
	sigma := k.NSSigma
	src := rand.New(rand.NewPCG(2005, 974))
	r := Remnant{Type: NS, Fate: SN, Mass: 1.3}
	speeds := make([]float64, n)
	var sum [3]float64
	var sumCos, sumCos2, sumV float64
	for i := range speeds {
		v := k.Draw(r, src)
		s := speed(v)
		speeds[i] = s
		sumV += s
		for j := range 3 {
			sum[j] += v[j]
		}
		sumCos += v[2] / s
		sumCos2 += (v[2] / s) * (v[2] / s)
	}
	mean := sumV / n
	wantMean := 2 * sigma * math.Sqrt(2/math.Pi)
	sdMean := sigma * math.Sqrt(3-8/math.Pi) / math.Sqrt(n) // Maxwellian variance sigma^2 (3 - 8/pi)
	if math.Abs(mean-wantMean) > 5*sdMean {
		t.Errorf("mean speed %g km/s, want %g +- %g", mean, wantMean, 5*sdMean)
	}
	if math.Abs(mean-400) > 40 {
		t.Errorf("mean speed %g km/s, Hobbs et al. (2005) quote ~400", mean)
	}

	// Kolmogorov-Smirnov: D_crit(alpha = 0.001) = 1.949 / sqrt(n) (asymptotic
	// Kolmogorov distribution).
	slices.Sort(speeds)
	d := 0.0
	for i, s := range speeds {
		f := maxwellCDF(s, sigma)
		d = math.Max(d, math.Max(f-float64(i)/n, float64(i+1)/n-f))
	}
	if crit := 1.949 / math.Sqrt(n); d > crit {
		t.Errorf("KS distance to the Maxwellian %g, critical value %g", d, crit)
	}

	for j := range 3 {
		if m := sum[j] / n; math.Abs(m) > 5*sigma/math.Sqrt(n) {
			t.Errorf("mean of component %d = %g km/s, want 0 +- %g", j, m, 5*sigma/math.Sqrt(n))
		}
	}
	// A uniform cos(theta) on [-1, 1] has variance 1/3; cos^2 has mean 1/3 and variance 4/45.
	if m := sumCos / n; math.Abs(m) > 5*math.Sqrt(1.0/3/n) {
		t.Errorf("mean cos(theta) = %g, want 0", m)
	}
	if m := sumCos2 / n; math.Abs(m-1.0/3) > 5*math.Sqrt(4.0/45/n) {
		t.Errorf("mean cos^2(theta) = %g, want 1/3", m)
	}
}

// TestKickScaling checks each black-hole mode against the neutron-star kick
// drawn from the same random numbers: fallback scales by 1 - f_fb (Fryer et
// al. 2012), momentum by RefNSMass / M_BH (momentum conservation), full by 1,
// none by 0; white dwarfs, no remnant and stars get nothing. Every draw
// takes the same random numbers, so the streams stay aligned.
func TestKickScaling(t *testing.T) {
	bh := Remnant{Type: BH, Fate: SN, Mass: 7, BaryonicMass: 7.78, FallbackFraction: 0.35}
	rows := []struct {
		mode  BHKickMode
		r     Remnant
		scale float64
	}{
		{KickFallback, bh, 0.65},
		{KickFallback, Remnant{Type: BH, Fate: Failed, Mass: 20, FallbackFraction: 1}, 0},
		{KickMomentum, bh, 1.4 / 7},
		{KickFull, bh, 1},
		{KickNone, bh, 0},
		{KickNone, Remnant{Type: NS, Mass: 1.3}, 1},
		{KickFull, Remnant{Type: WD, Mass: 0.6}, 0},
		{KickFull, Remnant{Type: None, Fate: PISN}, 0},
		{KickFull, Remnant{Type: Star, Fate: Alive}, 0},
	}
	for _, row := range rows {
		k := DefaultKicks()
		k.BHMode = row.mode
		a := rand.New(rand.NewPCG(11, 12))
		b := rand.New(rand.NewPCG(11, 12))
		for range 20 {
			ns := k.Draw(Remnant{Type: NS, Mass: 1.4}, a)
			got := k.Draw(row.r, b)
			for j := range 3 {
				if math.Abs(got[j]-row.scale*ns[j]) > 1e-12*math.Abs(ns[j]) {
					t.Fatalf("%v %v: kick %v, want %g x %v", row.mode, row.r.Type, got, row.scale, ns)
				}
			}
		}
		if a.Uint64() != b.Uint64() {
			t.Errorf("%v %v: Draw took a different number of random values than for a NS", row.mode, row.r.Type)
		}
	}
}

func TestKicksValidate(t *testing.T) {
	if err := DefaultKicks().Validate(); err != nil {
		t.Fatal(err)
	}
	for _, row := range []struct {
		k    Kicks
		want string
	}{
		{Kicks{NSSigma: -1, RefNSMass: 1.4}, "NSSigma = -1, want 0 <= x < 300000"},
		{Kicks{NSSigma: 265, RefNSMass: 0}, "RefNSMass = 0, want 0 < x"},
		{Kicks{NSSigma: 265, RefNSMass: 1.4, BHMode: 9}, "BHMode = 9, want one of fallback, momentum, full, none"},
	} {
		if err := row.k.Validate(); err == nil || !strings.Contains(err.Error(), row.want) {
			t.Errorf("%+v: error %v, want %q", row.k, err, row.want)
		}
	}
}
