package popsynth

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/integrate/quad"

	"github.com/corefall/corefall/binary"
	"github.com/corefall/corefall/imf"
	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

// binarySetup holds the initial-binary distributions of a run.
type binarySetup struct {
	fraction float64   // binary fraction, when it does not depend on mass
	fracLogM []float64 // log10 of binary.fraction_masses, when it does
	fracVals []float64
	q        binary.MassRatio
	period   *binary.SanaPeriod     // sana2012, else nil
	sep      *binary.OpikSeparation // opik, else nil
	ecc      string
	eccDist  binary.PowerLawEcc
	eMax     float64
	keepRLOF bool
}

func newBinarySetup(cfg Config) (*binarySetup, error) {
	c := cfg.Binary
	s := &binarySetup{fraction: cfg.BinaryFraction, ecc: c.Eccentricity, eMax: c.EccentricityMax, keepRLOF: c.Interacting == "keep"}
	for _, m := range c.FractionMasses {
		s.fracLogM = append(s.fracLogM, math.Log10(m))
	}
	s.fracVals = c.FractionValues
	var err error
	if s.q, err = binary.NewMassRatio(c.QExponent, c.QMin); err != nil {
		return nil, fmt.Errorf("config: binary.q_exponent/binary.q_min: %w", err)
	}
	switch c.Orbit {
	case "sana2012":
		p, err := binary.NewSanaPeriod(c.LogPeriodMin, c.LogPeriodMax, c.PeriodExponent)
		if err != nil {
			return nil, fmt.Errorf("config: binary.log_period_min/max, binary.period_exponent: %w", err)
		}
		s.period = &p
	case "opik":
		a, err := binary.NewOpikSeparation(c.SeparationMinAU, c.SeparationMaxAU)
		if err != nil {
			return nil, fmt.Errorf("config: binary.separation_min_au/max_au: %w", err)
		}
		s.sep = &a
	}
	if c.Eccentricity == "sana2012" {
		if s.eccDist, err = binary.NewPowerLawEcc(-0.45, c.EccentricityMax); err != nil {
			return nil, fmt.Errorf("config: binary.eccentricity_max: %w", err)
		}
	}
	return s, nil
}

// fractionAt returns the binary fraction of primaries of mass m (Msun).
func (s *binarySetup) fractionAt(m float64) float64 {
	if s.fracLogM == nil {
		return s.fraction
	}
	x := math.Log10(m)
	n := len(s.fracLogM)
	switch {
	case x <= s.fracLogM[0]:
		return s.fracVals[0]
	case x >= s.fracLogM[n-1]:
		return s.fracVals[n-1]
	}
	j := sort.SearchFloat64s(s.fracLogM, x) // fracLogM[j-1] < x <= fracLogM[j]
	t := (x - s.fracLogM[j-1]) / (s.fracLogM[j] - s.fracLogM[j-1])
	return s.fracVals[j-1] + t*(s.fracVals[j]-s.fracVals[j-1])
}

// meanCompanionMass returns the mean companion mass per system (Msun) when primaries follow f:
// E[q] x the integral of fraction(m) m f(m) dm (q is drawn independently of the primary's mass).
// For a constant fraction that is fraction x E[q] x mean mass; a mass-dependent fraction is
// integrated numerically (Gauss-Legendre in log m on the segments between the table's masses, to
// ~1e-10 relative: the integrand is smooth on each segment).
func (s *binarySetup) meanCompanionMass(f imf.IMF) float64 {
	eq := massRatioMean(s.q.Kappa, s.q.QMin)
	if s.fracLogM == nil {
		return s.fraction * eq * f.Mean()
	}
	edges := []float64{f.Min()}
	for _, lm := range s.fracLogM {
		if m := math.Pow(10, lm); m > f.Min() && m < f.Max() {
			edges = append(edges, m)
		}
	}
	edges = append(edges, f.Max())
	var total float64
	for i := 1; i < len(edges); i++ {
		a, b := math.Log(edges[i-1]), math.Log(edges[i])
		total += quad.Fixed(func(u float64) float64 {
			m := math.Exp(u)
			return s.fractionAt(m) * m * m * f.Prob(m) // dm = m du
		}, a, b, 64, nil, 0)
	}
	return eq * total
}

