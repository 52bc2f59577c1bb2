package rates

import (
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// Quadrature scheme for the Friedmann integrals.
//
// Every cosmological integral here is written in s = sqrt(a) = (1+z)^-1/2,
// where its integrand is analytic on (0, 1] for any non-negative density
// parameters (see cosmology.go). The interval [lo, hi] ⊂ [0, 1] is cut into
// geometric panels [hi/2, hi], [hi/4, hi/2], ... down to lo (or down to
// panelFloor, below which one last panel reaches lo), and each panel is
// integrated with Gauss–Legendre rules of glLow and glHigh points. The
// geometric grading keeps every panel far, relative to its width, from the
// complex poles near s = ±i sqrt(OmegaR/OmegaM) that radiation puts close to
// the origin. The glHigh-point sum is returned; the absolute difference from
// the glLow-point sum is returned as the error estimate, which bounds the
// error of the lower-order rule and so, very conservatively, of the returned
// value.
const (
	glLow      = 10
	glHigh     = 20
	panelFloor = 1e-6
)

// gaussLegendre holds the nodes and weights of one rule on [-1, 1].
type gaussLegendre struct {
	x, w []float64
}

func newGaussLegendre(n int) gaussLegendre {
	g := gaussLegendre{x: make([]float64, n), w: make([]float64, n)}
	quad.Legendre{}.FixedLocations(g.x, g.w, -1, 1)
	return g
}

// The two rules are computed once and only read afterwards.
var (
	ruleLow  = newGaussLegendre(glLow)
	ruleHigh = newGaussLegendre(glHigh)
)

// integrand selects one of the Friedmann integrands in s.
type integrand int

const (
	timeIntegrand     integrand = iota // 2 s^3 / sqrt(g(s^2)): cosmic time in Hubble times
	distanceIntegrand                  // 2 s / sqrt(g(s^2)): comoving distance in Hubble distances
)

// eval returns the integrand at s, with g(a) = OmegaR + OmegaM a + OmegaL a^4.
func (c Cosmology) eval(kind integrand, s float64) float64 {
	a := s * s
	a2 := a * a
	g := c.OmegaR + c.OmegaM*a + c.OmegaLambda()*a2*a2
	if kind == timeIntegrand {
		return 2 * s * a / math.Sqrt(g)
	}
	return 2 * s / math.Sqrt(g)
}

// integrate returns ∫_lo^hi of the integrand over s, 0 <= lo <= hi <= 1, with
// an error estimate (see the scheme above). It does not allocate.
func (c Cosmology) integrate(kind integrand, lo, hi float64) (val, errEst float64) {
	if !(lo < hi) {
		return 0, 0
	}
	b := hi
	for b > lo {
		a := b / 2
		if a < lo || b <= panelFloor {
			a = lo
		}
		half, mid := (b-a)/2, (b+a)/2
		var sl, sh float64
		for i, x := range ruleLow.x {
			sl += ruleLow.w[i] * c.eval(kind, mid+half*x)
		}
		for i, x := range ruleHigh.x {
			sh += ruleHigh.w[i] * c.eval(kind, mid+half*x)
		}
		val += half * sh
		errEst += half * math.Abs(sh-sl)
		b = a
	}
	return val, errEst
}
