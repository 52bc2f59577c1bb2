package remnant

import "math"

// FryerDirectCollapseCO is the carbon-oxygen core mass (Msun) above which
// the engines of Fryer et al. (2012, ApJ 749, 91) give complete fallback
// (direct collapse), 11.0. Prescription.DirectCollapseCO replaces it.
const FryerDirectCollapseCO = 11.0

// RapidEngine returns the proto-compact-object mass, the fallback mass (both
// Msun) and the fallback fraction of the rapid supernova engine of Fryer et
// al. (2012, ApJ 749, 91), for a star with carbon-oxygen core mco
// and final (pre-supernova) mass mfin, in Msun. directCO replaces the paper's
// 11.0 Msun in every branch that uses it:
//
//	M_proto = 1.0
//	M_fb    = 0.2                          M_CO < 2.5
//	        = 0.286 M_CO - 0.514           2.5 <= M_CO < 6.0
//	f_fb    = 1                            6.0 <= M_CO < 7.0
//	        = a1 M_CO + b1                 7.0 <= M_CO < directCO
//	        = 1                            M_CO >= directCO
//	a1 = 0.25 - 1.275/(M_fin - M_proto),  b1 = -directCO a1 + 1,
//
// with M_fb = f_fb (M_fin - M_proto) where f_fb is given, and
// f_fb = M_fb / (M_fin - M_proto) where M_fb is. a1 M_CO + b1 exceeds 1 near
// M_CO = 7 when M_fin - M_proto < 5.1 Msun: f_fb is clamped to [0, 1] in every
// branch (so M_fb never exceeds the envelope M_fin - M_proto). If
// M_fin <= M_proto there is no envelope: M_fb = 0 and f_fb = 0, or 1 in the
// direct-collapse branches.
//
// As in the paper, M_fb is continuous at M_CO = 2.5 to within the fit's
// rounding (0.2 against 0.201) and f_fb is continuous at M_CO = directCO; the
// jumps at M_CO = 6.0 (to complete fallback) and 7.0 (back to partial
// fallback unless M_fin - M_proto = 5.1) are the paper's and are kept.
func RapidEngine(mco, mfin, directCO float64) (proto, fallback, ffb float64) {
	proto = 1.0
	env := mfin - proto
	switch {
	case mco >= directCO || (mco >= 6.0 && mco < 7.0):
		ffb = 1
	case mco < 2.5:
		fallback, ffb = fixedFallback(0.2, env)
		return proto, fallback, ffb
	case mco < 6.0:
		fallback, ffb = fixedFallback(0.286*mco-0.514, env)
		return proto, fallback, ffb
	default: // 7.0 <= mco < directCO
		if env > 0 {
			a1 := 0.25 - 1.275/env
			b1 := -directCO*a1 + 1
			ffb = clamp01(a1*mco + b1)
		}
	}
	return proto, ffb * max(env, 0), ffb
}

// DelayedEngine returns the proto-compact-object mass, the fallback mass (both
// Msun) and the fallback fraction of the delayed supernova engine of Fryer et
// al. (2012, ApJ 749, 91), for a star with carbon-oxygen core mco
// and final (pre-supernova) mass mfin, in Msun. directCO replaces the paper's
// 11.0 Msun in every branch that uses it:
//
//	M_proto = 1.2                  M_CO < 3.5
//	        = 1.3                  3.5 <= M_CO < 6.0
//	        = 1.4                  6.0 <= M_CO < directCO
//	        = 1.6                  M_CO >= directCO
//	M_fb    = 0.2                  M_CO < 2.5
//	        = 0.5 M_CO - 1.05      2.5 <= M_CO < 3.5
//	f_fb    = a2 M_CO + b2         3.5 <= M_CO < directCO
//	        = 1                    M_CO >= directCO
//	a2 = 0.133 - 0.093/(M_fin - M_proto),  b2 = -directCO a2 + 1,
//
// with M_fb = f_fb (M_fin - M_proto) where f_fb is given, and
// f_fb = M_fb / (M_fin - M_proto) where M_fb is; f_fb is clamped to [0, 1]
// and the no-envelope case is treated as in RapidEngine.
//
// M_fb is continuous at M_CO = 2.5 (0.2 on both sides) and the baryonic mass
// M_proto + M_fb is continuous at M_CO = directCO (it is M_fin on both
// sides). As in the paper, the proto-core steps at 3.5 and 6.0 make the
// baryonic mass jump there, and the change of law at 3.5 makes M_fb jump.
func DelayedEngine(mco, mfin, directCO float64) (proto, fallback, ffb float64) {
	switch {
	case mco >= directCO:
		proto = 1.6
	case mco < 3.5:
		proto = 1.2
	case mco < 6.0:
		proto = 1.3
	default:
		proto = 1.4
	}
	env := mfin - proto
	switch {
	case mco >= directCO:
		ffb = 1
	case mco < 2.5:
		fallback, ffb = fixedFallback(0.2, env)
		return proto, fallback, ffb
	case mco < 3.5:
		fallback, ffb = fixedFallback(0.5*mco-1.05, env)
		return proto, fallback, ffb
	default: // 3.5 <= mco < directCO
		if env > 0 {
			a2 := 0.133 - 0.093/env
			b2 := -directCO*a2 + 1
			ffb = clamp01(a2*mco + b2)
		}
	}
	return proto, ffb * max(env, 0), ffb
}

// fixedFallback returns a fallback mass given by the engine, clamped to the
// envelope env, and its fraction of the envelope.
func fixedFallback(mfb, env float64) (fallback, ffb float64) {
	if env <= 0 {
		return 0, 0
	}
	mfb = max(0, min(mfb, env))
	return mfb, mfb / env
}

// NSGravitationalMass returns the gravitational mass (Msun) of a neutron star
// of baryonic mass mbar (Msun), the positive root of
// M_bar - M_grav = 0.075 M_grav^2 (Fryer et al. 2012, ApJ 749, 91), evaluated as
// 2 M_bar / (1 + sqrt(1 + 0.3 M_bar)) to avoid cancellation.
func NSGravitationalMass(mbar float64) float64 {
	return 2 * mbar / (1 + math.Sqrt(1+0.3*mbar))
}

// BHGravitationalMass returns the gravitational mass (Msun) of a black hole
// of baryonic mass mbar (Msun): 0.9 M_bar, the ~10% lost to neutrinos (Fryer
// et al. 2012, ApJ 749, 91).
func BHGravitationalMass(mbar float64) float64 {
	return 0.9 * mbar
}

// FarmerPPISNMass returns the black-hole mass (Msun) left after pulsational
// pair instability by a star with carbon-oxygen core mco (Msun) and
// metallicity z, from the fit of Farmer et al. (2019, ApJ 887, 53; from
// memory):
//
//	M_BH = -0.096 M_CO^2 + 8.564 M_CO - 2.07 log10(Z) - 152.97,
//
// fitted over 38 <= M_CO < 60 Msun. It is evaluated as is, for any mco.
func FarmerPPISNMass(mco, z float64) float64 {
	return -0.096*mco*mco + 8.564*mco - 2.07*math.Log10(z) - 152.97
}
