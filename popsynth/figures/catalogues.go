package figures

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Figure is a figure's data, ready to draw.
type Figure interface {
	// Plot draws the figure.
	Plot() (*plot.Plot, error)
}

// HistSeries is one histogram of a figure and its legend label.
type HistSeries struct {
	Label string
	Hist  Hist
}

// PointSeries is one set of points of a figure and its legend label.
type PointSeries struct {
	Label string
	X, Y  []float64
}

func infos(cats []*Catalogue) []Info {
	in := make([]Info, len(cats))
	for i, c := range cats {
		in[i] = c.Info
	}
	return in
}

func needMass(c *Catalogue) error {
	if !(c.MassRepresented > 0) {
		return fmt.Errorf("%s: the metadata lacks %s, so counts cannot be given per unit stellar mass formed",
			c.Path, "corefall.mass_represented")
	}
	return nil
}

// Default bin numbers.
const (
	defaultLinearBins = 80 // bins across a linear axis
	defaultPerDex     = 20 // bins per decade of remnant mass on a log axis
)

// MassSpectrum is the remnant mass distribution of one or more catalogues: every neutron star and
// black hole, primaries and companions alike, per unit stellar mass formed.
type MassSpectrum struct {
	Title string
	// Log is true for log10-spaced bins drawn on a log mass axis, with heights dN/dlog10(M) per
	// Msun formed (Msun^-1); false for equal bins with heights dN/dM per Msun formed (Msun^-2).
	Log    bool
	Series []HistSeries // one per catalogue, on common edges
	// MaxNSMass (Msun) is drawn as the NS/BH boundary when every catalogue has the same one;
	// 0 otherwise.
	MaxNSMass float64
}

// NewMassSpectrum bins the neutron-star and black-hole masses of cats on common edges: with log,
// bins equally spaced in log10 M (bins per decade, 20 when bins <= 0); otherwise bins of a round
// width, about bins of them (80 when bins <= 0). Heights are divided by the bin width (in M or in
// log10 M) and by each catalogue's mass represented; errors are sqrt(N) scaled alike.
func NewMassSpectrum(cats []*Catalogue, log bool, bins int) (*MassSpectrum, error) {
	if len(cats) == 0 {
		return nil, fmt.Errorf("figures: mass spectrum: no catalogue given")
	}
	var samples [][]float64
	for _, c := range cats {
		if err := needMass(c); err != nil {
			return nil, err
		}
		samples = append(samples, c.NS.Mass, c.BH.Mass)
	}
	lo, hi := positiveExtent(samples...)
	if math.IsNaN(lo) {
		return nil, fmt.Errorf("figures: mass spectrum: %s holds no neutron star or black hole", names(cats))
	}
	var edges []float64
	if log {
		if bins <= 0 {
			bins = defaultPerDex
		}
		edges = NiceLogEdges(lo, hi, bins)
	} else {
		if bins <= 0 {
			bins = defaultLinearBins
		}
		edges = NiceLinearEdges(0, hi, bins)
	}
	title, labels := titleAndLabels("Neutron-star and black-hole masses", infos(cats))
	f := &MassSpectrum{Title: title, Log: log}
	for i, c := range cats {
		h, err := NewHist(append(append([]float64(nil), c.NS.Mass...), c.BH.Mass...), edges)
		if err != nil {
			return nil, err
		}
		if log {
			h.PerUnitLog10Width(c.MassRepresented)
		} else {
			h.PerUnitWidth(c.MassRepresented)
		}
		f.Series = append(f.Series, HistSeries{Label: fmt.Sprintf("%s (%d NS, %d BH)", labels[i], len(c.NS.Mass), len(c.BH.Mass)), Hist: h})
	}
	if cats[0].HasConfig {
		f.MaxNSMass = cats[0].Config.Explosion.MaxNSMass
		for _, c := range cats[1:] {
			if !c.HasConfig || c.Config.Explosion.MaxNSMass != f.MaxNSMass {
				f.MaxNSMass = 0
			}
		}
	}
	return f, nil
}

