package binary

// Physical constants and unit conversions, SI unless stated.
const (
	// GMSun is the nominal solar mass parameter G M_sun in m^3 s^-2
	// (IAU 2015 Resolution B3).
	GMSun = 1.3271244e20

	// SpeedOfLight is c in m/s (exact, SI definition of the metre).
	SpeedOfLight = 299792458.0

	// AU is the astronomical unit in m (IAU 2012 Resolution B2, exact).
	AU = 1.495978707e11

	// RSun is the nominal solar radius in m (IAU 2015 Resolution B3).
	RSun = 6.957e8

	// Day is the day in s.
	Day = 86400.0

	// JulianYear is the Julian year of 365.25 days, in s.
	JulianYear = 365.25 * Day

	// Myr is a million Julian years, in s.
	Myr = 1e6 * JulianYear
)

// Derived constants in the package's working units.
const (
	// gmKms is G M_sun in AU (km/s)^2: v^2 = gmKms M / r gives a speed in
	// km/s for a mass M in Msun at a distance r in AU.
	gmKms = GMSun / AU / 1e6

	// rSunAU is the nominal solar radius in AU.
	rSunAU = RSun / AU

	// petersCirc is AU^4 / (4 beta_1) in Myr, where beta_1 =
	// (64/5) (G M_sun)^3 / c^5 is Peters' (1964) beta for m1 = m2 = 1 Msun
	// divided by m1 m2 (m1+m2): the circular merger time of Peters (1964) is
	// petersCirc a^4 / (m1 m2 (m1+m2)) Myr with a in AU and masses in Msun.
	petersCirc = AU * AU * AU * AU / (4 * (64.0 / 5.0) * GMSun * GMSun * GMSun /
		(SpeedOfLight * SpeedOfLight * SpeedOfLight * SpeedOfLight * SpeedOfLight)) / Myr
)
