package binary

import (
	"math"
	"testing"
)

// bisectKepler solves M = E - e sin E on [M - 1, M + 1] by plain bisection,
// an independent reference (the left side is increasing in E).
func bisectKepler(m, e float64) float64 {
	lo, hi := m-1, m+1
	for range 200 {
		mid := 0.5 * (lo + hi)
		if mid-e*math.Sin(mid) < m {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

var keplerEcc = []float64{0, 1e-8, 0.1, 0.5, 0.9, 0.99, 0.999, 0.9999, 1 - 1e-9}

// TestKeplerResidual: |E - e sin E - M| < 1e-14 (machine precision for
// |M| up to 4 pi), and |E - M| <= e, over a grid of M including values near
// 0 and pi where high eccentricities are hardest.
func TestKeplerResidual(t *testing.T) {
	var ms []float64
	for i := -400; i <= 400; i++ {
		ms = append(ms, float64(i)*math.Pi/100)
	}
	for _, d := range []float64{1e-12, 1e-9, 1e-6, 1e-3} {
		ms = append(ms, d, -d, math.Pi-d, math.Pi+d, 2*math.Pi-d)
	}
	for _, e := range keplerEcc {
		for _, m := range ms {
			ea := Kepler(m, e)
			if r := math.Abs(ea - e*math.Sin(ea) - m); r > 1e-14 {
				t.Errorf("e = %g, M = %g: E = %.17g, residual %.3g", e, m, ea, r)
			}
			if math.Abs(ea-m) > e+1e-15 {
				t.Errorf("e = %g, M = %g: E = %.17g is not within e of M", e, m, ea)
			}
		}
	}
}

// TestKeplerKnownValues: M = pi and M = 0 are fixed points of Kepler's
// equation for every e (analytic: sin pi = sin 0 = 0); Meeus (1998,
// Astronomical Algorithms, 2nd ed., example 30.a, from memory; checked by
// substitution: 5.554589253 - 0.1 sin(5.554589253 deg) in degrees = 5.0000000):
// e = 0.1, M = 5 deg -> E = 5.554589253 deg; and the independent bisection.
func TestKeplerKnownValues(t *testing.T) {
	for _, e := range keplerEcc {
		if got := Kepler(math.Pi, e); got != math.Pi {
			t.Errorf("Kepler(pi, %g) = %.17g, want pi", e, got)
		}
		if got := Kepler(0, e); got != 0 {
			t.Errorf("Kepler(0, %g) = %g, want 0", e, got)
		}
	}
	deg := math.Pi / 180
	if got := Kepler(5*deg, 0.1) / deg; math.Abs(got-5.554589253) > 1e-8 {
		t.Errorf("Kepler(5 deg, 0.1) = %.10f deg, want 5.554589253 (Meeus example 30.a)", got)
	}
	// Against bisection for moderate e, where E is well conditioned
	// (dE/dM = 1/(1 - e cos E) <= 100).
	for _, e := range []float64{0.05, 0.3, 0.7, 0.95, 0.99} {
		for i := range 50 {
			m := -3 + 0.13*float64(i)
			if got, want := Kepler(m, e), bisectKepler(m, e); math.Abs(got-want) > 1e-13 {
				t.Errorf("Kepler(%g, %g) = %.16g, bisection %.16g", m, e, got, want)
			}
		}
	}
}

// TestKeplerPeriodic: Kepler(M + 2 pi k) = Kepler(M) + 2 pi k and
// Kepler(-M) = -Kepler(M) (symmetries of Kepler's equation).
func TestKeplerPeriodic(t *testing.T) {
	for _, e := range []float64{0.3, 0.97} {
		for _, m := range []float64{0.1, 1, 2.5, 3.1} {
			base := Kepler(m, e)
			if got := Kepler(-m, e); got != -base {
				t.Errorf("Kepler(-%g, %g) = %g, want %g", m, e, got, -base)
			}
			for _, k := range []float64{-3, -1, 1, 5} {
				got := Kepler(m+2*math.Pi*k, e)
				if math.Abs(got-(base+2*math.Pi*k)) > 1e-13 {
					t.Errorf("Kepler(%g + 2pi*%g, %g) = %.16g, want %.16g", m, k, e, got, base+2*math.Pi*k)
				}
			}
		}
	}
}

func TestKeplerInvalid(t *testing.T) {
	for _, c := range [][2]float64{{1, 1}, {1, -0.1}, {1, math.NaN()}, {math.NaN(), 0.5}, {math.Inf(1), 0.5}} {
		if got := Kepler(c[0], c[1]); !math.IsNaN(got) {
			t.Errorf("Kepler(%g, %g) = %g, want NaN", c[0], c[1], got)
		}
	}
}
