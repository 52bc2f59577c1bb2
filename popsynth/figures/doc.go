// Package figures turns corefall catalogues, rate tables and the remnant physics into
// publication-ready figures drawn with gonum/plot.
//
// Every figure is made in two steps. A constructor reads and bins the data (NewMassSpectrum,
// NewKicks, NewPeriodEccentricity, NewDelayTimes from catalogues; NewInitialFinal and NewCores
// from the physics; NewRates from the JSON of `corefall rates --json`) and returns a value whose
// exported fields are exactly the numbers drawn: histogram edges, counts, heights and Poisson
// errors, or points. Its Plot method draws them and nothing else, so the numbers can be checked
// without looking at pixels. Encode and Save write a plot as PNG or SVG.
//
// Units: masses in Msun, kick speeds in km/s, orbital periods in days, delay times in Myr, rate
// densities in the units of the rate table (Gpc^-3 yr^-1). Catalogue histograms that are "per unit
// stellar mass formed" divide by the catalogue's corefall.mass_represented metadata, the stellar
// mass (Msun) of the whole population the catalogue stands for, unsampled stars and companions
// included.
//
// Style: Liberation Sans at 11-13 pt on a 6 x 4 inch figure, the colour-blind-safe palette of
// Okabe & Ito (2008, "Color Universal Design"), and for every series a distinct dash pattern or
// marker shape as well as a colour, so that figures survive greyscale printing.
package figures
