package figures

import (
	"fmt"
	"math"
	"sort"
)

// Hist is a histogram of a sample on fixed bin edges, with the heights a figure draws.
//
// Bin i holds the values x with Edges[i] <= x < Edges[i+1]; the last bin also holds x equal to the
// last edge. Values[i] is Counts[i] times Scale[i] and Errors[i] is sqrt(Counts[i]) times the same
// Scale[i], the Poisson standard error of the height.
type Hist struct {
	Edges   []float64 // bin edges, strictly increasing; len(Edges) = len(Counts)+1
	Counts  []int64   // number of values in each bin
	Scale   []float64 // factor from a count to a drawn height, per bin
	Values  []float64 // drawn height of each bin
	Errors  []float64 // Poisson standard error of each height
	Outside int64     // values below the first edge, above the last, or NaN (not drawn)
}

// NewHist bins xs on edges, with Scale 1 (heights are counts). It returns an error if edges has
// fewer than two values or is not strictly increasing.
func NewHist(xs, edges []float64) (Hist, error) {
	if len(edges) < 2 {
		return Hist{}, fmt.Errorf("figures: histogram needs at least 2 bin edges, got %d", len(edges))
	}
	for i := 1; i < len(edges); i++ {
		if !(edges[i] > edges[i-1]) {
			return Hist{}, fmt.Errorf("figures: bin edges must increase strictly; edge %d is %v after %v", i, edges[i], edges[i-1])
		}
	}
	n := len(edges) - 1
	h := Hist{
		Edges:  append([]float64(nil), edges...),
		Counts: make([]int64, n),
		Scale:  make([]float64, n),
		Values: make([]float64, n),
		Errors: make([]float64, n),
	}
	for _, x := range xs {
		i := binIndex(h.Edges, x)
		if i < 0 {
			h.Outside++
			continue
		}
		h.Counts[i]++
	}
	for i := range h.Scale {
		h.Scale[i] = 1
	}
	h.update()
	return h, nil
}

// binIndex returns the bin of x on edges, or -1 when x lies outside them or is NaN.
func binIndex(edges []float64, x float64) int {
	n := len(edges) - 1
	if !(x >= edges[0] && x <= edges[n]) {
		return -1
	}
	// The first edge greater than x closes x's bin.
	i := sort.SearchFloat64s(edges, math.Nextafter(x, math.Inf(1))) - 1
	return min(i, n-1)
}

func (h *Hist) update() {
	for i, c := range h.Counts {
		h.Values[i] = float64(c) * h.Scale[i]
		h.Errors[i] = math.Sqrt(float64(c)) * h.Scale[i]
	}
}

// Total returns the number of values in the bins.
func (h *Hist) Total() int64 {
	var n int64
	for _, c := range h.Counts {
		n += c
	}
	return n
}

// PerUnitWidth divides each bin by its width and by norm: the heights become dN/dx / norm.
func (h *Hist) PerUnitWidth(norm float64) {
	for i := range h.Scale {
		h.Scale[i] = 1 / ((h.Edges[i+1] - h.Edges[i]) * norm)
	}
	h.update()
}

// PerUnitLog10Width divides each bin by its width in log10 x and by norm: the heights become
// dN/dlog10(x) / norm. The edges must be positive.
func (h *Hist) PerUnitLog10Width(norm float64) {
	for i := range h.Scale {
		h.Scale[i] = 1 / (math.Log10(h.Edges[i+1]/h.Edges[i]) * norm)
	}
	h.update()
}

// LogEdges returns n+1 edges from lo to hi equally spaced in log10 (lo, hi > 0).
func LogEdges(lo, hi float64, n int) []float64 {
	a, b := math.Log10(lo), math.Log10(hi)
	e := make([]float64, n+1)
	for i := range e {
		e[i] = math.Pow(10, a+(b-a)*float64(i)/float64(n))
	}
	e[0], e[n] = lo, hi
	return e
}

// niceStep returns the smallest of 1, 2, 2.5 and 5 times a power of ten that is >= x (x > 0).
func niceStep(x float64) float64 {
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= x*(1-1e-12) {
			return m * p
		}
	}
	return 10 * p
}

// NiceLinearEdges returns edges of a round width (1, 2, 2.5 or 5 times a power of ten) that cover
// [lo, hi] in about bins bins, starting at a multiple of the width (at 0 when lo >= 0 and lo is
// within bins widths of it, so mass and speed axes start at the origin).
func NiceLinearEdges(lo, hi float64, bins int) []float64 {
	if bins < 1 {
		bins = 1
	}
	if !(hi > lo) {
		hi = lo + 1
	}
	w := niceStep((hi - lo) / float64(bins))
	start := math.Floor(lo/w) * w
	if lo >= 0 && lo < float64(bins)*w/4 {
		start = 0
	}
	n := int(math.Ceil((hi-start)/w - 1e-9))
	if start+float64(n)*w < hi {
		n++
	}
	n = max(n, 1)
	e := make([]float64, n+1)
	for i := range e {
		e[i] = start + float64(i)*w
	}
	return e
}

// NiceLogEdges returns edges spaced by 1/perDex in log10 x, on the grid 10^(k/perDex), that cover
// [lo, hi] (lo, hi > 0).
func NiceLogEdges(lo, hi float64, perDex int) []float64 {
	if perDex < 1 {
		perDex = 1
	}
	if !(hi > lo) {
		hi = lo * 10
	}
	pd := float64(perDex)
	k0 := int(math.Floor(math.Log10(lo)*pd + 1e-9))
	k1 := int(math.Ceil(math.Log10(hi)*pd - 1e-9))
	if k1 <= k0 {
		k1 = k0 + 1
	}
	e := make([]float64, 0, k1-k0+1)
	for k := k0; k <= k1; k++ {
		e = append(e, math.Pow(10, float64(k)/pd))
	}
	// Rounding of Pow can leave lo or hi a hair outside.
	e[0] = math.Min(e[0], lo)
	e[len(e)-1] = math.Max(e[len(e)-1], hi)
	return e
}

// positiveExtent returns the smallest and largest finite values > 0 of the samples (NaN, NaN
// when there are none).
func positiveExtent(samples ...[]float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, s := range samples {
		for _, x := range s {
			if x > 0 && !math.IsInf(x, 0) {
				lo, hi = math.Min(lo, x), math.Max(hi, x)
			}
		}
	}
	if lo > hi {
		return math.NaN(), math.NaN()
	}
	return lo, hi
}