func names(cats []*Catalogue) string {
	if len(cats) == 1 {
		return cats[0].Path
	}
	s := "none of"
	for i, c := range cats {
		if i > 0 {
			s += ","
		}
		s += " " + c.Path
	}
	return s
}

// Plot draws the spectrum: a step outline per catalogue with Poisson error bars, on a log y axis.
func (f *MassSpectrum) Plot() (*plot.Plot, error) {
	ylabel := "dN/dM per Msun formed\n[Msun^-1 Msun^-1]"
	if f.Log {
		ylabel = "dN/dlog10 M\nper Msun formed [Msun^-1]"
	}
	sh := newSheet(f.Title, "remnant mass M [Msun]", ylabel, axes{logX: f.Log, logY: true})
	hs := make([]*Hist, len(f.Series))
	for i := range f.Series {
		hs[i] = &f.Series[i].Hist
	}
	floor := logFloor(hs...)
	if err := sh.histograms(f.Series, floor); err != nil {
		return nil, err
	}
	if f.MaxNSMass > 0 {
		l := refLine{At: sh.a.x(f.MaxNSMass), Vertical: true, Style: referenceStyle}
		sh.add(l)
		sh.legend(fmt.Sprintf("NS/BH boundary, %s Msun", g(f.MaxNSMass)), l)
	}
	sh.p.Y.Min = sh.a.y(floor)
	if !f.Log {
		sh.p.X.Min = 0
	}
	return sh.finish(), nil
}

// histograms draws each series as a step outline with error bars, down to floor (data units; on
// a log y axis empty bins are left out), with a legend entry.
func (sh *sheet) histograms(series []HistSeries, floor float64) error {
	for i := range series {
		s := &series[i]
		sty := lineStyle(i)
		var first *plotter.Line
		for _, xy := range stepLines(&s.Hist, sh.a, floor, sh.a.logY) {
			l, err := plotter.NewLine(xy)
			if err != nil {
				return err
			}
			l.LineStyle = sty
			sh.add(l, xy)
			if first == nil {
				first = l
			}
		}
		bars, err := errorBars(&s.Hist, sh.a, floor, sty)
		if err != nil {
			return err
		}
		if bars != nil {
			tops := make(plotter.XYs, len(bars.XYs))
			for k, xy := range bars.XYs {
				tops[k] = plotter.XY{X: xy.X, Y: xy.Y + bars.YErrors[k].High}
			}
			sh.add(bars, tops)
		}
		if first != nil {
			sh.legend(s.Label, first)
		}
	}
	return nil
}

// Kicks is the natal kick speed distribution of neutron stars and black holes.
type Kicks struct {
	Title string
	// Series holds for each catalogue the NS and the BH histograms (in that order, those with at
	// least one remnant), as probability densities per km/s normalised to all remnants of the
	// type: the area under a histogram is the fraction of remnants with a kick > 0.
	Series []HistSeries
	// NoKick is, for each series, the fraction of its remnants born with no kick at all (not
	// drawn; black holes that form by direct collapse under the fallback kick mode).
	NoKick []float64
}

