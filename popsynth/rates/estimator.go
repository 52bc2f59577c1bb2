package rates

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"
)

// Numerical settings of the estimator (see the package documentation for
// the errors they imply).
const (
	// DefaultMaxFormationRedshift is the formation redshift above which star
	// formation is ignored when Estimator.MaxFormationRedshift is zero. The
	// Universe is 17 Myr old at z = 100 in Planck18, and the analytic
	// histories there are below 1e-4 of their peak.
	DefaultMaxFormationRedshift = 100.0

	// delayBinDex is the width of the delay-time bins in log10(t_d / Myr).
	delayBinDex = 0.005
	// firstDelayEdgeMyr is the upper edge of the first delay bin, [0, 1 Myr).
	firstDelayEdgeMyr = 1.0
	// zBinDex is the target width of the log10 Z bins for a log-uniform
	// catalogue.
	zBinDex = 0.02
	// ageTableStep is the node spacing of the age table in ln(1+z).
	ageTableStep = 0.0025
	// zMatchTolerance is the largest relative difference |ln(Z/Z_k)| at
	// which an event's metallicity is taken to be the sampled value Z_k.
	zMatchTolerance = 1e-3
	// perMpc3ToPerGpc3 converts yr^-1 Mpc^-3 to yr^-1 Gpc^-3.
	perMpc3ToPerGpc3 = 1e9
)

// Estimator turns catalogue events into rate densities over redshift (see
// the package documentation for the estimator and its derivation).
type Estimator struct {
	Cosmology Cosmology
	SFR       SFR
	// Metallicity is the cosmic metallicity distribution of new stars. It is
	// not used for a catalogue sampled at a fixed Z (which stands for all
	// star formation) and may be nil then. For a log-uniform catalogue it
	// must not be FixedMetallicity: a point distribution cannot be
	// reweighted from a continuous sample.
	Metallicity MetallicityDist
	// Sampling says how the catalogue sampled metallicity.
	Sampling ZSampling
	// MaxFormationRedshift: star formation at higher redshift is ignored.
	// Zero means DefaultMaxFormationRedshift. A tabulated SFR must cover
	// every formation redshift up to it that the events need.
	MaxFormationRedshift float64
}

// validator is implemented by the parameter types of this package.
type validator interface{ Validate() error }

// Validate reports whether the estimator is complete and consistent.
func (e Estimator) Validate() error {
	if err := e.Cosmology.Validate(); err != nil {
		return err
	}
	if e.SFR == nil {
		return fmt.Errorf("rates: estimator has no star-formation history; want an SFR such as MadauDickinson2014()")
	}
	if v, ok := e.SFR.(validator); ok {
		if err := v.Validate(); err != nil {
			return err
		}
	}
	if err := e.Sampling.Validate(); err != nil {
		return err
	}
	if e.Sampling.Kind != SampledFixed {
		if e.Metallicity == nil {
			return fmt.Errorf("rates: catalogue sampled with %s needs a cosmic metallicity distribution; Metallicity is nil", e.Sampling)
		}
		if v, ok := e.Metallicity.(validator); ok {
			if err := v.Validate(); err != nil {
				return err
			}
		}
		if _, ok := e.Metallicity.(FixedMetallicity); ok && e.Sampling.Kind == SampledLogUniform {
			return fmt.Errorf("rates: cosmic metallicity %s cannot be reweighted from a catalogue with %s; sample the catalogue at that fixed Z or use a continuous distribution", e.Metallicity.Name(), e.Sampling)
		}
	}
	if m := e.MaxFormationRedshift; m != 0 && (!(m > 0) || math.IsInf(m, 0)) {
		return fmt.Errorf("rates: MaxFormationRedshift = %v; want a finite value > 0 (or 0 for %v)", m, DefaultMaxFormationRedshift)
	}
	return nil
}

