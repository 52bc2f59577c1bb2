package binary

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

// ksStatistic returns the one-sample Kolmogorov-Smirnov statistic
// D = sup |F_n(x) - F(x)| of the sample x (sorted in place) against cdf.
func ksStatistic(x []float64, cdf func(float64) float64) float64 {
	slices.Sort(x)
	n := float64(len(x))
	var d float64
	for i, xi := range x {
		f := cdf(xi)
		d = math.Max(d, math.Max(f-float64(i)/n, float64(i+1)/n-f))
	}
	return d
}

// ksCritical is the asymptotic Kolmogorov critical value at significance
// 0.001, 1.95/sqrt(n) (standard asymptotic KS table value, common practice).
func ksCritical(n int) float64 { return 1.95 / math.Sqrt(float64(n)) }

// powCDF is the CDF of f(x) ∝ x^k on [lo, hi], written from the analytic
// integral (x^(k+1) - lo^(k+1)) / (hi^(k+1) - lo^(k+1)), or the logarithmic
// form at k = -1.
func powCDF(x, lo, hi, k float64) float64 {
	if k == -1 {
		return math.Log(x/lo) / math.Log(hi/lo)
	}
	s := k + 1
	return (math.Pow(x, s) - math.Pow(lo, s)) / (math.Pow(hi, s) - math.Pow(lo, s))
}

type distCase struct {
	name string
	d    Distribution
	cdf  func(float64) float64 // reference CDF written in the test
	lo   float64               // support, for round trips
	hi   float64
}

func distCases() []distCase {
	return []distCase{
		// Sana et al. (2012, Science 337, 444): f(q) ∝ q^-0.1; analytic integral.
		{"MassRatio Sana", MassRatio{Kappa: -0.1, QMin: 0.1},
			func(q float64) float64 { return powCDF(q, 0.1, 1, -0.1) }, 0.1, 1},
		// Uniform mass ratio: F(q) = q (analytic).
		{"MassRatio flat", MassRatio{Kappa: 0, QMin: 0},
			func(q float64) float64 { return q }, 0, 1},
		// Kappa = -1, flat in ln q: F = ln(q/qmin)/ln(1/qmin) (analytic).
		{"MassRatio kappa=-1", MassRatio{Kappa: -1, QMin: 0.05},
			func(q float64) float64 { return powCDF(q, 0.05, 1, -1) }, 0.05, 1},
		// Steep index (analytic integral).
		{"MassRatio kappa=-2.5", MassRatio{Kappa: -2.5, QMin: 0.1},
			func(q float64) float64 { return powCDF(q, 0.1, 1, -2.5) }, 0.1, 1},
		// Sana et al. (2012): f(log10 P) ∝ (log10 P)^-0.55 on [0.15, 5.5]; analytic integral in log10 P.
		{"SanaPeriod", SanaPeriod{LogPMin: 0.15, LogPMax: 5.5, Exponent: -0.55},
			func(p float64) float64 { return powCDF(math.Log10(p), 0.15, 5.5, -0.55) },
			math.Pow(10, 0.15), math.Pow(10, 5.5)},
		// Öpik (1924): flat in log a; F = ln(a/amin)/ln(amax/amin) (analytic).
		{"Opik", OpikSeparation{AMin: 0.01, AMax: 1e4},
			func(a float64) float64 { return math.Log(a/0.01) / math.Log(1e6) }, 0.01, 1e4},
		// Thermal f(e) = 2e (Jeans 1919; common practice): F = e^2 (analytic).
		{"Thermal", Thermal{},
			func(e float64) float64 { return e * e }, 0, 1},
		// Sana et al. (2012): f(e) ∝ e^-0.45 on [0, 0.9]; F = (e/0.9)^0.55 (analytic).
		{"PowerLawEcc Sana", PowerLawEcc{Exponent: -0.45, EMax: 0.9},
			func(e float64) float64 { return math.Pow(e/0.9, 0.55) }, 0, 0.9},
		// Thermal truncated at 0.8: F = (e/0.8)^2 (analytic).
		{"PowerLawEcc thermal", PowerLawEcc{Exponent: 1, EMax: 0.8},
			func(e float64) float64 { return (e / 0.8) * (e / 0.8) }, 0, 0.8},
	}
}

func TestDistributionsKS(t *testing.T) {
	const n = 100000
	for i, c := range distCases() {
		src := rand.New(rand.NewPCG(20120727, uint64(i)))
		x := make([]float64, n)
		for j := range x {
			x[j] = c.d.Rand(src)
			if !(x[j] >= c.lo && x[j] <= c.hi) {
				t.Fatalf("%s: sample %g outside the support [%g, %g]", c.name, x[j], c.lo, c.hi)
			}
		}
		if d := ksStatistic(x, c.cdf); d > ksCritical(n) {
			t.Errorf("%s: KS statistic %.5f above the 0.1%% critical value %.5f", c.name, d, ksCritical(n))
		}
	}
}

