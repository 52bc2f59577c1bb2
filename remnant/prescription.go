package remnant

import "fmt"

// Remnant is what a star leaves behind. Masses are in Msun. For a neutron
// star or black hole made by a supernova engine, ProtoMass is the
// proto-compact-object mass, FallbackMass the mass that falls back onto it,
// FallbackFraction the fallback as a fraction of the envelope outside the
// proto-core (f_fb), and BaryonicMass = ProtoMass + FallbackMass. For a white
// dwarf BaryonicMass = Mass and the engine fields are zero; with no remnant
// everything is zero.
type Remnant struct {
	Type             Type
	Fate             Fate
	Mass             float64 // gravitational mass, Msun
	BaryonicMass     float64 // Msun
	ProtoMass        float64 // Msun
	FallbackMass     float64 // Msun
	FallbackFraction float64 // f_fb, in [0, 1]
}

// Prescription decides a star's remnant from its end state (a Core): white
// dwarf below a carbon-oxygen core threshold, core collapse through a Fryer
// et al. (2012) engine above it, and pair instability for the most massive
// cores. Masses are in Msun.
type Prescription struct {
	// Engine is the supernova engine of Fryer et al. (2012, ApJ 749, 91).
	Engine EngineKind
	// CollapseMinCO is the CO-core mass at and above which the core
	// collapses; below it the star ends as a white dwarf. Default 1.38
	// (calibrated so that the builtin core model makes white dwarfs below
	// ~8.9 Msun of initial mass).
	CollapseMinCO float64
	// DirectCollapseCO is the CO-core mass at and above which everything
	// falls back (f_fb = 1); it replaces the 11.0 of Fryer et al. (2012) in
	// every branch of the engines that uses it. Default 11.0.
	DirectCollapseCO float64
	// MaxNSMass is the largest gravitational mass of a neutron star; a
	// heavier compact object is a black hole. Default 2.5 (common practice).
	MaxNSMass float64

	// PairInstability turns on pulsational pair instability and
	// pair-instability supernovae (Farmer et al. 2019, ApJ 887, 53).
	PairInstability bool
	// PulsationMinCO, PISNMinCO and PISNMaxCO bound the CO-core ranges of
	// pulsational mass loss [PulsationMinCO, PISNMinCO), of disruption
	// without remnant [PISNMinCO, PISNMaxCO) and, above PISNMaxCO, of direct
	// collapse. Defaults 38, 60, 130 (Farmer et al. 2019; from memory).
	PulsationMinCO, PISNMinCO, PISNMaxCO float64

	// WDSlope and WDIntercept (Msun) give the white-dwarf mass
	// WDSlope M_init + WDIntercept, 0.109 and 0.394 (Kalirai et al. 2008,
	// ApJ 676, 594; from memory, consistent with their verified point
	// M_init = 1.16 -> 0.53 Msun). ChandrasekharMass caps it, 1.44.
	WDSlope, WDIntercept, ChandrasekharMass float64
}

// DefaultPrescription returns the default prescription: rapid engine,
// collapse from CO cores of 1.38 Msun, direct collapse from 11.0, neutron
// stars up to 2.5 Msun, pair instability on with the thresholds of Farmer
// et al. (2019), and the white-dwarf relation of Kalirai et al. (2008).
func DefaultPrescription() Prescription {
	return Prescription{
		Engine:            Rapid,
		CollapseMinCO:     1.38,
		DirectCollapseCO:  FryerDirectCollapseCO,
		MaxNSMass:         2.5,
		PairInstability:   true,
		PulsationMinCO:    38,
		PISNMinCO:         60,
		PISNMaxCO:         130,
		WDSlope:           0.109,
		WDIntercept:       0.394,
		ChandrasekharMass: 1.44,
	}
}

// Validate returns an error naming the first parameter of p outside its
// allowed range, and the range. The pair-instability thresholds are checked
// only when PairInstability is on.
func (p Prescription) Validate() error {
	if p.Engine != Rapid && p.Engine != Delayed {
		return fmt.Errorf("remnant: Prescription.Engine = %d, want %v or %v", uint8(p.Engine), Rapid, Delayed)
	}
	err := checkParams("Prescription", []param{
		{"CollapseMinCO", p.CollapseMinCO, positive},
		{"DirectCollapseCO", p.DirectCollapseCO, positive},
		// 3.2 Msun: the causality bound on neutron-star masses (Rhoades &
		// Ruffini 1974, Phys. Rev. Lett. 32, 324; from memory).
		{"MaxNSMass", p.MaxNSMass, bound{0, 3.2, true, false}},
		{"WDSlope", p.WDSlope, nonNegative},
		{"WDIntercept", p.WDIntercept, nonNegative},
		{"ChandrasekharMass", p.ChandrasekharMass, bound{0, 3, true, false}},
	})
	if err != nil {
		return err
	}
	if !p.PairInstability {
		return nil
	}
	if err := checkParams("Prescription", []param{
		{"PulsationMinCO", p.PulsationMinCO, positive},
		{"PISNMinCO", p.PISNMinCO, positive},
		{"PISNMaxCO", p.PISNMaxCO, positive},
	}); err != nil {
		return err
	}
	if !(p.PulsationMinCO <= p.PISNMinCO && p.PISNMinCO <= p.PISNMaxCO) {
		return fmt.Errorf("remnant: Prescription pair-instability thresholds PulsationMinCO = %g, PISNMinCO = %g, PISNMaxCO = %g, want PulsationMinCO <= PISNMinCO <= PISNMaxCO",
			p.PulsationMinCO, p.PISNMinCO, p.PISNMaxCO)
	}
	return nil
}

