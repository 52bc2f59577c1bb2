package rates

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate/quad"
)

// salpeterAlpha is the slope of dN/dm ∝ m^-alpha of Salpeter (1955, ApJ 121,
// 161; from memory).
const salpeterAlpha = 2.35

// powerLawDraw returns a mass drawn from dN/dm ∝ m^-alpha on [lo, hi] by
// the inverse of its CDF (analytic).
func powerLawDraw(src *rand.Rand, alpha, lo, hi float64) float64 {
	k := 1 - alpha
	a, b := math.Pow(lo, k), math.Pow(hi, k)
	return math.Pow(a+src.Float64()*(b-a), 1/k)
}

// eggletonLifetimeMyr returns the main-sequence lifetime of Eggleton,
// Fitchett & Tout (1989, ApJ 347, 998; from memory) in Myr, lengthened by a
// tenth for core helium burning (common practice).
func eggletonLifetimeMyr(m float64) float64 {
	tms := (2550 + 669*math.Pow(m, 2.5) + math.Pow(m, 4.5)) / (0.0327*math.Pow(m, 1.5) + 0.346*math.Pow(m, 4.5))
	return 1.1 * tms
}

// TestSalpeterNormalisation is the end-to-end normalisation check. A
// Salpeter population over 0.1-100 Msun is drawn at fixed Z; every star of
// 8-100 Msun makes a core-collapse event (NS below 20 Msun, BH above) with
// weight 1 / (total mass drawn). With zero delays the z = 0 core-collapse
// rate must be psi(0) times the number of 8-100 Msun stars per unit mass
// formed, ∫_8^100 m^-alpha dm / ∫_0.1^100 m^(1-alpha) dm (analytic integral,
// 0.00742 per Msun in REFERENCES.md, computed), within Monte Carlo error.
// With the stars' lifetimes as delays, the rate at z must be the
// IMF-weighted mean of psi(z_f(z, tau(m))), computed here by quadrature.
func TestSalpeterNormalisation(t *testing.T) {
	a := salpeterAlpha
	perMass := (math.Pow(8, 1-a) - math.Pow(100, 1-a)) / (a - 1) /
		((math.Pow(0.1, 2-a) - math.Pow(100, 2-a)) / (a - 2))
	if math.Abs(perMass-0.00742) > 5e-6 {
		t.Fatalf("analytic 8-100 Msun stars per Msun = %v; REFERENCES.md (computed) has 0.00742", perMass)
	}
	// Guard the lifetime formula against typos: 22.5 Myr at 10 Msun and
	// 3.08 Myr at 100 Msun before the helium-burning tenth (REFERENCES.md, computed).
	if l := eggletonLifetimeMyr(10) / 1.1; math.Abs(l-22.5) > 0.05 {
		t.Fatalf("Eggleton lifetime at 10 Msun = %v Myr; want 22.5", l)
	}
	if l := eggletonLifetimeMyr(100) / 1.1; math.Abs(l-3.08) > 0.005 {
		t.Fatalf("Eggleton lifetime at 100 Msun = %v Myr; want 3.08", l)
	}

	c := Planck18()
	sfr := MadauDickinson2014()
	est := Estimator{Cosmology: c, SFR: sfr, Sampling: FixedZ(0.0142)}
	prompt, err := est.NewTally()
	if err != nil {
		t.Fatal(err)
	}
	delayed, _ := est.NewTally()

	src := rand.New(rand.NewPCG(1, 2))
	const n = 6_000_000
	var mass float64
	var masses []float64
	for range n {
		m := powerLawDraw(src, a, 0.1, 100)
		mass += m
		if m >= 8 {
			masses = append(masses, m)
		}
	}
	w := 1 / mass
	for _, m := range masses {
		kind := NSFormation
		if m >= 20 {
			kind = BHFormation
		}
		if err := prompt.Add(Event{Kind: kind, DelayMyr: 0, Metallicity: 0.0142, Weight: w}); err != nil {
			t.Fatal(err)
		}
		if err := delayed.Add(Event{Kind: kind, DelayMyr: eggletonLifetimeMyr(m), Metallicity: 0.0142, Weight: w}); err != nil {
			t.Fatal(err)
		}
	}
	zs := []float64{0, 2, 6}
	r0, err := prompt.Rates(zs)
	if err != nil {
		t.Fatal(err)
	}
	rd, err := delayed.Rates(zs)
	if err != nil {
		t.Fatal(err)
	}
	cc := func(r Result, i int) float64 { return r.Rates.NSFormation[i] + r.Rates.BHFormation[i] }

	// Zero delays: R(0) = psi(0) × perMass, in Gpc^-3 yr^-1.
	want := sfr.Density(0) * perMass * 1e9
	expectedCount := float64(n) * perMass * (math.Pow(0.1, 2-a) - math.Pow(100, 2-a)) / (a - 2) /
		((math.Pow(0.1, 1-a) - math.Pow(100, 1-a)) / (a - 1)) // N × (8-100 Msun stars per star)
	sigma := want / math.Sqrt(expectedCount)
	if got := cc(r0, 0); math.Abs(got-want) > 4*sigma {
		t.Errorf("core-collapse rate at z = 0: %.6g Gpc^-3 yr^-1; psi(0) × %.5f /Msun = %.6g ± %.2g (Monte Carlo)", got, perMass, want, sigma)
	}
	// Poisson uncertainty: all weights equal, so sigma = psi sqrt(count) w.
	count := float64(len(masses))
	var ns, bh float64
	for _, m := range masses {
		if m >= 20 {
			bh++
		} else {
			ns++
		}
	}
	t.Logf("z = 0: core-collapse rate %.5g Gpc^-3 yr^-1 from %d stars; psi(0) × %.6f /Msun = %.5g ± %.2g", cc(r0, 0), len(masses), perMass, want, sigma)
	for i, z := range zs {
		psi := sfr.Density(z)
		if got, want := r0.Uncertainty.BHFormation[i], psi*math.Sqrt(bh)*w*1e9; !scalar.EqualWithinRel(got, want, 1e-8) {
			t.Errorf("z = %v: BH formation uncertainty %v; psi sqrt(Σ w^2) = %v", z, got, want)
		}
		if got, want := r0.Uncertainty.NSFormation[i], psi*math.Sqrt(ns)*w*1e9; !scalar.EqualWithinRel(got, want, 1e-8) {
			t.Errorf("z = %v: NS formation uncertainty %v; psi sqrt(Σ w^2) = %v", z, got, want)
		}
		if got, want := cc(r0, i), psi*count*w*1e9; !scalar.EqualWithinRel(got, want, 1e-8) {
			t.Errorf("z = %v: zero-delay rate %v; psi(z) Σ w = %v", z, got, want)
		}
	}

	// Lifetimes as delays: ratio to the prompt rate against
	// E[psi(z_f)] / psi(z) over the 8-100 Msun IMF (Gauss–Legendre in ln m).
	for i, z := range zs {
		tz := c.AgeGyr(z)
		psiRatio := func(m float64) float64 {
			zf, err := c.RedshiftAtAge(tz - eggletonLifetimeMyr(m)/1e3)
			if err != nil {
				t.Fatal(err)
			}
			return sfr.Density(zf) / sfr.Density(z)
		}
		imf := func(lnm float64) float64 { m := math.Exp(lnm); return m * math.Pow(m, -a) } // dN/dln m
		norm := quad.Fixed(imf, math.Log(8), math.Log(100), 64, quad.Legendre{}, 0)
		mean := quad.Fixed(func(l float64) float64 { return imf(l) * psiRatio(math.Exp(l)) }, math.Log(8), math.Log(100), 64, quad.Legendre{}, 0) / norm
		mean2 := quad.Fixed(func(l float64) float64 { r := psiRatio(math.Exp(l)); return imf(l) * r * r }, math.Log(8), math.Log(100), 64, quad.Legendre{}, 0) / norm
		sd := math.Sqrt(math.Max(mean2-mean*mean, 0) / count) // Monte Carlo error of the sample mean
		got := cc(rd, i) / cc(r0, i)
		t.Logf("z = %v: delayed/prompt ratio %.6f; IMF mean of psi(z_f)/psi(z) %.6f ± %.1g", z, got, mean, sd)
		if math.Abs(got-mean) > 4*sd+1e-4 { // 1e-4: delay-binning error bound (package doc)
			t.Errorf("z = %v: delayed/prompt rate ratio %.6f; IMF mean of psi(z_f)/psi(z) = %.6f ± %.2g", z, got, mean, sd)
		}
		if i == 2 && mean > 0.99 {
			t.Errorf("z = 6: lifetimes should lower the rate by a few percent (psi rises steeply with time there); mean ratio %v", mean)
		}
	}
}

