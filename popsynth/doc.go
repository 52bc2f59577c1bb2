// Package popsynth is corefall's Monte Carlo population engine: it turns a configuration into a
// catalogue of remnants.
//
// It wires the physics packages together and owns everything that is not physics:
//
//   - Config, the typed configuration, built by Load from the embedded default
//     (configs/default.yaml), a YAML file, COREFALL_* environment variables and key=value
//     overrides, in that order. Decoding is strict: an unknown key is an error naming the nearest
//     valid one, and Validate names the key, the value and what is allowed for every range.
//   - Engine, which samples systems (primary mass from the IMF restricted to the sampled range,
//     metallicity, and for binaries the companion and the orbit), evolves each star with the core
//     model and the remnant prescription (Physics), updates binary orbits through winds and
//     supernovae, and fills columnar catalog.Batch values. A run is cut into batches of BatchSize
//     systems; batch b draws only from Stream(seed, b), workers evolve batches in parallel, and
//     Run hands them out in index order, so a catalogue is the same for any number of workers.
//   - Engine.WriteCatalogue, which writes the catalogue atomically with its provenance (effective
//     config, seed, versions, systems, and the stellar mass represented: MassRepresented counts
//     every star of the full IMF range, unsampled ones and companions included).
//   - Inspect and CatalogueRates, which read a catalogue back: a tally of its remnants, and its
//     rate densities over redshift through package rates.
//   - ReadStellarTable, the reader of users' stellar-model grids (CSV or Parquet) for the table
//     core model.
//
// Units follow the physics packages: masses in Msun, times in Myr, separations in AU, periods in
// days, speeds in km/s. Nothing here holds global mutable state; every random number comes from a
// stream passed explicitly.
package popsynth