// eccentricity draws an initial eccentricity.
func (s *binarySetup) eccentricity(src *rand.Rand) float64 {
	switch s.ecc {
	case "thermal":
		// f(e) = 2e truncated to [0, eMax]: CDF (e/eMax)^2.
		return s.eMax * math.Sqrt(src.Float64())
	case "circular":
		return 0
	}
	return s.eccDist.Rand(src)
}

// star1, star2 are the two stars of a binary in the order of their deaths.
type pairStar struct {
	s     *StarResult
	col   *starColumns
	alive bool // still a star at the time limit
}

// evolveSystem samples one system (single or binary) and evolves it, writing row i; it sets *drop
// when the row is to be left out of the catalogue (binary.interacting = drop).
//
// A binary's life, in the order of the two stars' deaths: the first star's winds widen the orbit
// (Jeans mode), then its supernova (instantaneous mass loss and natal kick at a random orbital phase)
// leaves the pair bound or unbinds it; if bound, the second star does the same. The companion keeps
// its initial mass until its own end (its winds come mostly after the main sequence). A star whose
// largest radius would fill its Roche lobe at periastron makes the system "interacting": it is
// written with its initial parameters (or dropped: binary.interacting) and not evolved further.
func (e *Engine) evolveSystem(id int64, i int, out *catalog.Batch, t *Tally, src *rand.Rand, cache *coreCache, drop *bool) error {
	b := e.bin
	m1 := e.sampler.Rand(src)
	z := e.metal.draw(src)
	isBinary := src.Float64() < b.fractionAt(m1)
	e.col.putSystem(out, i, id, z)
	oc := &e.col.orbit
	if !isBinary {
		var s StarResult
		if err := e.phys.star(&s, m1, z, src, cache); err != nil {
			return err
		}
		// Nullable columns start every batch null: the companion and orbit columns stay so.
		e.col.star.put(out, i, &s)
		out.Cols[e.col.outcome].Cat[i] = e.col.outcomeOf[Single]
		t.AddStar(s.Remnant.Type, s.Remnant.Mass)
		t.Outcomes[Single]++
		return nil
	}

	m2 := b.q.Rand(src) * m1
	var a0, p0 float64
	if b.period != nil {
		p0 = b.period.Rand(src)
		a0 = binary.SeparationAU(p0, m1+m2)
	} else {
		a0 = b.sep.Rand(src)
		p0 = binary.PeriodDays(a0, m1+m2)
	}
	e0 := b.eccentricity(src)
	var s1, s2 StarResult
	if err := e.phys.star(&s1, m1, z, src, cache); err != nil {
		return err
	}
	if err := e.phys.star(&s2, m2, z, src, cache); err != nil {
		return fmt.Errorf("companion: %w", err)
	}
	setF32(out, oc.a0, i, a0)
	setF32(out, oc.p0, i, p0)
	setF32(out, oc.e0, i, e0)

	first := pairStar{&s1, &e.col.star, s1.Remnant.Type == remnant.Star}
	second := pairStar{&s2, &e.col.companion, s2.Remnant.Type == remnant.Star}
	if s2.Core.LifetimeMyr < s1.Core.LifetimeMyr {
		first, second = second, first
	}
	orbit := binary.Orbit{A: a0, E: e0}
	outcome := Bound
	// vsys is the systemic speed of the surviving pair and vinfFirst/vinfSecond the runaway speeds
	// after a disruption, km/s, in the frame of the binary's birth.
	var vsys, vinfFirst, vinfSecond float64

	// stage evolves star x beside a companion of mass mOther until x's end. It returns false when
	// the pair stops being a detached bound binary.
	stage := func(x pairStar, mOther float64) bool {
		if x.alive {
			return true
		}
		c := x.s.Core
		if c.MaxRadius > 0 && binary.FillsRocheLobe(c.MaxRadius, orbit, c.InitialMass, mOther) {
			outcome = Interacting
			return false
		}
		orbit = binary.JeansWind(orbit, c.InitialMass+mOther, c.FinalMass+mOther)
		r := x.s.Remnant
		if r.Type == remnant.WD {
			// White dwarfs form without a kick after slow envelope loss: Jeans mode again.
			orbit = binary.JeansWind(orbit, c.FinalMass+mOther, r.Mass+mOther)
			return true
		}
		res := binary.SupernovaRandom(orbit, c.FinalMass, r.Mass, mOther, binary.Vec3(x.s.Kick), src)
		if !res.Bound {
			outcome = Disrupted
			vinfFirst = addIsotropic(vsys, res.VInfExploder, src)
			vinfSecond = addIsotropic(vsys, res.VInfCompanion, src)
			return false
		}
		vsys = addIsotropic(vsys, res.SystemicSpeed, src)
		orbit = res.Orbit
		return true
	}

	mFirstAfter := first.s.Remnant.Mass
	if first.alive {
		mFirstAfter = first.s.Core.InitialMass
	}
	if stage(first, second.s.Core.InitialMass) {
		stage(second, mFirstAfter)
	}
	if first.col != &e.col.star {
		vinfFirst, vinfSecond = vinfSecond, vinfFirst
	}

	out.Cols[e.col.outcome].Cat[i] = e.col.outcomeOf[outcome]
	t.Outcomes[outcome]++
	if outcome == Interacting {
		// Mass transfer would change both stars' lives: only their initial masses and the initial
		// orbit are written (the rest stays null), and the stars are not counted among the remnants.
		if !b.keepRLOF {
			*drop = true
			t.Dropped++
			e.col.clearRow(out, i) // the next system reuses the row
			return nil
		}
		setF32(out, e.col.star.initialMass, i, m1)
		setF32(out, e.col.companion.initialMass, i, m2)
		return nil
	}
	e.col.star.put(out, i, &s1)
	e.col.companion.put(out, i, &s2)
	t.AddStar(s1.Remnant.Type, s1.Remnant.Mass)
	t.AddStar(s2.Remnant.Type, s2.Remnant.Mass)
	switch outcome {
	case Bound:
		m1f, m2f := finalMass(&s1), finalMass(&s2)
		setF32(out, oc.a, i, orbit.A)
		setF32(out, oc.p, i, binary.PeriodDays(orbit.A, m1f+m2f))
		setF32(out, oc.e, i, orbit.E)
		setF32(out, oc.vsys, i, vsys)
		if compact(s1.Remnant.Type) && compact(s2.Remnant.Type) {
			tins := binary.MergeTime(s1.Remnant.Mass, s2.Remnant.Mass, orbit.A, orbit.E)
			setF32(out, oc.tinsp, i, tins)
			setF32(out, oc.tdelay, i, math.Max(s1.Core.LifetimeMyr, s2.Core.LifetimeMyr)+tins)
		}
	case Disrupted:
		setF32(out, oc.vinf1, i, vinfFirst)
		setF32(out, oc.vinf2, i, vinfSecond)
	}
	return nil
}