// TestDelayLongerThanAge: a delay longer than the age at z contributes
// nothing; a delay t_d gives psi(z_f) with t(z_f) = t(z) - t_d, here from
// the root-finding inverse; delays beyond today's age are dropped.
func TestDelayLongerThanAge(t *testing.T) {
	c := Planck18()
	sfr := MadauFragos2017()
	est := Estimator{Cosmology: c, SFR: sfr, Sampling: FixedZ(0.001)}
	tl, err := est.NewTally()
	if err != nil {
		t.Fatal(err)
	}
	const w, delay = 3e-5, 12000.0 // Msun^-1, Myr
	for _, ev := range []Event{
		{Kind: BBHMerger, DelayMyr: delay, Metallicity: 0.001, Weight: w},
		{Kind: BBHMerger, DelayMyr: 14000, Metallicity: 0.001, Weight: 1}, // older than the Universe
	} {
		if err := tl.Add(ev); err != nil {
			t.Fatal(err)
		}
	}
	if n, dw := tl.Dropped(); n != 1 || dw != 1 || tl.Events() != 1 {
		t.Errorf("Dropped() = %v, %v, Events() = %v; want 1, 1, 1", n, dw, tl.Events())
	}
	zs := []float64{0, 0.05, 0.1, 0.12, 0.2, 1}
	res, err := tl.Rates(zs)
	if err != nil {
		t.Fatal(err)
	}
	for i, z := range zs {
		tf := c.AgeGyr(z) - delay/1e3
		want := 0.0
		if tf > 0 {
			zf, err := c.RedshiftAtAge(tf)
			if err != nil {
				t.Fatal(err)
			}
			if zf <= DefaultMaxFormationRedshift {
				want = w * sfr.Density(zf) * 1e9
			}
		}
		got := res.Rates.BBHMerger[i]
		if !scalar.EqualWithinAbsOrRel(got, want, 1e-300, 1e-8) {
			t.Errorf("z = %v (age %.4f Gyr): BBH rate %v; want %v", z, c.AgeGyr(z), got, want)
		}
		if z >= 0.2 && got != 0 {
			t.Errorf("z = %v: age %.3f Gyr < delay 12 Gyr, yet rate %v", z, c.AgeGyr(z), got)
		}
		if res.Rates.NSNSMerger[i] != 0 || res.Uncertainty.NSFormation[i] != 0 {
			t.Errorf("z = %v: kinds without events must be zero", z)
		}
	}
	if res.Rates.BBHMerger[0] == 0 {
		t.Error("z = 0: a 12 Gyr delay fits in the 13.8 Gyr age; want a positive rate")
	}
}

