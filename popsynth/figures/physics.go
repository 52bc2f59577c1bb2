package figures

import (
	"fmt"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/remnant"
)

// Track is the end state of stars of one metallicity over a grid of initial masses, from the core
// model and the remnant prescription of a configuration (no kicks, no time limit: every star is
// followed to its end).
type Track struct {
	Z       float64           // metallicity
	Mass    []float64         // initial masses, Msun, increasing
	Core    []remnant.Core    // end state of each star
	Remnant []remnant.Remnant // remnant of each star
}

// Interval is a range [Lo, Hi] of initial mass, Msun.
type Interval struct{ Lo, Hi float64 }

// NewTrack evolves n stars of metallicity z with initial masses spaced evenly in log10 M from lo
// to hi (Msun) through phys's core model and prescription.
func NewTrack(phys popsynth.Physics, z, lo, hi float64, n int) (Track, error) {
	if !(lo > 0) || !(hi > lo) || n < 2 {
		return Track{}, fmt.Errorf("figures: track needs 0 < lo < hi and n >= 2 masses; got lo %v, hi %v, n %d", lo, hi, n)
	}
	t := Track{Z: z, Mass: LogEdges(lo, hi, n-1), Core: make([]remnant.Core, n), Remnant: make([]remnant.Remnant, n)}
	for i, m := range t.Mass {
		c, err := phys.Core.Core(m, z)
		if err != nil {
			return t, fmt.Errorf("core model at M = %v Msun, Z = %v: %w", m, z, err)
		}
		t.Core[i] = c
		t.Remnant[i] = phys.Prescription.Decide(c)
	}
	return t, nil
}

// NoRemnant returns the ranges of initial mass whose stars leave no remnant (pair-instability
// supernovae), each bounded halfway (in log10 M) between the grid masses on either side of the
// change.
func (t *Track) NoRemnant() []Interval {
	var out []Interval
	n := len(t.Mass)
	for i := 0; i < n; i++ {
		if t.Remnant[i].Type != remnant.None {
			continue
		}
		j := i
		for j+1 < n && t.Remnant[j+1].Type == remnant.None {
			j++
		}
		iv := Interval{Lo: t.Mass[i], Hi: t.Mass[j]}
		if i > 0 {
			iv.Lo = math.Sqrt(t.Mass[i-1] * t.Mass[i])
		}
		if j+1 < n {
			iv.Hi = math.Sqrt(t.Mass[j] * t.Mass[j+1])
		}
		out = append(out, iv)
		i = j
	}
	return out
}

// gridPoints is the number of initial masses of a track.
const gridPoints = 600

// massRange returns the initial-mass range of the physics figures: the sampled range of cfg.
func massRange(cfg popsynth.Config) (lo, hi float64) { return cfg.IMF.SampleMin, cfg.IMF.SampleMax }

// physicsTitle names the assumptions of the physics figures.
func physicsTitle(heading string, cfg popsynth.Config) string {
	a := Assumptions(cfg)
	get := func(key string) string {
		for _, x := range a {
			if x.Key == key {
				return x.Text
			}
		}
		return ""
	}
	return heading + "\n" + get("engine") + "; " + get("core") + "; " + get("pair_instability")
}

// InitialFinal is the remnant mass against initial mass for one or more metallicities.
type InitialFinal struct {
	Title  string
	Log    bool    // log axes
	Tracks []Track // one per metallicity
	// MaxNSMass (Msun), the NS/BH boundary, drawn as a horizontal line.
	MaxNSMass float64
	// Gaps holds, per track, the initial-mass ranges with no remnant (shaded).
	Gaps [][]Interval
}

// NewInitialFinal evolves stars over cfg's sampled mass range (imf.sample_min to imf.sample_max)
// at each metallicity of zs.
func NewInitialFinal(cfg popsynth.Config, zs []float64, log bool) (*InitialFinal, error) {
	if len(zs) == 0 {
		return nil, fmt.Errorf("figures: initial-final: no metallicity given")
	}
	phys, err := cfg.Physics()
	if err != nil {
		return nil, err
	}
	lo, hi := massRange(cfg)
	f := &InitialFinal{Title: physicsTitle("Remnant mass against initial mass", cfg), Log: log, MaxNSMass: cfg.Explosion.MaxNSMass}
	for _, z := range zs {
		t, err := NewTrack(phys, z, lo, hi, gridPoints)
		if err != nil {
			return nil, err
		}
		f.Tracks = append(f.Tracks, t)
		f.Gaps = append(f.Gaps, t.NoRemnant())
	}
	return f, nil
}

// remnantRuns splits a track into runs of consecutive stars with the same kind of remnant (WD, NS
// or BH): the relation jumps where the kind changes, and stars with no remnant are gaps.
func remnantRuns(t *Track, a axes) []plotter.XYs {
	var runs []plotter.XYs
	var cur plotter.XYs
	prev := remnant.None
	for i, r := range t.Remnant {
		if r.Type != prev || r.Type == remnant.None || r.Type == remnant.Star {
			if len(cur) > 0 {
				runs = append(runs, cur)
			}
			cur = nil
		}
		prev = r.Type
		if r.Type == remnant.None || r.Type == remnant.Star || !(r.Mass > 0) {
			continue
		}
		cur = append(cur, a.xy(t.Mass[i], r.Mass))
	}
	if len(cur) > 0 {
		runs = append(runs, cur)
	}
	return runs
}

