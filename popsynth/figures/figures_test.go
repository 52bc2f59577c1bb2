package figures

import (
	"context"
	"errors"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"testing"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

// testSet is the population of the test catalogues: all binaries, seen at 30 Myr so that many
// companions are still stars (bound BH + star systems exist), at two metallicities.
var testSet = []string{
	"systems=4000", "workers=2", "binary_fraction=1", "time_limit_myr=30", "binary.q_min=0.05",
	"metallicity.sampling=list", "metallicity.values=0.0002,0.0142",
}

// makeCatalogue runs the engine with testSet plus set and writes the catalogue to dir/name.
func makeCatalogue(t testing.TB, dir, name string, set ...string) string {
	t.Helper()
	cfg, err := popsynth.Load(popsynth.Sources{Set: append(slices.Clone(testSet), set...)})
	if err != nil {
		t.Fatal(err)
	}
	eng, err := popsynth.NewEngine(cfg)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, name)
	if _, err := eng.WriteCatalogue(context.Background(), path, nil); err != nil {
		t.Fatal(err)
	}
	return path
}

// table is a whole catalogue read into memory by the test itself: category columns as words,
// float columns as float64 with validity.
type table struct {
	n     int
	meta  map[string]string
	words map[string][]string
	nums  map[string][]float64
	ok    map[string][]bool
}

func readTable(t testing.TB, path string) table {
	t.Helper()
	r, err := catalog.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	tb := table{meta: r.Metadata(), words: map[string][]string{}, nums: map[string][]float64{}, ok: map[string][]bool{}}
	cols := r.Schema().Columns()
	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		for j, c := range cols {
			d := b.Cols[j]
			for i := range b.Len {
				switch c.Kind {
				case catalog.Category:
					w := "" // null
					if d.Valid == nil || d.Valid[i] {
						w = c.Categories[d.Cat[i]]
					}
					tb.words[c.Name] = append(tb.words[c.Name], w)
				case catalog.Float32:
					tb.nums[c.Name] = append(tb.nums[c.Name], float64(d.F32[i]))
					tb.ok[c.Name] = append(tb.ok[c.Name], d.Valid == nil || d.Valid[i])
				}
			}
		}
		tb.n += b.Len
	}
	return tb
}