// bbhYield is the synthetic probability that a system of metallicity z
// makes a BBH merger: high at low Z, suppressed above Z = 0.002.
func bbhYield(z float64) float64 { return 1 / (1 + (z/0.002)*(z/0.002)) }

// TestReweightingLogUniform: a catalogue drawn log-uniformly in Z and
// reweighted to the cosmic distribution gives the same rate as a catalogue
// drawn directly from the cosmic distribution at the formation redshift,
// and both agree with the analytic rate psi(z_f) ∫ p(x | z_f) f(10^x) dx
// (Gauss–Legendre quadrature), within Monte Carlo errors.
func TestReweightingLogUniform(t *testing.T) {
	c := Planck18()
	sfr := MadauDickinson2014()
	metal := MadauFragos2017Metallicity(0.35)
	const delay = 500.0 // Myr
	est := Estimator{Cosmology: c, SFR: sfr, Metallicity: metal, Sampling: LogUniformZ(1e-5, 1)}
	tl, err := est.NewTally()
	if err != nil {
		t.Fatal(err)
	}
	src := rand.New(rand.NewPCG(3, 4))
	const nA = 1_000_000
	for range nA {
		z := math.Pow(10, -5+5*src.Float64())
		if src.Float64() < bbhYield(z) {
			if err := tl.Add(Event{Kind: BBHMerger, DelayMyr: delay, Metallicity: z, Weight: 1.0 / nA}); err != nil {
				t.Fatal(err)
			}
		}
	}
	zs := []float64{0, 2, 6}
	resA, err := tl.Rates(zs)
	if err != nil {
		t.Fatal(err)
	}
	const nB = 400_000
	for i, z := range zs {
		zf, err := c.RedshiftAtAge(c.AgeGyr(z) - delay/1e3)
		if err != nil {
			t.Fatal(err)
		}
		psi := sfr.Density(zf) * 1e9
		mu := metal.Mean(zf)
		f := func(x float64) float64 { return metal.PDF(x, zf) * bbhYield(math.Pow(10, x)) }
		frac := quad.Fixed(f, mu-10*metal.Sigma, mu+10*metal.Sigma, 200, quad.Legendre{}, 0)
		want := psi * frac

		// Catalogue B: Z drawn from the cosmic distribution at z_f.
		hits := 0
		for range nB {
			zz := math.Pow(10, mu+metal.Sigma*src.NormFloat64())
			if src.Float64() < bbhYield(zz) {
				hits++
			}
		}
		rB := psi * float64(hits) / nB
		sB := psi * math.Sqrt(frac*(1-frac)/nB)
		rA, sA := resA.Rates.BBHMerger[i], resA.Uncertainty.BBHMerger[i]
		if math.Abs(rA-want) > 4*sA {
			t.Errorf("z = %v: reweighted log-uniform rate %.5g ± %.2g; analytic %.5g", z, rA, sA, want)
		}
		if math.Abs(rB-want) > 4*sB {
			t.Errorf("z = %v: direct-sampling rate %.5g ± %.2g; analytic %.5g", z, rB, sB, want)
		}
		if math.Abs(rA-rB) > 4*math.Hypot(sA, sB) {
			t.Errorf("z = %v: reweighted %.5g ± %.2g vs direct %.5g ± %.2g", z, rA, sA, rB, sB)
		}
		t.Logf("z = %v: reweighted %.5g ± %.2g, direct %.5g ± %.2g, analytic %.5g", z, rA, sA, rB, sB, want)
		if sA > 0.01*rA {
			t.Errorf("z = %v: uncertainty %.2g of %.5g is larger than the 1%% this test needs", z, sA, rA)
		}
	}
	// The fraction made at z = 6 (low Z) exceeds that at z = 0: the
	// reweighting must follow the cosmic metallicity.
	if resA.Rates.BBHMerger[2]/sfr.Density(6) <= resA.Rates.BBHMerger[0]/sfr.Density(0) {
		t.Error("BBH yield per unit star formation should grow with redshift as Z falls")
	}
}