// Tally accumulates catalogue events into delay-time and metallicity bins
// for one Estimator; Rates then evaluates the rate densities. Memory does not
// grow with the number of events. A Tally is not safe for concurrent use:
// fill one per goroutine and Merge them.
type Tally struct {
	est   Estimator
	table *ageTable

	nD, nZ  int
	tNowMyr float64   // age of the Universe today, Myr: longer delays never contribute
	dEdges  []float64 // lower edges of the delay bins, Myr

	// Metallicity bins: edges[k], edges[k+1] in log10 Z; catalogue
	// probability q[k] of bin k (1 for fixed and discrete sub-populations).
	edges, q []float64
	values   []float64 // log10 of the sampled values (fixed, discrete), sorted
	xMin     float64   // log-uniform: log10 Min
	xMax     float64
	invH     float64 // log-uniform: bins per dex
	hZ       float64 // log-uniform: bin width, dex

	// Σ w, Σ w^2 and Σ w d per (delay bin b, kind, Z bin k), with d the
	// delay above the bin's lower edge, interleaved at 3 i, 3 i + 1, 3 i + 2
	// with i = ((b*numKinds)+kind)*nZ + k.
	acc  []float64
	bins []delayBin

	events        int
	dropped       int
	droppedWeight float64
}

// cellSize is the number of sums kept per (delay bin, kind, Z bin).
const cellSize = 3

// delayBin holds the moments of the delays in one delay bin, over all
// kinds and metallicities, and the range of Z bins it touches.
type delayBin struct {
	w, wd, wd2 float64 // Σ w, Σ w d, Σ w d^2, d = delay - lower edge (Myr)
	kLo, kHi   int
}

// NewTally validates e and returns an empty Tally for it.
func (e Estimator) NewTally() (*Tally, error) {
	if err := e.Validate(); err != nil {
		return nil, err
	}
	zFormMax := e.MaxFormationRedshift
	if zFormMax == 0 {
		zFormMax = DefaultMaxFormationRedshift
	}
	n := max(64, int(math.Ceil(math.Log1p(zFormMax)/ageTableStep)))
	table, err := newAgeTable(e.Cosmology, zFormMax, n)
	if err != nil {
		return nil, err
	}
	t := &Tally{est: e, table: table, tNowMyr: 1e3 * table.tNow}
	t.est.Sampling.Values = slices.Clone(e.Sampling.Values)

	switch s := e.Sampling; s.Kind {
	case SampledFixed:
		t.nZ = 1
		t.values = []float64{math.Log10(s.Values[0])}
		t.edges = []float64{math.Inf(-1), math.Inf(1)}
		t.q = []float64{1}
	case SampledDiscrete:
		t.nZ = len(s.Values)
		t.values = make([]float64, t.nZ)
		for i, z := range s.Values {
			t.values[i] = math.Log10(z)
		}
		slices.Sort(t.values)
		// Each value stands for the log10 Z nearer to it than to its
		// neighbours; the end values stand for everything beyond them.
		t.edges = make([]float64, t.nZ+1)
		t.edges[0], t.edges[t.nZ] = math.Inf(-1), math.Inf(1)
		for k := 1; k < t.nZ; k++ {
			t.edges[k] = (t.values[k-1] + t.values[k]) / 2
		}
		t.q = make([]float64, t.nZ)
		for k := range t.q {
			t.q[k] = 1
		}
	case SampledLogUniform:
		t.xMin, t.xMax = math.Log10(s.Min), math.Log10(s.Max)
		width := t.xMax - t.xMin
		t.nZ = max(1, int(math.Ceil(width/zBinDex)))
		t.invH = float64(t.nZ) / width
		t.hZ = width / float64(t.nZ)
		t.edges = make([]float64, t.nZ+1)
		t.q = make([]float64, t.nZ)
		for k := range t.edges {
			t.edges[k] = t.xMin + width*float64(k)/float64(t.nZ)
		}
		for k := range t.q {
			t.q[k] = 1 / float64(t.nZ) // bin width over the whole range
		}
	}

	t.nD = 1 + int(math.Ceil(math.Log10(t.tNowMyr/firstDelayEdgeMyr)/delayBinDex))
	t.dEdges = make([]float64, t.nD)
	for b := 1; b < t.nD; b++ {
		t.dEdges[b] = firstDelayEdgeMyr * math.Pow(10, float64(b-1)*delayBinDex)
	}
	t.acc = make([]float64, cellSize*t.nD*int(numKinds)*t.nZ)
	t.bins = make([]delayBin, t.nD)
	for b := range t.bins {
		t.bins[b].kLo, t.bins[b].kHi = t.nZ, -1
	}
	return t, nil
}