// NewKicks bins the kick speeds of the neutron stars and black holes of cats, separately, on
// common edges from 0 km/s of a round width (about bins bins; 60 when bins <= 0).
func NewKicks(cats []*Catalogue, bins int) (*Kicks, error) {
	if len(cats) == 0 {
		return nil, fmt.Errorf("figures: kicks: no catalogue given")
	}
	if bins <= 0 {
		bins = 60
	}
	var samples [][]float64
	for _, c := range cats {
		samples = append(samples, c.NS.Kick, c.BH.Kick)
	}
	_, hi := positiveExtent(samples...)
	if math.IsNaN(hi) {
		return nil, fmt.Errorf("figures: kicks: %s holds no neutron star or black hole with a kick", names(cats))
	}
	edges := NiceLinearEdges(0, hi, bins)
	title, labels := titleAndLabels("Natal kicks", infos(cats))
	f := &Kicks{Title: title}
	for i, c := range cats {
		for _, t := range []struct {
			name string
			r    Remnants
		}{{"NS", c.NS}, {"BH", c.BH}} {
			n := len(t.r.Kick)
			if n == 0 {
				continue
			}
			moving := make([]float64, 0, n)
			for _, v := range t.r.Kick {
				if v > 0 {
					moving = append(moving, v)
				}
			}
			h, err := NewHist(moving, edges)
			if err != nil {
				return nil, err
			}
			h.PerUnitWidth(float64(n))
			still := float64(n-len(moving)) / float64(n)
			label := t.name
			if len(cats) > 1 {
				label = labels[i] + ": " + t.name
			}
			label += fmt.Sprintf(" (%d", n)
			if still > 0 {
				label += fmt.Sprintf(", %.0f%% with no kick", 100*still)
			}
			label += ")"
			f.Series = append(f.Series, HistSeries{Label: label, Hist: h})
			f.NoKick = append(f.NoKick, still)
		}
	}
	return f, nil
}

// Plot draws the kick distributions as step outlines with Poisson error bars.
func (f *Kicks) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "natal kick speed [km/s]", "dN/dv / N [(km/s)^-1]", axes{})
	if err := sh.histograms(f.Series, 0); err != nil {
		return nil, err
	}
	sh.p.X.Min, sh.p.Y.Min = 0, 0
	return sh.finish(), nil
}

// PeriodEccentricity shows the final orbits of bound binaries of a black hole and a living star.
type PeriodEccentricity struct {
	Title  string
	Series []PointSeries // X: eccentricity, Y: period in days; one per catalogue
}

// NewPeriodEccentricity collects the final period and eccentricity of every bound black hole +
// star binary of cats.
func NewPeriodEccentricity(cats []*Catalogue) (*PeriodEccentricity, error) {
	if len(cats) == 0 {
		return nil, fmt.Errorf("figures: period-eccentricity: no catalogue given")
	}
	title, labels := titleAndLabels("Bound black hole + star binaries", infos(cats))
	f := &PeriodEccentricity{Title: title}
	total := 0
	for i, c := range cats {
		n := len(c.BHStar.PeriodDays)
		total += n
		f.Series = append(f.Series, PointSeries{
			Label: fmt.Sprintf("%s (%d)", labels[i], n),
			X:     append([]float64(nil), c.BHStar.Eccentricity...),
			Y:     append([]float64(nil), c.BHStar.PeriodDays...),
		})
	}
	if total == 0 {
		return nil, fmt.Errorf("figures: period-eccentricity: %s holds no bound binary of a black hole and a living star "+
			"(they need binary_fraction > 0 and a companion still a star at time_limit_myr)", names(cats))
	}
	return f, nil
}

// Plot draws one marker per binary, period on a log axis.
func (f *PeriodEccentricity) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "eccentricity", "orbital period [days]", axes{logY: true})
	n := 0
	for _, s := range f.Series {
		n += len(s.X)
	}
	// Smaller, translucent markers when there are many, so that density shows.
	radius, alpha := vg.Points(2.2), 1.0
	if n > 300 {
		radius = vg.Points(math.Max(0.8, 2.2*math.Sqrt(300/float64(n))))
	}
	if n > 1000 {
		alpha = 0.55
	}
	for i, s := range f.Series {
		xy := make(plotter.XYs, 0, len(s.X))
		for k := range s.X {
			if s.Y[k] > 0 {
				xy = append(xy, sh.a.xy(s.X[k], s.Y[k]))
			}
		}
		if len(xy) == 0 {
			sh.legend(s.Label, glyphThumb(glyphStyle(i)))
			continue
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle = glyphStyle(i)
		sc.GlyphStyle.Radius = radius
		sc.GlyphStyle.Color = translucent(Colour(i), alpha)
		sh.add(sc, xy)
		key := glyphStyle(i) // full size in the legend
		sh.legend(s.Label, glyphThumb(key))
	}
	sh.p.X.Min, sh.p.X.Max = 0, 1
	return sh.finish(), nil
}