// normalCDF is Φ(x) = (1 + erf(x/√2))/2 (handbook formula).
func normalCDF(x float64) float64 { return 0.5 * (1 + math.Erf(x/math.Sqrt2)) }

// TestDiscreteReweighting: with one row per sampled metallicity, the rate
// is psi(z_f) Σ_k P_k(z_f) f_k exactly, with P_k the cosmic fraction of star
// formation in bin k (midpoints in log10 Z between sampled values, computed
// here from the normal CDF) and the Poisson uncertainty
// psi sqrt(Σ (P_k f_k)^2).
func TestDiscreteReweighting(t *testing.T) {
	c := Planck18()
	sfr := MadauDickinson2014()
	metal := MadauFragos2017Metallicity(0.5)
	values := []float64{1e-4, 1e-3, 4e-3, 0.0142, 0.03}
	const delay = 200.0
	est := Estimator{Cosmology: c, SFR: sfr, Metallicity: metal, Sampling: DiscreteZ(values...)}
	var evs []Event
	for _, z := range values {
		// Metallicity stored as float32 by a catalogue still matches.
		evs = append(evs, Event{Kind: NSNSMerger, DelayMyr: delay, Metallicity: float64(float32(z)), Weight: bbhYield(z)})
	}
	zs := []float64{0, 1, 3, 8}
	res, err := est.Rates(evs, zs)
	if err != nil {
		t.Fatal(err)
	}
	for i, z := range zs {
		zf, err := c.RedshiftAtAge(c.AgeGyr(z) - delay/1e3)
		if err != nil {
			t.Fatal(err)
		}
		mu, s := metal.Mean(zf), metal.Sigma
		var sum, sum2 float64
		for k, v := range values {
			lo, hi := math.Inf(-1), math.Inf(1)
			if k > 0 {
				lo = (math.Log10(values[k-1]) + math.Log10(v)) / 2
			}
			if k+1 < len(values) {
				hi = (math.Log10(v) + math.Log10(values[k+1])) / 2
			}
			pk := normalCDF((hi-mu)/s) - normalCDF((lo-mu)/s)
			sum += pk * bbhYield(v)
			sum2 += pk * bbhYield(v) * pk * bbhYield(v)
		}
		psi := sfr.Density(zf) * 1e9
		if got, want := res.Rates.NSNSMerger[i], psi*sum; !scalar.EqualWithinRel(got, want, 1e-8) {
			t.Errorf("z = %v: rate %.10g; psi Σ P_k f_k = %.10g", z, got, want)
		}
		if got, want := res.Uncertainty.NSNSMerger[i], psi*math.Sqrt(sum2); !scalar.EqualWithinRel(got, want, 1e-8) {
			t.Errorf("z = %v: uncertainty %.10g; psi sqrt(Σ (P_k f_k)^2) = %.10g", z, got, want)
		}
	}

	// A cosmic metallicity fixed at 0.004 selects the bin of 4e-3 only.
	est.Metallicity = FixedMetallicity{Z: 0.004}
	res, err = est.Rates(evs, zs)
	if err != nil {
		t.Fatal(err)
	}
	zf, _ := c.RedshiftAtAge(c.AgeGyr(1) - delay/1e3)
	if got, want := res.Rates.NSNSMerger[1], sfr.Density(zf)*bbhYield(4e-3)*1e9; !scalar.EqualWithinRel(got, want, 1e-8) {
		t.Errorf("fixed cosmic Z = 0.004: rate %v; want psi f(0.004) = %v", got, want)
	}
}

