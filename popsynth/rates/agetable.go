package rates

import (
	"fmt"
	"math"
	"sort"
)

// ageTable inverts the age–redshift relation quickly for the rate
// estimator. It tabulates x = ln t(z) at n+1 nodes equally spaced in
// u = ln(1+z) on [0, ln(1+zMax)], with the exact slopes
// dx/du = -1 / (H0 E(z) t(z)), and interpolates u as a function of x by the
// cubic Hermite polynomial through the two neighbouring nodes and their slopes
// du/dx = 1/(dx/du). The error of cubic Hermite interpolation is at most
// h^4/384 max|u””(x)| on a node spacing h (common practice; e.g. Burden &
// Faires, Numerical Analysis, section 3.4); u(x) is smooth in both the
// radiation era (u ≈ -x/2 + const) and the matter era (u ≈ -2x/3 + const),
// and with the default spacing the interpolation error in z is below 1e-10
// (1+z) (tested against Cosmology.RedshiftAtAge).
type ageTable struct {
	x     []float64 // ln age, Gyr; decreasing
	u     []float64 // ln(1+z); increasing
	dudx  []float64 // slope of u(x) at the nodes
	tMin  float64   // age at zMax, Gyr
	tNow  float64   // age today, Gyr
	zMax  float64
	negX  []float64 // -x, increasing, for binary search
	nodes int
}

// newAgeTable tabulates c from z = 0 to zMax with n intervals.
func newAgeTable(c Cosmology, zMax float64, n int) (*ageTable, error) {
	if !(zMax > 0) || math.IsInf(zMax, 0) {
		return nil, fmt.Errorf("rates: maximum formation redshift %v; want a finite value > 0", zMax)
	}
	uMax := math.Log1p(zMax)
	tb := &ageTable{
		x:     make([]float64, n+1),
		u:     make([]float64, n+1),
		dudx:  make([]float64, n+1),
		negX:  make([]float64, n+1),
		zMax:  zMax,
		nodes: n + 1,
	}
	th := c.HubbleTimeGyr()
	// Ages from the oldest node down: one short integral per interval.
	t := c.AgeGyr(zMax)
	sPrev := 1 / math.Sqrt(1+zMax)
	for i := n; i >= 0; i-- {
		u := uMax * float64(i) / float64(n)
		if i == n {
			u = uMax
		}
		z := math.Expm1(u)
		s := math.Exp(-u / 2)
		if i < n {
			v, _ := c.integrate(timeIntegrand, sPrev, s)
			t += v * th
		}
		sPrev = s
		tb.u[i] = u
		tb.x[i] = math.Log(t)
		tb.negX[i] = -tb.x[i]
		// dx/du = (dt/du)/t with dt/du = -t_H / E(z).
		tb.dudx[i] = -t * c.E(z) / th
	}
	tb.tMin = math.Exp(tb.x[n])
	tb.tNow = math.Exp(tb.x[0])
	return tb, nil
}

// redshift returns z at age tGyr, for tMin <= tGyr <= tNow; callers check
// the range. It does not allocate.
func (tb *ageTable) redshift(tGyr float64) float64 {
	x := math.Log(tGyr)
	// Find i with x[i+1] <= x <= x[i].
	i := sort.SearchFloat64s(tb.negX, -x) - 1
	if i < 0 {
		i = 0
	}
	if i > tb.nodes-2 {
		i = tb.nodes - 2
	}
	x0, x1 := tb.x[i], tb.x[i+1]
	h := x1 - x0
	p := (x - x0) / h
	p2 := p * p
	p3 := p2 * p
	h00 := 2*p3 - 3*p2 + 1
	h10 := p3 - 2*p2 + p
	h01 := -2*p3 + 3*p2
	h11 := p3 - p2
	u := h00*tb.u[i] + h10*h*tb.dudx[i] + h01*tb.u[i+1] + h11*h*tb.dudx[i+1]
	return math.Expm1(u)
}