// zBin returns the metallicity bin of an event with metallicity z.
func (t *Tally) zBin(z float64) (int, error) {
	if !validZ(z) {
		return 0, fmt.Errorf("rates: event metallicity Z = %v; want Z in (0, 1]", z)
	}
	const tolDex = zMatchTolerance / math.Ln10
	switch t.est.Sampling.Kind {
	case SampledFixed:
		if math.Abs(math.Log(z)/math.Ln10-t.values[0]) > tolDex {
			return 0, fmt.Errorf("rates: event metallicity Z = %v is not one of the catalogue's sampled values (%s, relative tolerance %g)", z, t.est.Sampling, zMatchTolerance)
		}
		return 0, nil
	case SampledLogUniform:
		x := math.Log10(z)
		if x < t.xMin-tolDex || x > t.xMax+tolDex {
			return 0, fmt.Errorf("rates: event metallicity Z = %v outside the catalogue's sampling range [%v, %v]", z, t.est.Sampling.Min, t.est.Sampling.Max)
		}
		k := int((x - t.xMin) * t.invH)
		return min(max(k, 0), t.nZ-1), nil
	default:
		// Nearest sampled value in log10 Z.
		x := math.Log10(z)
		k, _ := slices.BinarySearch(t.values, x)
		if k == len(t.values) || (k > 0 && x-t.values[k-1] < t.values[k]-x) {
			k--
		}
		if math.Abs(x-t.values[k]) > tolDex {
			return 0, fmt.Errorf("rates: event metallicity Z = %v is not one of the catalogue's sampled values (%s, relative tolerance %g)", z, t.est.Sampling, zMatchTolerance)
		}
		return k, nil
	}
}

// Add adds one event. It returns an error, and adds nothing, if the event's
// kind is unknown, its delay or weight is negative or not finite, or its
// metallicity does not belong to the catalogue's sampling. Events whose
// delay is at least the age of the Universe today cannot contribute at any
// redshift >= 0; they are counted by Dropped and otherwise ignored. Add does
// not allocate unless it returns an error.
func (t *Tally) Add(ev Event) error {
	if ev.Kind >= numKinds {
		return fmt.Errorf("rates: event kind %d; want one of 0 to %d (%s to %s)", ev.Kind, numKinds-1, NSFormation, NSNSMerger)
	}
	if !(ev.DelayMyr >= 0) || math.IsInf(ev.DelayMyr, 0) {
		return fmt.Errorf("rates: %s event delay %v Myr; want a finite value >= 0", ev.Kind, ev.DelayMyr)
	}
	if !(ev.Weight >= 0) || math.IsInf(ev.Weight, 0) {
		return fmt.Errorf("rates: %s event weight %v per Msun; want a finite value >= 0", ev.Kind, ev.Weight)
	}
	k, err := t.zBin(ev.Metallicity)
	if err != nil {
		return err
	}
	if ev.DelayMyr >= t.tNowMyr {
		t.dropped++
		t.droppedWeight += ev.Weight
		return nil
	}
	b := 0
	if ev.DelayMyr >= firstDelayEdgeMyr {
		b = 1 + int(math.Log10(ev.DelayMyr/firstDelayEdgeMyr)/delayBinDex)
		b = min(b, t.nD-1)
		if ev.DelayMyr < t.dEdges[b] { // rounding at an edge
			b--
		}
	}
	i := cellSize * ((b*int(numKinds)+int(ev.Kind))*t.nZ + k)
	w := ev.Weight
	d := ev.DelayMyr - t.dEdges[b]
	cell := t.acc[i : i+cellSize : i+cellSize]
	cell[0] += w
	cell[1] += w * w
	cell[2] += w * d
	bin := &t.bins[b]
	bin.w += w
	bin.wd += w * d
	bin.wd2 += w * d * d
	bin.kLo = min(bin.kLo, k)
	bin.kHi = max(bin.kHi, k)
	t.events++
	return nil
}

