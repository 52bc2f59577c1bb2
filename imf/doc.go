// Package imf provides initial mass functions (IMFs) as probability
// distributions over stellar mass, in the manner of gonum's stat/distuv.
//
// All masses are in solar masses (Msun). An IMF here is the number density
// dN/dm, normalised to unit integral over its mass range [Min, Max], so Prob
// has units of 1/Msun, CDF(m) is the fraction of stars (by number) below m,
// and Mean is the mean stellar mass in Msun.
//
// Three families are provided:
//
//   - BrokenPowerLaw: dN/dm ∝ m^-alpha_i on segment i, continuous at the
//     breaks, with any number of segments. NewSalpeter (Salpeter 1955) and
//     NewKroupa2001 (Kroupa 2001) build the usual special cases.
//   - Chabrier2003: the single-star IMF of Chabrier (2003), a lognormal in
//     log10 m below 1 Msun joined continuously to a power law above it.
//   - Truncated: any IMF conditioned on a sub-range, made by Restrict. This is
//     how a population synthesis samples only the massive end of the IMF.
//
// Every law is sampled by exact inverse-CDF draws: Rand(src) returns
// Quantile(u) for u uniform on [0, 1) from src, with Quantile the analytic
// inverse of CDF (a numerically exact root for the lognormal part). Methods
// that draw take an explicit *rand.Rand from math/rand/v2; the package holds
// no random state and no mutable global state.
//
// When only part of the IMF is sampled, MassRepresented converts the number
// of stars drawn into the total stellar mass (over the whole IMF range) that
// those stars stand for; rates per unit star-forming mass divide by it.
//
// Values are built by their constructors (NewBrokenPowerLaw, NewSalpeter,
// NewKroupa2001, NewChabrier2003, Restrict), which validate the parameters
// and precompute normalisations. The exported fields record the parameters;
// changing them after construction is not supported.
package imf