// TestKSDetectsWrongLaw checks that the KS test above has the power to see
// a wrong law: Sana's q^-0.1 mass ratios against a uniform law on [0.1, 1].
func TestKSDetectsWrongLaw(t *testing.T) {
	const n = 100000
	src := rand.New(rand.NewPCG(1, 2))
	d := MassRatio{Kappa: -0.1, QMin: 0.1}
	x := make([]float64, n)
	for j := range x {
		x[j] = d.Rand(src)
	}
	uniform := func(q float64) float64 { return (q - 0.1) / 0.9 }
	if ks := ksStatistic(x, uniform); ks < ksCritical(n) {
		t.Errorf("KS statistic %.5f against the wrong law is below the critical value %.5f", ks, ksCritical(n))
	}
}

func TestDistributionsCDFAgainstReference(t *testing.T) {
	for _, c := range distCases() {
		for i := 0; i <= 100; i++ {
			// Geometric grid for wide supports, linear otherwise.
			var x float64
			if c.lo > 0 && c.hi/c.lo > 100 {
				x = c.lo * math.Pow(c.hi/c.lo, float64(i)/100)
			} else {
				x = c.lo + (c.hi-c.lo)*float64(i)/100
			}
			got, want := c.d.CDF(x), c.cdf(x)
			if math.Abs(got-want) > 1e-13 {
				t.Errorf("%s: CDF(%g) = %.16g, want %.16g", c.name, x, got, want)
			}
		}
		if got := c.d.CDF(c.lo - 1); got != 0 {
			t.Errorf("%s: CDF below the support = %g, want 0", c.name, got)
		}
		if got := c.d.CDF(c.hi * 2); got != 1 {
			t.Errorf("%s: CDF above the support = %g, want 1", c.name, got)
		}
	}
}

func TestDistributionsQuantileRoundTrip(t *testing.T) {
	for _, c := range distCases() {
		for i := 0; i <= 200; i++ {
			p := float64(i) / 200
			x := c.d.Quantile(p)
			if !(x >= c.lo && x <= c.hi) {
				t.Errorf("%s: Quantile(%g) = %g outside [%g, %g]", c.name, p, x, c.lo, c.hi)
				continue
			}
			if got := c.d.CDF(x); math.Abs(got-p) > 1e-12 {
				t.Errorf("%s: CDF(Quantile(%g)) = %.16g", c.name, p, got)
			}
		}
		for _, p := range []float64{-0.1, 1.1, math.NaN()} {
			if got := c.d.Quantile(p); !math.IsNaN(got) {
				t.Errorf("%s: Quantile(%g) = %g, want NaN", c.name, p, got)
			}
		}
	}
}

// TestDistributionsProb checks each density against the central difference
// of its CDF (definition of a density), at interior points.
func TestDistributionsProb(t *testing.T) {
	type prober interface{ Prob(float64) float64 }
	for _, c := range distCases() {
		pd, ok := c.d.(prober)
		if !ok {
			t.Fatalf("%s has no Prob", c.name)
		}
		for i := 1; i < 20; i++ {
			var x float64
			if c.lo > 0 && c.hi/c.lo > 100 {
				x = c.lo * math.Pow(c.hi/c.lo, float64(i)/20)
			} else {
				x = c.lo + (c.hi-c.lo)*float64(i)/20
			}
			h := 1e-5 * x
			num := (c.cdf(x+h) - c.cdf(x-h)) / (2 * h)
			if got := pd.Prob(x); math.Abs(got-num) > 1e-6*num {
				t.Errorf("%s: Prob(%g) = %.10g, CDF slope %.10g", c.name, x, got, num)
			}
		}
		if got := pd.Prob(c.hi * 2); got != 0 {
			t.Errorf("%s: Prob above the support = %g, want 0", c.name, got)
		}
	}
}

// TestMassRatioNearLogUniform checks the numerically delicate index Kappa
// near -1: the median of a law flat in ln q on [0.1, 1] is sqrt(0.1)
// (analytic), and Kappa = -1 ± 1e-9 must agree with it.
func TestMassRatioNearLogUniform(t *testing.T) {
	want := math.Sqrt(0.1)
	for _, k := range []float64{-1, -1 - 1e-9, -1 + 1e-9} {
		d := MassRatio{Kappa: k, QMin: 0.1}
		if got := d.Quantile(0.5); math.Abs(got-want) > 1e-9 {
			t.Errorf("Kappa = %g: median %.15g, want %.15g", k, got, want)
		}
		if got := d.CDF(want); math.Abs(got-0.5) > 1e-9 {
			t.Errorf("Kappa = %g: CDF(sqrt(0.1)) = %.15g, want 0.5", k, got)
		}
	}
}