// WhiteDwarfMass returns the mass (Msun) of the white dwarf left by a star
// whose core does not collapse: WDSlope c.InitialMass + WDIntercept
// (Kalirai et al. 2008, ApJ 676, 594), capped at ChandrasekharMass and at
// c.FinalMass. If c.InitialMass is 0 (unknown), the CO-core mass capped at
// ChandrasekharMass is used instead; if c.FinalMass is 0 (unknown), that cap
// is not applied.
func (p *Prescription) WhiteDwarfMass(c Core) float64 {
	m := c.COCoreMass
	if c.InitialMass > 0 {
		m = p.WDSlope*c.InitialMass + p.WDIntercept
	}
	m = min(m, p.ChandrasekharMass)
	if c.FinalMass > 0 {
		m = min(m, c.FinalMass)
	}
	return m
}

// Decide returns the remnant of a star with end state c, using
// c.COCoreMass, c.FinalMass, and c.InitialMass and c.Metallicity where noted:
//
//   - M_CO < CollapseMinCO: a white dwarf of mass WhiteDwarfMass(c), fate "wd".
//   - With PairInstability on and M_CO >= PISNMaxCO: the core collapses
//     directly (fate "failed", f_fb = 1) into a black hole of
//     BHGravitationalMass(M_fin).
//   - With PairInstability on and PISNMinCO <= M_CO < PISNMaxCO: a
//     pair-instability supernova leaves nothing (type none, fate "pisn").
//   - With PairInstability on and PulsationMinCO <= M_CO < PISNMinCO:
//     pulsations shed mass, then the core collapses (fate "ppisn") into a
//     black hole of FarmerPPISNMass(M_CO, c.Metallicity) (Farmer et al. 2019,
//     ApJ 887, 53). The fit gives the mass left bound at collapse; it is used
//     as both the baryonic and the gravitational mass, floored at MaxNSMass
//     (the fit is a quadratic and falls steeply towards PISNMinCO, so
//     thresholds moved beyond its range could drive it below any black-hole
//     mass) and then capped at M_fin (pulsations only remove mass). The
//     fallback fraction is 1 (what is left collapses whole). If
//     c.Metallicity is not positive (unknown), the mass is M_fin, the limit
//     of the fit as Z falls.
//   - Otherwise the engine gives the proto-core and fallback masses
//     (RapidEngine or DelayedEngine with DirectCollapseCO). The baryonic
//     mass M_proto + M_fb is clamped to M_fin (a remnant cannot hold more
//     than the star; the engines already keep M_fb within the envelope, so
//     this only acts if M_proto > M_fin). If NSGravitationalMass(M_bar) <=
//     MaxNSMass the remnant is a neutron star of that mass, else a black
//     hole of BHGravitationalMass(M_bar). The fate is "failed" when
//     f_fb = 1 and "sn" otherwise.
//
// Decide assumes p is valid and c is the output of a CoreModel (positive,
// finite masses). It does not allocate.
func (p *Prescription) Decide(c Core) Remnant {
	mco, mfin := c.COCoreMass, c.FinalMass
	if mco < p.CollapseMinCO {
		m := p.WhiteDwarfMass(c)
		return Remnant{Type: WD, Fate: WDFate, Mass: m, BaryonicMass: m}
	}
	var proto, mfb, ffb float64
	if p.Engine == Delayed {
		proto, mfb, ffb = DelayedEngine(mco, mfin, p.DirectCollapseCO)
	} else {
		proto, mfb, ffb = RapidEngine(mco, mfin, p.DirectCollapseCO)
	}
	proto = min(proto, mfin)

	if p.PairInstability && mco >= p.PulsationMinCO {
		switch {
		case mco >= p.PISNMaxCO:
			return Remnant{Type: BH, Fate: Failed, Mass: BHGravitationalMass(mfin), BaryonicMass: mfin,
				ProtoMass: proto, FallbackMass: mfin - proto, FallbackFraction: 1}
		case mco >= p.PISNMinCO:
			return Remnant{Type: None, Fate: PISN}
		default:
			m := mfin // Z unknown (<= 0): the fit grows without bound as Z falls
			if c.Metallicity > 0 {
				m = min(max(FarmerPPISNMass(mco, c.Metallicity), p.MaxNSMass), mfin)
			}
			return Remnant{Type: BH, Fate: PPISN, Mass: m, BaryonicMass: m,
				ProtoMass: proto, FallbackMass: max(m-proto, 0), FallbackFraction: 1}
		}
	}

	bar := min(proto+mfb, mfin)
	mfb = bar - proto
	r := Remnant{Fate: SN, BaryonicMass: bar, ProtoMass: proto, FallbackMass: mfb, FallbackFraction: ffb}
	if ffb >= 1 {
		r.Fate = Failed
	}
	if g := NSGravitationalMass(bar); g <= p.MaxNSMass {
		r.Type, r.Mass = NS, g
	} else {
		r.Type, r.Mass = BH, BHGravitationalMass(bar)
	}
	return r
}