// DelayTimes is the distribution of delay times, from the birth of a binary to the merger of its
// two compact remnants, per unit stellar mass formed.
type DelayTimes struct {
	Title string
	// Series holds a histogram per catalogue and class of double compact object (BBH, BH-NS,
	// NS-NS; those present), on common log10-spaced edges, with heights dN/dlog10(t) per Msun
	// formed (Msun^-1).
	Series []HistSeries
	// AgeMyr is the age of the Universe, drawn as a reference line: 13787 Myr (Planck
	// Collaboration 2020, A&A 641, A6, Table 2).
	AgeMyr float64
}

// ageOfUniverseMyr is the age of the Universe in the Planck 2018 cosmology (Planck Collaboration
// 2020, A&A 641, A6, Table 2: 13.787 +- 0.020 Gyr).
const ageOfUniverseMyr = 13787

// NewDelayTimes bins the delay times of the bound double compact objects of cats in log10 t: bins
// per decade (by default as many as give about 40 bins over the range, at least 1 and at most 10).
func NewDelayTimes(cats []*Catalogue, perDex int) (*DelayTimes, error) {
	if len(cats) == 0 {
		return nil, fmt.Errorf("figures: delay-times: no catalogue given")
	}
	var samples [][]float64
	for _, c := range cats {
		if err := needMass(c); err != nil {
			return nil, err
		}
		samples = append(samples, c.Delays[:]...)
	}
	lo, hi := positiveExtent(samples...)
	if math.IsNaN(lo) {
		return nil, fmt.Errorf("figures: delay-times: %s holds no bound double compact object "+
			"(they need binary_fraction > 0 and binaries that survive both collapses)", names(cats))
	}
	if perDex <= 0 {
		decades := math.Max(1, math.Log10(hi/lo))
		perDex = int(math.Max(1, math.Min(10, math.Round(40/decades))))
	}
	edges := NiceLogEdges(lo, hi, perDex)
	title, labels := titleAndLabels("Delay times of double compact objects", infos(cats))
	f := &DelayTimes{Title: title, AgeMyr: ageOfUniverseMyr}
	for i, c := range cats {
		for cls := range numDCO {
			d := c.Delays[cls]
			if len(d) == 0 {
				continue
			}
			h, err := NewHist(d, edges)
			if err != nil {
				return nil, err
			}
			h.PerUnitLog10Width(c.MassRepresented)
			label := cls.String()
			if len(cats) > 1 {
				label = labels[i] + ": " + label
			}
			f.Series = append(f.Series, HistSeries{Label: fmt.Sprintf("%s (%d)", label, len(d)), Hist: h})
		}
	}
	return f, nil
}

// Plot draws the delay-time histograms on log-log axes with the age of the Universe marked.
func (f *DelayTimes) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "delay time from birth to merger [Myr]", "dN/dlog10 t\nper Msun formed [Msun^-1]", axes{logX: true, logY: true})
	hs := make([]*Hist, len(f.Series))
	for i := range f.Series {
		hs[i] = &f.Series[i].Hist
	}
	floor := logFloor(hs...)
	if err := sh.histograms(f.Series, floor); err != nil {
		return nil, err
	}
	p, a := sh.p, sh.a
	if f.AgeMyr > 0 {
		l := refLine{At: a.x(f.AgeMyr), Vertical: true, Style: referenceStyle}
		sh.add(l)
		sh.legend(fmt.Sprintf("age of the Universe, %s Gyr", g(f.AgeMyr/1000)), l)
		p.X.Min = math.Min(p.X.Min, a.x(f.AgeMyr/2))
		p.X.Max = math.Max(p.X.Max, a.x(f.AgeMyr*2))
	}
	p.Y.Min = a.y(floor)
	return sh.finish(), nil
}

// glyphThumb is a legend thumbnail showing one marker.
type glyphThumb draw.GlyphStyle

func (g glyphThumb) Thumbnail(c *draw.Canvas) { c.DrawGlyph(draw.GlyphStyle(g), c.Center()) }
