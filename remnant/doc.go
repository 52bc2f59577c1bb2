// Package remnant takes a star from its initial mass and metallicity to the
// compact object it leaves: a white dwarf (WD), a neutron star (NS), a black
// hole (BH), or nothing (none, after a pair-instability supernova).
//
// Units: masses in solar masses (Msun), times in Myr, radii in solar radii
// (Rsun), speeds in km/s. Metallicity Z is the metal mass fraction (solar
// 0.0142, Asplund et al. 2009, ARA&A 47, 481).
//
// The work is done in three steps, each a plain value with exported,
// documented parameters, a Default constructor and a Validate method:
//
//   - A CoreModel gives a star's end state (Core): lifetime, final mass,
//     helium- and carbon-oxygen-core masses and largest radius. Builtin is
//     corefall's own set of calibrated relations (main-sequence lifetime of
//     Eggleton, Fitchett & Tout 1989, metallicity-dependent winds after Vink
//     et al. 2001, eruptions, a Wolf-Rayet limit on helium cores); Table
//     interpolates a user's grid of stellar models (TableRow), for users who
//     have real stellar-evolution grids.
//   - A Prescription decides the remnant (Remnant) from the Core: a white
//     dwarf of the Kalirai et al. (2008) mass below a CO-core threshold;
//     above it, the rapid or delayed supernova engine of Fryer et al. (2012)
//     with their baryonic-to-gravitational mass conversions; and, for the
//     most massive cores, pulsational pair instability and pair-instability
//     supernovae after Farmer et al. (2019).
//   - Kicks draws the natal kick of the remnant: Maxwellian for neutron stars
//     (Hobbs et al. 2005), scaled for black holes by fallback, momentum
//     conservation, in full, or not at all.
//
// A minimal use:
//
//	b, p, k := remnant.DefaultBuiltin(), remnant.DefaultPrescription(), remnant.DefaultKicks()
//	c, err := b.Core(30, 0.0142)
//	if err != nil { ... }
//	r := p.Decide(c)                                  // r.Type, r.Mass, r.Fate ...
//	v := k.Draw(r, rand.New(rand.NewPCG(seed, 0)))  // km/s
//
// The package holds no mutable global state and no random state: methods
// that draw take a *rand.Rand from math/rand/v2. Core, Decide and Draw do not
// allocate. The physics here knows nothing of configuration files or the
// command line.
//
// References:
//
//   - Asplund M. et al. 2009, ARA&A 47, 481 (solar metallicity).
//   - Eggleton P. P., Fitchett M. J. & Tout C. A. 1989, ApJ 347, 998
//     (main-sequence lifetimes).
//   - Farmer R. et al. 2019, ApJ 887, 53 (pair-instability black-hole mass gap).
//   - Fryer C. L. et al. 2012, ApJ 749, 91 (rapid and delayed engines).
//   - Heger A. & Woosley S. E. 2002, ApJ 567, 532 (pair-instability ranges).
//   - Hobbs G. et al. 2005, MNRAS 360, 974 (pulsar kicks).
//   - Humphreys R. M. & Davidson K. 1979, ApJ 232, 409 (upper luminosity limit).
//   - Kalirai J. S. et al. 2008, ApJ 676, 594 (white-dwarf initial-final masses).
//   - Langer N. 1989, A&A 220, 135 (converging Wolf-Rayet final masses).
//   - Vink J. S., de Koter A. & Lamers H. J. G. L. M. 2001, A&A 369, 574
//     (metallicity dependence of winds).
package remnant