// finalMass returns a star's mass at the end of the run: its remnant's, or its initial mass while
// it is still a star.
func finalMass(s *StarResult) float64 {
	if s.Remnant.Type == remnant.Star {
		return s.Core.InitialMass
	}
	return s.Remnant.Mass
}

func compact(t remnant.Type) bool { return t == remnant.NS || t == remnant.BH }

// addIsotropic returns the speed |v + w| of two velocities of magnitudes v and w whose relative
// direction is isotropic. A second supernova acts in an orbital frame that the first has tilted by
// an angle the engine does not track, so its velocity change is added to the earlier systemic
// velocity with an isotropic relative orientation: the documented approximation. With v = 0 it
// returns w exactly and draws nothing.
func addIsotropic(v, w float64, src *rand.Rand) float64 {
	if v == 0 {
		return w
	}
	cost := 2*src.Float64() - 1
	return math.Sqrt(math.Max(0, v*v+w*w+2*v*w*cost))
}

// massRatioMean returns E[q] for f(q) ~ q^kappa on [qMin, 1]: the ratio of the closed-form integrals
// of q^(kappa+1) and q^kappa (logarithms where an exponent is -1).
func massRatioMean(kappa, qMin float64) float64 {
	integral := func(p float64) float64 { // integral of q^p over [qMin, 1]
		if p == -1 {
			return -math.Log(qMin)
		}
		return (1 - math.Pow(qMin, p+1)) / (p + 1)
	}
	return integral(kappa+1) / integral(kappa)
}