// AddEvents adds the events in order, stopping at the first invalid one;
// the error names its index.
func (t *Tally) AddEvents(evs []Event) error {
	for i, ev := range evs {
		if err := t.Add(ev); err != nil {
			return fmt.Errorf("event %d: %w", i, err)
		}
	}
	return nil
}

// Events returns the number of events added that can contribute to rates.
func (t *Tally) Events() int { return t.events }

// Dropped returns the number and total weight (Msun^-1) of the events whose
// delay is at least the age of the Universe today.
func (t *Tally) Dropped() (n int, weight float64) { return t.dropped, t.droppedWeight }

// Merge adds the contents of o, which must come from the same Estimator
// configuration, to t.
func (t *Tally) Merge(o *Tally) error {
	if t.nD != o.nD || t.nZ != o.nZ || !slices.Equal(t.edges, o.edges) || t.table.zMax != o.table.zMax || t.tNowMyr != o.tNowMyr {
		return fmt.Errorf("rates: cannot merge tallies of different estimators (%s with %d delay bins vs %s with %d)", t.est.Sampling, t.nD, o.est.Sampling, o.nD)
	}
	for i := range t.acc {
		t.acc[i] += o.acc[i]
	}
	for b := range t.bins {
		tb, ob := &t.bins[b], &o.bins[b]
		tb.w += ob.w
		tb.wd += ob.wd
		tb.wd2 += ob.wd2
		tb.kLo = min(tb.kLo, ob.kLo)
		tb.kHi = max(tb.kHi, ob.kHi)
	}
	t.events += o.events
	t.dropped += o.dropped
	t.droppedWeight += o.droppedWeight
	return nil
}

// RedshiftGrid returns the redshifts 0, dz, 2 dz, ... up to zmax (included
// when zmax is a multiple of dz to 1e-9 relative). It requires zmax >= 0,
// dz > 0, and at most 1e6 points.
func RedshiftGrid(zmax, dz float64) ([]float64, error) {
	if !(zmax >= 0) || math.IsInf(zmax, 0) {
		return nil, fmt.Errorf("rates: redshift grid maximum %v; want a finite value >= 0", zmax)
	}
	if !(dz > 0) || math.IsInf(dz, 0) {
		return nil, fmt.Errorf("rates: redshift grid step %v; want a finite value > 0", dz)
	}
	steps := math.Floor(zmax/dz*(1+1e-9) + 1e-9)
	if steps >= 1e6 {
		return nil, fmt.Errorf("rates: redshift grid of %g points (zmax %v, step %v); want at most 1e6", steps+1, zmax, dz)
	}
	zs := make([]float64, int(steps)+1)
	for i := range zs {
		// Rounded to 1e-9 so that a step such as 0.05 gives 0.15, not 0.15000000000000002, in
		// printed output; the shift is far below any redshift resolution that matters.
		zs[i] = math.Round(float64(i)*dz*1e9) / 1e9
	}
	return zs, nil
}