// TestPoissonScatter checks the uncertainty formula statistically: across
// independent catalogues the standard deviation of the estimated rate must
// match the reported sqrt(Σ w^2) psi (compound Poisson variance; the
// standard deviation of 400 replicas is itself uncertain by 1/sqrt(2 × 399),
// 3.5%, so the tolerance is 15%).
func TestPoissonScatter(t *testing.T) {
	est := Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Sampling: FixedZ(0.02)}
	src := rand.New(rand.NewPCG(5, 6))
	const replicas, systems = 400, 5000
	var sum, sum2, sigma float64
	for range replicas {
		tl, err := est.NewTally()
		if err != nil {
			t.Fatal(err)
		}
		for range systems {
			if src.Float64() < 0.02 {
				w := (0.5 + src.Float64()) / systems
				if err := tl.Add(Event{Kind: BHFormation, DelayMyr: 5, Metallicity: 0.02, Weight: w}); err != nil {
					t.Fatal(err)
				}
			}
		}
		res, err := tl.Rates([]float64{0})
		if err != nil {
			t.Fatal(err)
		}
		r := res.Rates.BHFormation[0]
		sum += r
		sum2 += r * r
		sigma += res.Uncertainty.BHFormation[0]
	}
	mean := sum / replicas
	sd := math.Sqrt((sum2 - replicas*mean*mean) / (replicas - 1))
	sigma /= replicas
	if math.Abs(sd/sigma-1) > 0.15 {
		t.Errorf("scatter of the rate over replicas %.4g; mean reported uncertainty %.4g", sd, sigma)
	}
}

// TestBinnedMatchesDirectSum compares the binned estimator with the
// estimator written out per event (package documentation), each formation
// redshift found by root finding. Only the delay binning differs: the
// rates must agree to 1e-4 (package documentation), the uncertainties, for
// which the binning keeps no first-order correction, to 1%.
func TestBinnedMatchesDirectSum(t *testing.T) {
	c := Planck18()
	sfr := MadauFragos2017()
	metal := MadauFragos2017Metallicity(0.4)
	values := []float64{1e-4, 2e-3, 0.0142, 0.03}
	est := Estimator{Cosmology: c, SFR: sfr, Metallicity: metal, Sampling: DiscreteZ(values...)}
	src := rand.New(rand.NewPCG(7, 8))
	const n = 4000
	evs := make([]Event, n)
	for i := range evs {
		evs[i] = Event{
			Kind:        EventKind(src.IntN(int(numKinds))),
			DelayMyr:    math.Pow(10, -1+5.2*src.Float64()), // 0.1 Myr to 16 Gyr
			Metallicity: values[src.IntN(len(values))],
			Weight:      src.Float64() * 1e-6,
		}
	}
	zs := []float64{0, 0.5, 2, 6}
	res, err := est.Rates(evs, zs)
	if err != nil {
		t.Fatal(err)
	}
	tMin := c.AgeGyr(DefaultMaxFormationRedshift)
	worst := 0.0
	for j, z := range zs {
		var rate, vari [numKinds]float64
		tz := c.AgeGyr(z)
		for _, ev := range evs {
			tf := tz - ev.DelayMyr/1e3
			if tf <= tMin {
				continue
			}
			zf, err := c.RedshiftAtAge(tf)
			if err != nil {
				t.Fatal(err)
			}
			k := 0
			for values[k] != ev.Metallicity {
				k++
			}
			lo, hi := math.Inf(-1), math.Inf(1)
			if k > 0 {
				lo = (math.Log10(values[k-1]) + math.Log10(values[k])) / 2
			}
			if k+1 < len(values) {
				hi = (math.Log10(values[k]) + math.Log10(values[k+1])) / 2
			}
			term := ev.Weight * sfr.Density(zf) * metal.BinProb(lo, hi, zf) * 1e9
			rate[ev.Kind] += term
			vari[ev.Kind] += term * term
		}
		for kind := range numKinds {
			got := res.Rates.Of(kind)[j]
			worst = math.Max(worst, math.Abs(got/rate[kind]-1))
			if !scalar.EqualWithinRel(got, rate[kind], 1e-4) {
				t.Errorf("z = %v, %s: binned %.8g; direct sum %.8g (rel. diff %.2g)", z, kind, got, rate[kind], got/rate[kind]-1)
			}
			if got := res.Uncertainty.Of(kind)[j]; !scalar.EqualWithinRel(got, math.Sqrt(vari[kind]), 1e-2) {
				t.Errorf("z = %v, %s: binned uncertainty %.8g; direct %.8g", z, kind, got, math.Sqrt(vari[kind]))
			}
		}
	}
	t.Logf("worst relative difference of the binned rates: %.2g", worst)
}