// massRepresented parses the catalogue's mass_represented metadata.
func (tb table) massRepresented(t testing.TB) float64 {
	m, err := strconv.ParseFloat(tb.meta[catalog.MetaMassRepresented], 64)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// stars calls fn for every star of the table that exists: each primary, and the companion of
// every system that is not single.
func (tb table) stars(fn func(row int, prefix string)) {
	for i := range tb.n {
		fn(i, "")
		if tb.words["outcome"] != nil && tb.words["outcome"][i] != "single" {
			fn(i, "companion_")
		}
	}
}

// countIn counts xs in the bins of edges by a linear scan: [e_i, e_i+1), the last bin closed.
func countIn(xs, edges []float64) []int64 {
	n := len(edges) - 1
	c := make([]int64, n)
	for _, x := range xs {
		for i := range n {
			if x >= edges[i] && (x < edges[i+1] || (i == n-1 && x == edges[n])) {
				c[i]++
				break
			}
		}
	}
	return c
}

// checkHist compares a histogram with the test's own count of xs on the same edges, and its
// heights with count / (width(i) * norm) and errors with sqrt(count) / (width(i) * norm).
func checkHist(t *testing.T, what string, h Hist, xs []float64, width func(lo, hi float64) float64, norm float64) {
	t.Helper()
	want := countIn(xs, h.Edges)
	if !slices.Equal(h.Counts, want) {
		t.Errorf("%s: counts %v, the test counts %v", what, h.Counts, want)
		return
	}
	var inside int64
	for _, c := range want {
		inside += c
	}
	if h.Outside != int64(len(xs))-inside {
		t.Errorf("%s: %d values outside, want %d", what, h.Outside, int64(len(xs))-inside)
	}
	for i, c := range want {
		s := 1 / (width(h.Edges[i], h.Edges[i+1]) * norm)
		if v := float64(c) * s; math.Abs(h.Values[i]-v) > 1e-12*math.Abs(v) {
			t.Errorf("%s: bin %d height %g, want %g", what, i, h.Values[i], v)
		}
		if e := math.Sqrt(float64(c)) * s; math.Abs(h.Errors[i]-e) > 1e-12*math.Abs(e) {
			t.Errorf("%s: bin %d error %g, want %g", what, i, h.Errors[i], e)
		}
	}
}

func linearWidth(lo, hi float64) float64 { return hi - lo }
func log10Width(lo, hi float64) float64  { return math.Log10(hi / lo) }

func readCats(t *testing.T, paths ...string) []*Catalogue {
	t.Helper()
	cats := make([]*Catalogue, len(paths))
	for i, p := range paths {
		c, err := ReadCatalogue(p)
		if err != nil {
			t.Fatal(err)
		}
		cats[i] = c
	}
	return cats
}

// TestMassSpectrumCounts: the mass spectrum of two catalogues (rapid and delayed engines) equals
// the test's own count of NS and BH masses, primaries and companions, on the same edges, divided
// by bin width and mass represented, for linear and log bins; and its total agrees with the
// remnant tally of popsynth.Inspect, a separate reading of the same file.
func TestMassSpectrumCounts(t *testing.T) {
	dir := t.TempDir()
	paths := []string{makeCatalogue(t, dir, "rapid.parquet"), makeCatalogue(t, dir, "delayed.parquet", "explosion.engine=delayed")}
	cats := readCats(t, paths...)
	for _, logBins := range []bool{false, true} {
		f, err := NewMassSpectrum(cats, logBins, 0)
		if err != nil {
			t.Fatal(err)
		}
		if len(f.Series) != 2 {
			t.Fatalf("%d series, want one per catalogue", len(f.Series))
		}
		for k, path := range paths {
			tb := readTable(t, path)
			var masses []float64
			tb.stars(func(i int, p string) {
				if w := tb.words[p+"remnant_type"][i]; (w == "NS" || w == "BH") && tb.ok[p+"remnant_mass"][i] {
					masses = append(masses, tb.nums[p+"remnant_mass"][i])
				}
			})
			width := linearWidth
			if logBins {
				width = log10Width
			}
			h := f.Series[k].Hist
			checkHist(t, path, h, masses, width, tb.massRepresented(t))
			if h.Outside != 0 {
				t.Errorf("%s: %d remnants fall outside the bins; the edges must cover them all", path, h.Outside)
			}
			info, err := popsynth.Inspect(path)
			if err != nil {
				t.Fatal(err)
			}
			if got, want := h.Total(), info.Tally.Count(remnant.NS)+info.Tally.Count(remnant.BH); got != want {
				t.Errorf("%s: %d remnants in the spectrum, popsynth.Inspect counts %d NS + BH", path, got, want)
			}
		}
		if f.MaxNSMass != 2.5 {
			t.Errorf("NS/BH boundary %v, want the configured explosion.max_ns_mass 2.5", f.MaxNSMass)
		}
	}
}

// TestKicksCounts: kick histograms equal the test's count of kicks > 0 per type, normalised by the
// number of remnants of the type, and NoKick is the share with no kick.
func TestKicksCounts(t *testing.T) {
	path := makeCatalogue(t, t.TempDir(), "k.parquet")
	f, err := NewKicks(readCats(t, path), 0)
	if err != nil {
		t.Fatal(err)
	}
	tb := readTable(t, path)
	kicks := map[string][]float64{}
	total := map[string]int{}
	tb.stars(func(i int, p string) {
		w := tb.words[p+"remnant_type"][i]
		if (w != "NS" && w != "BH") || !tb.ok[p+"kick_speed"][i] {
			return
		}
		total[w]++
		if v := tb.nums[p+"kick_speed"][i]; v > 0 {
			kicks[w] = append(kicks[w], v)
		}
	})
	if len(f.Series) != 2 {
		t.Fatalf("%d series, want NS and BH", len(f.Series))
	}
	for k, typ := range []string{"NS", "BH"} {
		checkHist(t, typ+" kicks", f.Series[k].Hist, kicks[typ], linearWidth, float64(total[typ]))
		want := float64(total[typ]-len(kicks[typ])) / float64(total[typ])
		if math.Abs(f.NoKick[k]-want) > 1e-15 {
			t.Errorf("%s: share with no kick %v, the test finds %v", typ, f.NoKick[k], want)
		}
	}
	// The drawn histogram covers the remnants that moved: its area is 1 - NoKick.
	for k, s := range f.Series {
		var area float64
		for i, v := range s.Hist.Values {
			area += v * (s.Hist.Edges[i+1] - s.Hist.Edges[i])
		}
		if math.Abs(area-(1-f.NoKick[k])) > 1e-12 {
			t.Errorf("series %q: area %v, want 1 - %v", s.Label, area, f.NoKick[k])
		}
	}
}

// TestPeriodEccentricityPoints: the points are the final (eccentricity, period) of exactly the
// bound systems with one BH and one star, as the test selects them.
func TestPeriodEccentricityPoints(t *testing.T) {
	path := makeCatalogue(t, t.TempDir(), "pe.parquet")
	f, err := NewPeriodEccentricity(readCats(t, path))
	if err != nil {
		t.Fatal(err)
	}
	tb := readTable(t, path)
	type pt struct{ e, p float64 }
	var want []pt
	for i := range tb.n {
		a, b := tb.words["remnant_type"][i], tb.words["companion_remnant_type"][i]
		if tb.words["outcome"][i] == "bound" && ((a == "BH" && b == "star") || (a == "star" && b == "BH")) {
			want = append(want, pt{tb.nums["final_eccentricity"][i], tb.nums["final_period_days"][i]})
		}
	}
	if len(want) == 0 {
		t.Fatal("the test population has no bound BH + star binary; the test would not test anything")
	}
	s := f.Series[0]
	got := make([]pt, len(s.X))
	for i := range s.X {
		got[i] = pt{s.X[i], s.Y[i]}
	}
	cmp := func(a, b pt) int {
		if a.e != b.e {
			return cmpFloat(a.e, b.e)
		}
		return cmpFloat(a.p, b.p)
	}
	slices.SortFunc(got, cmp)
	slices.SortFunc(want, cmp)
	if !slices.Equal(got, want) {
		t.Errorf("%d points differ from the test's %d bound BH + star systems", len(got), len(want))
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// TestDelayTimesCounts: delay-time histograms per class equal the test's count of bound double
// compact objects, per log10 bin and per Msun formed.
func TestDelayTimesCounts(t *testing.T) {
	path := makeCatalogue(t, t.TempDir(), "d.parquet")
	f, err := NewDelayTimes(readCats(t, path), 0)
	if err != nil {
		t.Fatal(err)
	}
	tb := readTable(t, path)
	byClass := map[string][]float64{}
	for i := range tb.n {
		a, b := tb.words["remnant_type"][i], tb.words["companion_remnant_type"][i]
		compact := func(w string) bool { return w == "NS" || w == "BH" }
		if tb.words["outcome"][i] != "bound" || !compact(a) || !compact(b) {
			continue
		}
		cls := "BH-NS"
		if a == "BH" && b == "BH" {
			cls = "BBH"
		} else if a == "NS" && b == "NS" {
			cls = "NS-NS"
		}
		byClass[cls] = append(byClass[cls], tb.nums["delay_time_myr"][i])
	}
	if len(byClass) == 0 {
		t.Fatal("the test population has no double compact object")
	}
	seen := 0
	for _, s := range f.Series {
		for cls, d := range byClass {
			if len(s.Label) >= len(cls) && s.Label[:len(cls)] == cls {
				checkHist(t, cls, s.Hist, d, log10Width, tb.massRepresented(t))
				seen++
			}
		}
	}
	if seen != len(byClass) || len(f.Series) != len(byClass) {
		t.Errorf("series %d, matched %d, the test finds %d classes", len(f.Series), seen, len(byClass))
	}
	if f.AgeMyr != 13787 {
		t.Errorf("age of the Universe %v Myr, want 13787 (Planck Collaboration 2020, A&A 641, A6)", f.AgeMyr)
	}
}

// TestInitialFinal: the gaps drawn are exactly the grid stars with no remnant, they sit where the
// CO core crosses pair_instability.pisn_min_co (Farmer et al. 2019 thresholds, as configured),
// every point drawn is a star whose remnant phys.Star gives, and no drawn line joins two remnant
// kinds.
func TestInitialFinal(t *testing.T) {
	cfg := popsynth.Default()
	zs := []float64{0.0002, 0.002, 0.0142}
	f, err := NewInitialFinal(cfg, zs, false)
	if err != nil {
		t.Fatal(err)
	}
	phys, err := cfg.Physics()
	if err != nil {
		t.Fatal(err)
	}
	src := popsynth.Stream(1, 0)
	gapsSeen := 0
	for k, tr := range f.Tracks {
		if tr.Z != zs[k] || len(tr.Mass) != gridPoints {
			t.Fatalf("track %d: Z %v with %d masses", k, tr.Z, len(tr.Mass))
		}
		if tr.Mass[0] != cfg.IMF.SampleMin || tr.Mass[len(tr.Mass)-1] != cfg.IMF.SampleMax {
			t.Errorf("Z=%v: masses %v-%v, want the sampled range %v-%v", tr.Z, tr.Mass[0], tr.Mass[len(tr.Mass)-1], cfg.IMF.SampleMin, cfg.IMF.SampleMax)
		}
		inGap := func(m float64) bool {
			for _, iv := range f.Gaps[k] {
				if m >= iv.Lo && m <= iv.Hi {
					return true
				}
			}
			return false
		}
		for i, m := range tr.Mass {
			s, err := phys.Star(m, tr.Z, src)
			if err != nil {
				t.Fatal(err)
			}
			none := s.Remnant.Type == remnant.None
			if none != inGap(m) {
				t.Errorf("Z=%v M=%v: remnant %v but in a drawn gap: %v", tr.Z, m, s.Remnant.Type, inGap(m))
			}
			if s.Remnant.Type != tr.Remnant[i].Type || s.Remnant.Mass != tr.Remnant[i].Mass {
				t.Errorf("Z=%v M=%v: track has %v %v, phys.Star gives %v %v", tr.Z, m, tr.Remnant[i].Type, tr.Remnant[i].Mass, s.Remnant.Type, s.Remnant.Mass)
			}
		}
		for _, iv := range f.Gaps[k] {
			gapsSeen++
			// The star just below the gap has a CO core under pisn_min_co, the first star in
			// it one at or above.
			i := sortIndex(tr.Mass, iv.Lo)
			if i == 0 {
				continue
			}
			below, inside := tr.Core[i-1].COCoreMass, tr.Core[i].COCoreMass
			if !(below < cfg.PairInstability.PISNMinCO && inside >= cfg.PairInstability.PISNMinCO) {
				t.Errorf("Z=%v: gap starts at M=%v where the CO core goes %v -> %v; want it to cross pisn_min_co %v",
					tr.Z, iv.Lo, below, inside, cfg.PairInstability.PISNMinCO)
			}
		}
		// Each drawn run is one remnant kind.
		for _, run := range remnantRuns(&f.Tracks[k], axes{}) {
			kind := tr.Remnant[sortIndex(tr.Mass, run[0].X)].Type
			for _, pt := range run {
				if got := tr.Remnant[sortIndex(tr.Mass, pt.X)].Type; got != kind {
					t.Fatalf("Z=%v: a line joins %v and %v at M=%v", tr.Z, kind, got, pt.X)
				}
			}
		}
	}
	if gapsSeen == 0 {
		t.Error("no pair-instability gap at Z = 0.0002 over 8-150 Msun with the default physics; the shading is untested")
	}
	if f.MaxNSMass != cfg.Explosion.MaxNSMass {
		t.Errorf("NS/BH line at %v, want explosion.max_ns_mass %v", f.MaxNSMass, cfg.Explosion.MaxNSMass)
	}
	if _, err := NewInitialFinal(cfg, nil, false); err == nil {
		t.Error("no metallicity: want an error")
	}
}

// sortIndex returns the index of the first mass >= m.
func sortIndex(ms []float64, m float64) int {
	i, _ := slices.BinarySearch(ms, m)
	return min(i, len(ms)-1)
}

// TestCoresOrder: the core model drawn keeps its layers nested, M_CO <= M_He <= M_final <= M_init
// at every grid mass (common practice: the CO core lies inside the helium core, inside the star,
// and winds only remove mass).
func TestCoresOrder(t *testing.T) {
	f, err := NewCores(popsynth.Default(), 0.0002, false)
	if err != nil {
		t.Fatal(err)
	}
	for i, c := range f.Track.Core {
		m := f.Track.Mass[i]
		if !(c.COCoreMass <= c.HeCoreMass && c.HeCoreMass <= c.FinalMass && c.FinalMass <= m*(1+1e-12)) {
			t.Errorf("M=%v: CO %v, He %v, final %v are not nested", m, c.COCoreMass, c.HeCoreMass, c.FinalMass)
		}
	}
	if want := []float64{38, 60, 130}; !slices.Equal(f.PairInstability, want) {
		t.Errorf("pair-instability thresholds %v, want the default config's %v", f.PairInstability, want)
	}
}

// TestTitleAndLabels: shared headline assumptions go to the title, differing ones to the labels.
func TestTitleAndLabels(t *testing.T) {
	a := popsynth.Default()
	b := popsynth.Default()
	b.Explosion.Engine = "delayed"
	title, labels := titleAndLabels("H", []Info{{Name: "x", Config: a, HasConfig: true}, {Name: "y", Config: b, HasConfig: true}})
	if title != "H\nZ = 0.0142; Kroupa IMF, 8-150 Msun sampled" {
		t.Errorf("title %q", title)
	}
	if labels[0] != "x, rapid engine" || labels[1] != "y, delayed engine" {
		t.Errorf("labels %q", labels)
	}
	title, labels = titleAndLabels("H", []Info{{Name: "x", Config: a, HasConfig: true}})
	if title != "H\nrapid engine; Z = 0.0142; Kroupa IMF, 8-150 Msun sampled" || labels[0] != "x" {
		t.Errorf("one catalogue: title %q, labels %q", title, labels)
	}
}

// TestCatalogueErrors: catalogues that cannot make a figure say why.
func TestCatalogueErrors(t *testing.T) {
	dir := t.TempDir()
	// Singles only: no binary figure can be drawn.
	single := readCats(t, makeCatalogue(t, dir, "s.parquet", "binary_fraction=0"))
	if _, err := NewPeriodEccentricity(single); err == nil {
		t.Error("period-eccentricity of single stars: want an error")
	}
	if _, err := NewDelayTimes(single, 0); err == nil {
		t.Error("delay-times of single stars: want an error")
	}
	// A catalogue without mass_represented cannot be normalised.
	c := *single[0]
	c.MassRepresented = 0
	if _, err := NewMassSpectrum([]*Catalogue{&c}, false, 0); err == nil {
		t.Error("mass spectrum without mass represented: want an error")
	}
	if _, err := NewMassSpectrum(nil, false, 0); err == nil {
		t.Error("no catalogue: want an error")
	}
	if _, err := ReadCatalogue(filepath.Join(dir, "missing.parquet")); err == nil {
		t.Error("missing file: want an error")
	}
}