// Plot draws one line per metallicity, broken where the remnant kind changes and where no remnant
// is left, the shaded no-remnant ranges and the NS/BH boundary.
func (f *InitialFinal) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "initial mass [Msun]", "remnant mass [Msun]", axes{logX: f.Log, logY: f.Log})
	a := sh.a
	gapBand := func(i int) band {
		b := band{Fill: translucent(Colour(i), 0.12), Edge: lineStyle(i), Hatch: 1 + i%4}
		b.Edge.Width = vg.Points(0.8)
		return b
	}
	for i := range f.Tracks {
		for _, iv := range f.Gaps[i] {
			b := gapBand(i)
			b.Lo, b.Hi = a.x(iv.Lo), a.x(iv.Hi)
			sh.add(b)
		}
	}
	for i := range f.Tracks {
		t := &f.Tracks[i]
		var first *plotter.Line
		for _, xy := range remnantRuns(t, a) {
			l, err := plotter.NewLine(xy)
			if err != nil {
				return nil, err
			}
			l.LineStyle = lineStyle(i)
			sh.add(l, xy)
			if first == nil {
				first = l
			}
		}
		if first != nil {
			sh.legend("Z = "+g(t.Z), first)
		}
		if len(f.Gaps[i]) > 0 {
			sh.legend("no remnant (PISN), Z = "+g(t.Z), gapBand(i))
		}
	}
	if f.MaxNSMass > 0 {
		l := refLine{At: a.y(f.MaxNSMass), Style: referenceStyle}
		sh.add(l)
		sh.legend(fmt.Sprintf("NS/BH boundary, %s Msun", g(f.MaxNSMass)), l)
	}
	if !f.Log {
		sh.p.Y.Min = 0
	}
	sh.p.Legend.Left = true
	sh.p.Legend.XOffs = vg.Points(4)
	return sh.finish(), nil
}

// Cores shows the end state of stars of one metallicity: final, helium-core and carbon-oxygen-core
// masses against initial mass.
type Cores struct {
	Title string
	Log   bool // log axes
	Track Track
	// PairInstability holds the CO-core thresholds (Msun) of pulsations, of pair-instability
	// supernovae and of direct collapse above the gap, drawn as reference lines; nil when pair
	// instability is off.
	PairInstability []float64
}

// NewCores evolves stars of metallicity z over cfg's sampled mass range.
func NewCores(cfg popsynth.Config, z float64, log bool) (*Cores, error) {
	phys, err := cfg.Physics()
	if err != nil {
		return nil, err
	}
	lo, hi := massRange(cfg)
	t, err := NewTrack(phys, z, lo, hi, gridPoints)
	if err != nil {
		return nil, err
	}
	f := &Cores{Title: physicsTitle(fmt.Sprintf("Pre-collapse masses at Z = %s", g(z)), cfg), Log: log, Track: t}
	if pi := cfg.PairInstability; pi.Enabled {
		f.PairInstability = []float64{pi.PulsationMinCO, pi.PISNMinCO, pi.PISNMaxCO}
	}
	return f, nil
}

// Plot draws the initial mass (for reference), final mass, helium-core mass and CO-core mass.
func (f *Cores) Plot() (*plot.Plot, error) {
	sh := newSheet(f.Title, "initial mass [Msun]", "mass at the end of life [Msun]", axes{logX: f.Log, logY: f.Log})
	a := sh.a
	t := &f.Track
	curves := []struct {
		label string
		y     func(c remnant.Core) float64
	}{
		{"final mass", func(c remnant.Core) float64 { return c.FinalMass }},
		{"helium core", func(c remnant.Core) float64 { return c.HeCoreMass }},
		{"carbon-oxygen core", func(c remnant.Core) float64 { return c.COCoreMass }},
	}
	ref := make(plotter.XYs, len(t.Mass))
	for i, m := range t.Mass {
		ref[i] = a.xy(m, m)
	}
	l, err := plotter.NewLine(ref)
	if err != nil {
		return nil, err
	}
	l.LineStyle = referenceStyle
	sh.add(l, ref)
	sh.legend("initial mass (no mass lost)", l)
	for k, cv := range curves {
		xy := make(plotter.XYs, 0, len(t.Mass))
		for i, c := range t.Core {
			if y := cv.y(c); y > 0 || !f.Log {
				xy = append(xy, a.xy(t.Mass[i], y))
			}
		}
		if len(xy) == 0 {
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, err
		}
		l.LineStyle = lineStyle(k)
		sh.add(l, xy)
		sh.legend(cv.label, l)
	}
	if len(f.PairInstability) > 0 {
		sty := lineStyle(2)
		sty.Width = vg.Points(0.8)
		sty.Dashes = []vg.Length{vg.Points(7), vg.Points(2), vg.Points(1), vg.Points(2)}
		for _, co := range f.PairInstability {
			sh.add(refLine{At: a.y(co), Style: sty})
		}
		sh.legend("pair-instability CO-core thresholds ("+g(f.PairInstability[0])+", "+
			g(f.PairInstability[1])+", "+g(f.PairInstability[2])+" Msun)", refLine{Style: sty})
	}
	if !f.Log {
		sh.p.X.Min, sh.p.Y.Min = 0, 0
	}
	sh.p.Legend.Left = true
	sh.p.Legend.XOffs = vg.Points(4)
	return sh.finish(), nil
}