// TestTableSFRFormationRange: a tabulated history must cover the formation
// redshifts the events need, unless MaxFormationRedshift cuts them off; a
// fine table of Madau & Dickinson's formula then gives the formula's rates
// to the linear-interpolation error (TestTableMatchesFormula).
func TestTableSFRFormationRange(t *testing.T) {
	md := MadauDickinson2014()
	var zs, ps []float64
	for i := 0; i <= 10000; i++ {
		zs = append(zs, float64(i)*0.001)
		ps = append(ps, md.Density(float64(i)*0.001))
	}
	tab, err := NewTableSFR(zs, ps, "MD14 to z = 10")
	if err != nil {
		t.Fatal(err)
	}
	evs := []Event{
		{Kind: BHNSMerger, DelayMyr: 13000, Metallicity: 0.01, Weight: 1e-5}, // z_f ≈ 6.6 at z = 0
		{Kind: BHNSMerger, DelayMyr: 13600, Metallicity: 0.01, Weight: 1e-5}, // z_f ≈ 18 at z = 0
		{Kind: BHNSMerger, DelayMyr: 50, Metallicity: 0.01, Weight: 1e-5},
	}
	grid := []float64{0, 0.5, 1, 3}
	_, err = Estimator{Cosmology: Planck18(), SFR: tab, Sampling: FixedZ(0.01)}.Rates(evs, grid)
	if err == nil || !strings.Contains(err.Error(), "formation redshift") || !strings.Contains(err.Error(), "MD14 to z = 10") {
		t.Errorf("table to z = 10 with formation redshifts up to 100: error %v; want one naming the table and the formation redshift", err)
	}
	got, err := Estimator{Cosmology: Planck18(), SFR: tab, Sampling: FixedZ(0.01), MaxFormationRedshift: 10}.Rates(evs, grid)
	if err != nil {
		t.Fatal(err)
	}
	want, err := Estimator{Cosmology: Planck18(), SFR: md, Sampling: FixedZ(0.01), MaxFormationRedshift: 10}.Rates(evs, grid)
	if err != nil {
		t.Fatal(err)
	}
	for i := range grid {
		if !scalar.EqualWithinRel(got.Rates.BHNSMerger[i], want.Rates.BHNSMerger[i], 1e-6) {
			t.Errorf("z = %v: table %v, formula %v", grid[i], got.Rates.BHNSMerger[i], want.Rates.BHNSMerger[i])
		}
	}
	if got.SFR != "MD14 to z = 10" {
		t.Errorf("Result.SFR = %q", got.SFR)
	}
}