func TestCircular(t *testing.T) {
	src := rand.New(rand.NewPCG(3, 4))
	var c Circular
	for range 10 {
		if e := c.Rand(src); e != 0 {
			t.Fatalf("Circular.Rand = %g, want 0", e)
		}
	}
	if c.CDF(0) != 1 || c.CDF(-1e-300) != 0 || c.Quantile(0.7) != 0 {
		t.Errorf("Circular: CDF(0) = %g, CDF(-tiny) = %g, Quantile(0.7) = %g; want 1, 0, 0",
			c.CDF(0), c.CDF(-1e-300), c.Quantile(0.7))
	}
}

func TestDistributionValidation(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name    string
		err     error
		mention string // the parameter name the message must contain
	}{
		{"qmin>=1", mustErr(NewMassRatio(0, 1)), "QMin"},
		{"qmin<0", mustErr(NewMassRatio(0, -0.1)), "QMin"},
		{"qmin=0,kappa=-1", mustErr(NewMassRatio(-1, 0)), "Kappa"},
		{"kappa NaN", mustErr(NewMassRatio(nan, 0.1)), "Kappa"},
		{"logpmin<0", mustErr(NewSanaPeriod(-0.5, 5.5, -0.55)), "LogPMin"},
		{"logpmax<=logpmin", mustErr(NewSanaPeriod(2, 2, -0.55)), "LogPMax"},
		{"logpmin=0,exp=-1", mustErr(NewSanaPeriod(0, 5.5, -1)), "Exponent"},
		{"period exp inf", mustErr(NewSanaPeriod(0.15, 5.5, math.Inf(1))), "Exponent"},
		{"amin=0", mustErr(NewOpikSeparation(0, 10)), "AMin"},
		{"amax<amin", mustErr(NewOpikSeparation(10, 1)), "AMax"},
		{"amax inf", mustErr(NewOpikSeparation(1, math.Inf(1))), "AMax"},
		{"ecc exp -1", mustErr(NewPowerLawEcc(-1, 1)), "Exponent"},
		{"emax 0", mustErr(NewPowerLawEcc(-0.45, 0)), "EMax"},
		{"emax >1", mustErr(NewPowerLawEcc(-0.45, 1.2)), "EMax"},
	}
	for _, c := range cases {
		if c.err == nil {
			t.Errorf("%s: no error", c.name)
			continue
		}
		if msg := c.err.Error(); !strings.Contains(msg, c.mention) || !strings.HasPrefix(msg, "binary: ") {
			t.Errorf("%s: error %q does not name %s", c.name, msg, c.mention)
		}
	}
	// Published parameter sets are valid (Sana et al. 2012; Öpik 1924).
	for _, err := range []error{
		mustErr(NewMassRatio(-0.1, 0.1)),
		mustErr(NewSanaPeriod(0.15, 5.5, -0.55)),
		mustErr(NewOpikSeparation(0.01, 1e5)),
		mustErr(NewPowerLawEcc(-0.45, 0.99)),
	} {
		if err != nil {
			t.Errorf("valid parameters rejected: %v", err)
		}
	}
}

func mustErr[T any](_ T, err error) error { return err }

// TestKeplerThirdLaw: 1 Msun and 1 AU give one year. The period is
// recomputed here from the constants (G M_sun: IAU 2015 B3; AU: IAU 2012;
// day 86400 s) and compared with the sidereal year 365.256363 d (handbook
// value, Astronomical Almanac) within 1e-4; the Julian year 365.25 d is
// within 1e-4 too.
func TestKeplerThirdLaw(t *testing.T) {
	const gm, au, day = 1.3271244e20, 1.495978707e11, 86400.0
	want := 2 * math.Pi * math.Sqrt(au*au*au/gm) / day
	got := PeriodDays(1, 1)
	if math.Abs(got-want) > 1e-12*want {
		t.Errorf("PeriodDays(1 AU, 1 Msun) = %.12g d, want %.12g d", got, want)
	}
	for _, year := range []float64{365.256363, 365.25} {
		if math.Abs(got-year) > 1e-4*year {
			t.Errorf("PeriodDays(1 AU, 1 Msun) = %.8g d, more than 1e-4 from %g d", got, year)
		}
	}
	// Round trip and the P ∝ a^(3/2) M^(-1/2) scaling of Kepler's third law.
	for _, c := range []struct{ a, m float64 }{{0.01, 30}, {1, 1}, {4, 2}, {1e4, 60}} {
		p := PeriodDays(c.a, c.m)
		if a := SeparationAU(p, c.m); math.Abs(a-c.a) > 1e-13*c.a {
			t.Errorf("SeparationAU(PeriodDays(%g, %g)) = %.15g", c.a, c.m, a)
		}
		scaled := want * math.Pow(c.a, 1.5) / math.Sqrt(c.m)
		if math.Abs(p-scaled) > 1e-12*scaled {
			t.Errorf("PeriodDays(%g, %g) = %.12g, want %.12g", c.a, c.m, p, scaled)
		}
	}
	if !math.IsNaN(PeriodDays(1, 0)) || !math.IsNaN(SeparationAU(-1, 1)) {
		t.Error("invalid inputs should give NaN")
	}
}
