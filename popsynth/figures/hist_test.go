package figures

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/plot"
)

// TestNewHistEdges: values on an inner edge go to the bin above, the last edge belongs to the last
// bin, values outside and NaN are counted as outside.
func TestNewHistEdges(t *testing.T) {
	h, err := NewHist([]float64{0, 0.5, 1, 1.999, 2, 3, -1, 3.5, math.NaN()}, []float64{0, 1, 2, 3})
	if err != nil {
		t.Fatal(err)
	}
	if want := []int64{2, 2, 2}; !slices.Equal(h.Counts, want) || h.Outside != 3 {
		t.Errorf("counts %v outside %d, want %v and 3", h.Counts, h.Outside, want)
	}
	for _, bad := range [][]float64{{1}, {0, 0}, {0, 2, 1}, {0, math.NaN()}} {
		if _, err := NewHist(nil, bad); err == nil {
			t.Errorf("edges %v: want an error", bad)
		}
	}
}

// TestDensityOfUniform: n points spread evenly over [0, 10) binned in 4 unequal bins give the
// density n/10 per unit x in every bin (analytic: a uniform density is constant), and
// per unit log10 x the count over the log10 width of each bin.
func TestDensityOfUniform(t *testing.T) {
	const n = 10000
	xs := make([]float64, n)
	for i := range xs {
		xs[i] = (float64(i) + 0.5) * 10 / n
	}
	h, err := NewHist(xs, []float64{0, 1, 2.5, 5, 10})
	if err != nil {
		t.Fatal(err)
	}
	h.PerUnitWidth(1)
	for i, v := range h.Values {
		if math.Abs(v-n/10) > 1e-9 {
			t.Errorf("bin %d: density %v, want %v", i, v, n/10.0)
		}
		if want := math.Sqrt(float64(h.Counts[i])) / (h.Edges[i+1] - h.Edges[i]); math.Abs(h.Errors[i]-want) > 1e-9 {
			t.Errorf("bin %d: error %v, want %v", i, h.Errors[i], want)
		}
	}
	g, _ := NewHist(xs, []float64{1, 10})
	g.PerUnitLog10Width(2)
	if want := 9000.0 / 2; math.Abs(g.Values[0]-want) > 1e-9 { // 9000 points in [1, 10], one decade
		t.Errorf("per log10 width: %v, want %v", g.Values[0], want)
	}
}

// TestNiceEdges: round widths that cover the range; log edges on the 10^(k/perDex) grid.
func TestNiceEdges(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		bins   int
		width  float64
	}{
		{0, 46, 80, 1}, {0, 1370, 60, 25}, {0.3, 0.9, 10, 0.1}, {5, 5, 10, 0.1},
	} {
		e := NiceLinearEdges(c.lo, c.hi, c.bins)
		if w := e[1] - e[0]; math.Abs(w-c.width) > 1e-9*c.width {
			t.Errorf("%v-%v in ~%d bins: width %v, want %v", c.lo, c.hi, c.bins, w, c.width)
		}
		if e[0] > c.lo || e[len(e)-1] < c.hi {
			t.Errorf("%v-%v: edges %v-%v do not cover it", c.lo, c.hi, e[0], e[len(e)-1])
		}
	}
	e := NiceLogEdges(1.2, 45, 20)
	if e[0] > 1.2 || e[len(e)-1] < 45 || math.Abs(math.Log10(e[2]/e[1])-0.05) > 1e-12 {
		t.Errorf("log edges %v", e)
	}
}

// TestTicks: log ticks label decades (and 2, 5 on short ranges) in data units; linear ticks use
// round steps with the decimals they need.
func TestTicks(t *testing.T) {
	for _, c := range []struct {
		lo, hi float64
		ticker plot.Ticker
		want   []string
	}{
		{math.Log10(0.7), math.Log10(60), logTicks{}, []string{"1", "2", "5", "10", "20", "50"}},
		{-7.3, -2.1, logTicks{}, []string{"1e-7", "1e-6", "1e-5", "1e-4", "1e-3"}},
		{0, 21, logTicks{}, []string{"1e0", "1e3", "1e6", "1e9", "1e12", "1e15", "1e18", "1e21"}},
		{0, 150, linearTicks{}, []string{"0", "50", "100", "150"}},
		{0, 0.0023, linearTicks{}, []string{"0.0000", "0.0005", "0.0010", "0.0015", "0.0020"}},
		{0, 1, linearTicks{}, []string{"0.0", "0.2", "0.4", "0.6", "0.8", "1.0"}},
		{0, 62, linearTicks{}, []string{"0", "20", "40", "60"}},
	} {
		var got []string
		for _, tk := range c.ticker.Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("%T %v-%v: %q, want %q", c.ticker, c.lo, c.hi, got, c.want)
		}
	}
}

// TestNewHistAgreesWithScan: binary-search binning agrees with a linear scan of the edges for
// random values, values exactly on every edge and their float neighbours (log edges, which are
// not exactly representable).
func TestNewHistAgreesWithScan(t *testing.T) {
	src := rand.New(rand.NewPCG(1, 2))
	edges := NiceLogEdges(1e-3, 1e21, 7)
	var xs []float64
	for range 5000 {
		xs = append(xs, math.Pow(10, -4+26*src.Float64()))
	}
	for _, e := range edges {
		xs = append(xs, e, math.Nextafter(e, 0), math.Nextafter(e, math.Inf(1)))
	}
	h, err := NewHist(xs, edges)
	if err != nil {
		t.Fatal(err)
	}
	if want := countIn(xs, edges); !slices.Equal(h.Counts, want) {
		t.Errorf("binary search %v\nlinear scan   %v", h.Counts, want)
	}
}