func TestEstimatorErrors(t *testing.T) {
	good := Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Metallicity: MadauFragos2017Metallicity(0.5), Sampling: LogUniformZ(1e-4, 0.03)}
	badEst := []struct {
		mod  func(*Estimator)
		want string
	}{
		{func(e *Estimator) { e.Cosmology.H0 = -1 }, "H0"},
		{func(e *Estimator) { e.SFR = nil }, "star-formation history"},
		{func(e *Estimator) { e.SFR = ParametricSFR{A: -1, C: 1} }, "normalisation A"},
		{func(e *Estimator) { e.SFR = TableSFR{Z: []float64{0}, Psi: []float64{1}} }, "at least 2"},
		{func(e *Estimator) { e.Sampling = LogUniformZ(0.03, 1e-4) }, "0 < Min < Max <= 1"},
		{func(e *Estimator) { e.Sampling = DiscreteZ() }, "at least one"},
		{func(e *Estimator) { e.Sampling = DiscreteZ(0.01, 0.01) }, "coincide"},
		{func(e *Estimator) { e.Sampling = DiscreteZ(0.01, 2) }, "Z in (0, 1]"},
		{func(e *Estimator) { e.Sampling = ZSampling{Kind: SampledFixed} }, "exactly one"},
		{func(e *Estimator) { e.Sampling = ZSampling{} }, "sampling kind 0"},
		{func(e *Estimator) { e.Metallicity = nil }, "Metallicity is nil"},
		{func(e *Estimator) { e.Metallicity = FixedMetallicity{Z: 0.01} }, "cannot be reweighted"},
		{func(e *Estimator) { e.Metallicity = MadauFragos2017Metallicity(0) }, "Sigma"},
		{func(e *Estimator) { e.MaxFormationRedshift = -3 }, "MaxFormationRedshift"},
	}
	for _, b := range badEst {
		e := good
		b.mod(&e)
		if _, err := e.NewTally(); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("NewTally: error %v; want one containing %q", err, b.want)
		}
	}
	// A fixed-Z catalogue needs no cosmic metallicity distribution.
	if _, err := (Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Sampling: FixedZ(0.01)}).NewTally(); err != nil {
		t.Errorf("fixed-Z estimator without Metallicity: %v", err)
	}

	tl, err := good.NewTally()
	if err != nil {
		t.Fatal(err)
	}
	fixed, _ := Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Sampling: FixedZ(0.01)}.NewTally()
	discrete, _ := Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Metallicity: MadauFragos2017Metallicity(0.5), Sampling: DiscreteZ(0.001, 0.01)}.NewTally()
	badEv := []struct {
		tl   *Tally
		ev   Event
		want string
	}{
		{tl, Event{Kind: 9, DelayMyr: 1, Metallicity: 0.01, Weight: 1}, "event kind 9"},
		{tl, Event{Kind: BBHMerger, DelayMyr: -1, Metallicity: 0.01, Weight: 1}, "delay -1 Myr"},
		{tl, Event{Kind: BBHMerger, DelayMyr: math.NaN(), Metallicity: 0.01, Weight: 1}, "delay NaN"},
		{tl, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.01, Weight: -1}, "weight -1"},
		{tl, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.01, Weight: math.Inf(1)}, "weight +Inf"},
		{tl, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0, Weight: 1}, "Z = 0"},
		{tl, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.05, Weight: 1}, "outside the catalogue's sampling range"},
		{fixed, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.0101, Weight: 1}, "not one of the catalogue's sampled values"},
		{discrete, Event{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.003, Weight: 1}, "not one of the catalogue's sampled values"},
	}
	for _, b := range badEv {
		if err := b.tl.Add(b.ev); err == nil || !strings.Contains(err.Error(), b.want) {
			t.Errorf("Add(%+v): error %v; want one containing %q", b.ev, err, b.want)
		}
	}
	if err := tl.AddEvents([]Event{{Kind: BBHMerger, DelayMyr: 1, Metallicity: 0.01, Weight: 1}, {Kind: 7}}); err == nil || !strings.HasPrefix(err.Error(), "event 1:") {
		t.Errorf("AddEvents: error %v; want one naming event 1", err)
	}
	for _, zs := range [][]float64{{0, -1}, {math.NaN()}, {math.Inf(1)}} {
		if _, err := tl.Rates(zs); err == nil || !strings.Contains(err.Error(), "grid redshift") {
			t.Errorf("Rates(%v): error %v; want a grid error", zs, err)
		}
	}
	if err := tl.Merge(fixed); err == nil {
		t.Error("Merge of tallies of different estimators: want an error")
	}
}

func TestEventKindNames(t *testing.T) {
	for k := range numKinds {
		got, err := ParseEventKind(k.String())
		if err != nil || got != k {
			t.Errorf("ParseEventKind(%q) = %v, %v", k.String(), got, err)
		}
	}
	if _, err := ParseEventKind("bns"); err == nil || !strings.Contains(err.Error(), "nsns_merger") {
		t.Errorf("ParseEventKind(\"bns\"): %v; want an error listing the kinds", err)
	}
	if EventKind(12).String() != "EventKind(12)" {
		t.Error("String of an unknown kind")
	}
}