// Rates evaluates the rate densities of every event kind at the redshifts
// zs (each finite and >= 0), in Gpc^-3 yr^-1 in the source frame, with their
// Poisson uncertainties. It returns an error if the SFR is undefined (NaN),
// infinite or negative at a formation redshift that the events need.
//
// The grid points are shared among runtime.GOMAXPROCS(0) goroutines, so the
// SFR and MetallicityDist must be safe for concurrent use (those of this
// package are plain values and are). Each grid point is summed by one
// goroutine in a fixed order, so the result does not depend on their number.
func (t *Tally) Rates(zs []float64) (Result, error) {
	for i, z := range zs {
		if !(z >= 0) || math.IsInf(z, 0) {
			return Result{}, fmt.Errorf("rates: grid redshift %d is %v; want a finite value >= 0", i, z)
		}
	}
	res := newResult(t, zs)
	workers := max(1, min(runtime.GOMAXPROCS(0), len(zs)))
	errs := make([]error, workers)
	var wg sync.WaitGroup
	for wk := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			// This goroutine's grid points: wk, wk + workers, ...
			var mine []float64
			for j := wk; j < len(zs); j += workers {
				mine = append(mine, zs[j])
			}
			sc := t.newRateScratch(mine)
			if err := t.accumulate(sc); err != nil {
				errs[wk] = err
				return
			}
			for i := range mine {
				j := wk + i*workers
				for kind := range numKinds {
					res.Rates.of(kind)[j] = perMpc3ToPerGpc3 * sc.rate[i][kind]
					res.Uncertainty.of(kind)[j] = perMpc3ToPerGpc3 * math.Sqrt(max(sc.vari[i][kind], 0))
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return Result{}, err
		}
	}
	return res, nil
}

// rateScratch holds one goroutine's grid points, their ages, the sums
// being accumulated, and per Z bin the bin probabilities p and
// psi P_k / q_k at the two delays of a delay bin (vLo, vHi).
type rateScratch struct {
	zs, tz      []float64 // redshifts and ages (Myr)
	rate, vari  [][numKinds]float64
	p, vLo, vHi []float64
}

func (t *Tally) newRateScratch(zs []float64) *rateScratch {
	sc := &rateScratch{
		zs:   zs,
		tz:   make([]float64, len(zs)),
		rate: make([][numKinds]float64, len(zs)),
		vari: make([][numKinds]float64, len(zs)),
		p:    make([]float64, t.nZ),
		vLo:  make([]float64, t.nZ),
		vHi:  make([]float64, t.nZ),
	}
	for i, z := range zs {
		sc.tz[i] = 1e3 * t.est.Cosmology.AgeGyr(z)
	}
	return sc
}

