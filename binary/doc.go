// Package binary provides the orbital physics of wide binaries for corefall:
// initial distributions of mass ratio, period or separation and
// eccentricity; orbit widening by winds; the Roche-lobe check; the effect of
// a supernova (mass loss and natal kick) on the orbit; and the
// gravitational-wave inspiral time.
//
// Units: masses in solar masses (Msun), separations and semi-major axes in
// astronomical units (AU), radii in solar radii, periods in days, velocities
// in km/s and times in Myr (MergeTimeGyr gives Gyr). The constants are the
// IAU nominal values (GMSun, RSun: IAU 2015 Resolution B3; AU: IAU 2012
// Resolution B2), the SI speed of light, and the Julian year.
//
// Distributions (MassRatio, SanaPeriod, OpikSeparation, Thermal, Circular,
// PowerLawEcc) are small value types in the manner of gonum's stat/distuv,
// with CDF, Quantile and Rand; each is sampled by exact inverse CDF, and each
// parametrised type has a constructor and a Validate method that report bad
// parameters by name, value and allowed range. Methods that draw take an
// explicit *rand.Rand from math/rand/v2; the package holds no random state.
// PeriodDays and SeparationAU convert between period and separation with
// Kepler's third law.
//
// Orbit geometry. Supernova places the relative orbit in the plane z = 0
// with periastron on +x and counter-clockwise motion; kicks are given and
// velocities returned in that frame, about the centre of mass before the
// explosion. Kepler solves Kepler's equation to machine precision.
//
// Inspiral. MergeTime is the Peters (1964) coalescence time for any
// eccentricity 0 <= e <= 1, from a precomputed Chebyshev series of the
// dimensionless Peters integral; it does not allocate and costs a few tens
// of nanoseconds, so it can be called for every bound double compact object.
//
// The package knows nothing of configuration, files or the command line:
// plain Go values in and out.
package binary