// TestResultJSON checks the interface keys of the JSON form.
func TestResultJSON(t *testing.T) {
	grid, err := RedshiftGrid(2, 0.5)
	if err != nil {
		t.Fatal(err)
	}
	est := Estimator{Cosmology: Planck18(), SFR: MadauFragos2017(), Sampling: FixedZ(0.0142)}
	res, err := est.Rates([]Event{{Kind: NSFormation, DelayMyr: 20, Metallicity: 0.0142, Weight: 0.007}}, grid)
	if err != nil {
		t.Fatal(err)
	}
	b, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"z", "rates", "uncertainty", "units", "cosmology", "sfr", "metallicity"} {
		if _, ok := m[k]; !ok {
			t.Errorf("JSON lacks key %q: %s", k, b)
		}
	}
	for _, group := range []string{"rates", "uncertainty"} {
		g, _ := m[group].(map[string]any)
		for _, k := range []string{"ns_formation", "bh_formation", "bbh_merger", "bhns_merger", "nsns_merger"} {
			if s, ok := g[k].([]any); !ok || len(s) != len(grid) {
				t.Errorf("%s.%s: %v; want %d values", group, k, g[k], len(grid))
			}
		}
	}
	cos, _ := m["cosmology"].(map[string]any)
	for _, k := range []string{"h0", "omega_m", "age_gyr"} {
		if _, ok := cos[k]; !ok {
			t.Errorf("cosmology lacks %q", k)
		}
	}
	if z, _ := m["z"].([]any); len(z) == 0 || z[0] != 0.0 {
		t.Errorf("first z = %v; want 0", m["z"])
	}
	if m["units"] != "Gpc^-3 yr^-1" || m["sfr"] != "Madau & Fragos (2017)" {
		t.Errorf("units %v, sfr %v", m["units"], m["sfr"])
	}
	if s, _ := m["metallicity"].(string); !strings.Contains(s, "stands for all star formation at every redshift") {
		t.Errorf("fixed-Z result must say so: %q", s)
	}
}

func TestRedshiftGrid(t *testing.T) {
	cases := []struct {
		zmax, dz float64
		n        int
		last     float64
	}{
		{10, 0.05, 201, 10},
		{1, 0.3, 4, 0.9},
		{0, 0.1, 1, 0},
		{0.3, 0.1, 4, 0.3}, // 0.3/0.1 = 2.9999999999999996 in floating point
	}
	for _, c := range cases {
		zs, err := RedshiftGrid(c.zmax, c.dz)
		if err != nil || len(zs) != c.n || zs[0] != 0 || !scalar.EqualWithinAbs(zs[len(zs)-1], c.last, 1e-12) {
			t.Errorf("RedshiftGrid(%v, %v) = %v, %v; want %d points ending at %v", c.zmax, c.dz, zs, err, c.n, c.last)
		}
	}
	for _, c := range [][2]float64{{-1, 0.1}, {1, 0}, {1, -0.1}, {math.Inf(1), 1}, {1, math.NaN()}, {1e7, 1}} {
		if _, err := RedshiftGrid(c[0], c[1]); err == nil {
			t.Errorf("RedshiftGrid(%v, %v): want an error", c[0], c[1])
		}
	}
}

// TestMerge: tallies filled separately and merged equal one tally filled
// with all events (the sums are the same up to rounding).
func TestMerge(t *testing.T) {
	est := Estimator{Cosmology: Planck18(), SFR: MadauDickinson2014(), Metallicity: MadauFragos2017Metallicity(0.5), Sampling: LogUniformZ(1e-4, 0.03)}
	all, _ := est.NewTally()
	a, _ := est.NewTally()
	b, _ := est.NewTally()
	src := rand.New(rand.NewPCG(9, 10))
	for i := range 2000 {
		ev := Event{
			Kind:        EventKind(src.IntN(int(numKinds))),
			DelayMyr:    math.Pow(10, 4.3*src.Float64()),
			Metallicity: math.Pow(10, -4+2.4*src.Float64()),
			Weight:      src.Float64(),
		}
		if err := all.Add(ev); err != nil {
			t.Fatal(err)
		}
		half := a
		if i%2 == 1 {
			half = b
		}
		if err := half.Add(ev); err != nil {
			t.Fatal(err)
		}
	}
	if err := a.Merge(b); err != nil {
		t.Fatal(err)
	}
	zs := []float64{0, 1, 4}
	ra, _ := a.Rates(zs)
	rall, _ := all.Rates(zs)
	for kind := range numKinds {
		for i := range zs {
			if !scalar.EqualWithinRel(ra.Rates.Of(kind)[i], rall.Rates.Of(kind)[i], 1e-9) ||
				!scalar.EqualWithinRel(ra.Uncertainty.Of(kind)[i], rall.Uncertainty.Of(kind)[i], 1e-9) {
				t.Errorf("%s at z = %v: merged %v, single %v", kind, zs[i], ra.Rates.Of(kind)[i], rall.Rates.Of(kind)[i])
			}
		}
	}
	if a.Events() != all.Events() {
		t.Errorf("merged Events() = %d; want %d", a.Events(), all.Events())
	}
}