// accumulate adds to sc.rate and sc.vari the rate densities and variances
// of all kinds at the redshifts sc.zs, per Mpc^3 and yr. Delay bins are the
// outer loop so that each bin's cells are read from memory once. It does
// not allocate unless it returns an error.
func (t *Tally) accumulate(sc *rateScratch) error {
	fixed := t.est.Sampling.Kind == SampledFixed
	filler, fast := t.est.Metallicity.(binFiller)
	ufiller, uniform := t.est.Metallicity.(uniformBinFiller)
	uniform = uniform && t.est.Sampling.Kind == SampledLogUniform
	stride := int(numKinds) * t.nZ
	p, vLo, vHi := sc.p, sc.vLo, sc.vHi
	for b := range t.bins {
		bin := &t.bins[b]
		if !(bin.w > 0) {
			continue
		}
		lo, hi := bin.kLo, bin.kHi
		// Two delays, mean ∓ sd, with half the weight each reproduce the
		// weight, mean and variance of the delays in the bin.
		mean := bin.wd / bin.w
		sd := math.Sqrt(max(bin.wd2/bin.w-mean*mean, 0))
		inv2sd := 0.0
		if sd > 0 {
			inv2sd = 1 / (2 * sd)
		}
		delays := [2]float64{t.dEdges[b] + mean - sd, t.dEdges[b] + mean + sd}
		cells := t.acc[cellSize*b*stride : cellSize*(b+1)*stride]
		for j, tz := range sc.tz {
			used := false
			for pt, v := range [2][]float64{vLo, vHi} {
				if sd == 0 && pt == 1 {
					copy(vHi[lo:hi+1], vLo[lo:hi+1])
					break
				}
				clear(v[lo : hi+1])
				tf := (tz - delays[pt]) / 1e3 // formation age, Gyr
				if tf < t.table.tMin {
					continue // born before the Big Bang or above MaxFormationRedshift
				}
				zf := 0.0
				if tf < t.table.tNow {
					zf = max(t.table.redshift(tf), 0)
				}
				psi := t.est.SFR.Density(zf)
				if !(psi >= 0) || math.IsInf(psi, 0) {
					return fmt.Errorf("rates: star-formation history %q gives %v at formation redshift %.4g (needed for delays near %.4g Myr at z = %v); want a finite value >= 0 (for a table, extend it or lower MaxFormationRedshift)", t.est.SFR.Name(), psi, zf, delays[pt], sc.zs[j])
				}
				if psi == 0 {
					continue
				}
				used = true
				if fixed {
					v[0] = psi
					continue
				}
				switch {
				case uniform && ufiller.fillUniformBinProbs(t.edges[lo], t.hZ, zf, p[lo:hi+1]):
				case fast:
					filler.fillBinProbs(t.edges[lo:hi+2], zf, p[lo:hi+1])
				default:
					for k := lo; k <= hi; k++ {
						p[k] = t.est.Metallicity.BinProb(t.edges[k], t.edges[k+1], zf)
					}
				}
				for k := lo; k <= hi; k++ {
					v[k] = psi * p[k] / t.q[k]
				}
			}
			if !used {
				continue
			}
			// Each cell's events: Σ w f(d_i) ≈ Σ w f̄ + (Σ w d - m Σ w) f',
			// with f̄ the mean and f' the slope of f over the two points, so
			// that a cell whose delays sit off the bin's mean is corrected
			// to first order. Where psi is cut off (before the Big Bang or
			// above MaxFormationRedshift) the linear form can dip below
			// zero for a cell; it is then clamped to zero.
			for kind := range numKinds {
				off := cellSize * int(kind) * t.nZ
				kc := cells[off+cellSize*lo : off+cellSize*(hi+1)]
				var r, va float64
				for k := range hi - lo + 1 {
					a, c := vLo[lo+k], vHi[lo+k]
					w, w2, wd := kc[cellSize*k], kc[cellSize*k+1], kc[cellSize*k+2]
					r += max(w*(a+c)/2+(wd-w*mean)*(c-a)*inv2sd, 0)
					va += w2 * (a*a + c*c) / 2
				}
				sc.rate[j][kind] += r
				sc.vari[j][kind] += va
			}
		}
	}
	return nil
}

// binFiller is implemented by metallicity distributions that compute the
// probabilities of consecutive bins faster than BinProb one at a time.
type binFiller interface {
	// fillBinProbs sets dst[k] to BinProb(edges[k], edges[k+1], z) for
	// k < len(dst) = len(edges) - 1.
	fillBinProbs(edges []float64, z float64, dst []float64)
}

// Rates is a convenience for NewTally, AddEvents and Tally.Rates.
func (e Estimator) Rates(evs []Event, zs []float64) (Result, error) {
	t, err := e.NewTally()
	if err != nil {
		return Result{}, err
	}
	if err := t.AddEvents(evs); err != nil {
		return Result{}, err
	}
	return t.Rates(zs)
}

// uniformBinFiller is implemented by metallicity distributions that fill
// the probabilities of equal-width bins quickly where that is accurate.
type uniformBinFiller interface {
	// fillUniformBinProbs sets dst[i] to BinProb(x0 + i h, x0 + (i+1) h, z)
	// and reports true, or reports false and leaves dst to the caller.
	fillUniformBinProbs(x0, h, z float64, dst []float64) bool
}
