// Package catalog stores remnant catalogues: one row per system, in a
// columnar file that carries its own provenance.
//
// A catalogue has a Schema (a list of Columns, each with a name, a unit, a
// one-line doc and a Kind) and file-level metadata (string key/value
// pairs: the effective configuration, the seed, the program version, the
// number of systems, the stellar mass represented). A producer fills a
// reusable Batch and hands it to a Writer; a Reader streams the rows back.
// This package is storage only: it knows nothing of the physics.
//
// # Formats
//
// Parquet (the default) is written with zstd-compressed pages (level 1:
// random-looking float32 values barely compress at any level), plain
// encoding without dictionaries for float columns, dictionary encoding for
// category columns and DELTA_BINARY_PACKED for integers. Row groups hold at
// most Options.RowGroupRows rows (default 2^20). The writer stages one row
// group in plain Go slices and encodes it column by column, so memory is
// about RowGroupRows times the row width (46 bytes per row for the
// single-star columns, about 146 for the binary ones) whatever the number
// of rows. The Arrow schema is stored in the file ("ARROW:schema"), so
// Arrow-based readers (pandas/pyarrow, polars, DuckDB) get float32 columns,
// categorical remnant types and the field metadata below. Float and
// category columns carry no min/max statistics: systems are in random
// order, so they could not skip anything and would cost time.
//
// Arrow is the Arrow IPC file format (Feather v2), optionally with zstd
// buffers (Options.Compress). The schema, with the metadata, is written
// both at the start and in the footer of such a file, so the batches first
// go to an uncompressed IPC stream in a hidden side file and are copied
// into the catalogue at Close behind the final metadata: the data cross the
// disk twice.
//
// CSV is comma-separated text. Metadata are comment lines
// "# key=<JSON string>" before the header; a further comment line
// "# corefall.columns=<JSON string>" describes the columns (name, unit, doc,
// kind, categories, nullable) so the file reads back with its schema. Floats
// are written in the shortest form that reads back to the same float32;
// categories as their words; a missing value is an empty cell. Metadata set
// after the first rows were written follow the last row as more comment
// lines (a later line for a key overrides an earlier one). pandas reads the
// file with read_csv(path, comment='#'). A CSV file cut at a line end cannot
// be told from a complete one, except that the Reader checks the row count
// against corefall.systems when that key is present.
//
// # Atomic output
//
// Create writes to a hidden temporary file in the target directory,
// ".NAME.tmp-RANDOM" (and ".NAME.tmp-RANDOM.spool" for Arrow), and Close
// syncs it and renames it over the final path. So the final path holds
// nothing, the previous complete file, or the new complete file; Abort, or
// any failed Write or Close, removes the temporary files. Write errors (a
// full disk, say) are returned by Write or Close, never lost. Output is
// byte-identical for identical batches and metadata: no timestamps or host
// names are written, metadata are written in key order, and the Parquet
// bytes do not depend on Options.Workers.
//
// # Damaged files
//
// A damaged catalogue (a flipped bit, a cut, an edited byte) gives an error
// naming the file and what is wrong, or rows; never a crash. arrow-go
// allocates whatever lengths a file declares, and an allocation of
// terabytes kills the process with an out-of-memory error that no recover
// can catch, so Open and Next check the structure of the file first, in
// O(metadata) time, before arrow-go reads it:
//
//   - Arrow IPC: the trailer, every table, vtable, offset, vector and
//     string of the footer flatbuffer (schema nested at most 64 deep), each
//     block inside the file before the footer, and each batch's metadata:
//     its buffers inside its body, its nodes and buffers those of the
//     schema's columns, every fixed-width buffer long enough for the rows,
//     and the uncompressed lengths declared by its compressed buffers
//     adding up to at most 64 times the file size plus 64 MiB.
//   - Parquet: the trailer, the Thrift structure of the footer (no list or
//     string longer than the bytes left), the schema tree, each column chunk
//     inside the file before the footer with as many values as its row
//     group has rows, the stored Arrow schema (as for Arrow IPC), and every
//     page header: pages inside their chunk, at most 256 MiB (and 64 times
//     the file size plus 16 MiB) uncompressed, dictionary pages no larger
//     in values than in bytes, zstd frames declaring no more than the page,
//     and the block header of delta-encoded values.
//   - CSV: lines of at most 16 MiB.
//
// Behind the checks, a panic in arrow-go becomes an error, after which the
// Reader returns that error only, and arrow-go's allocator refuses single
// allocations beyond 256 MiB plus 64 times the file size. Batches hold
// ReadBatchRows rows, or fewer for a small file or a schema of more than
// about 100 columns. Known limits: the checks look at the start of
// delta-encoded values only, so the second delta header of a
// DELTA_BYTE_ARRAY page is not checked (arrow-go then allocates up to
// 16 GiB of address space); a crafted zstd page can still expand up to
// 32768-fold in arrow-go's Parquet decoder.
//
// # Metadata
//
// Keys are owned by the caller; the standard ones are the Meta* constants
// (corefall.config, corefall.seed, corefall.version, corefall.go_version,
// corefall.systems, corefall.binaries, corefall.mass_represented in Msun).
// Every Writer sets corefall.schema_version to SchemaVersion ("1"), and Open
// refuses a file without it: "PATH is not a corefall catalogue (missing
// corefall.schema_version metadata)".
//
// # Field metadata
//
// Every Arrow field carries "unit" (for example "Msun", or "1" for a
// dimensionless number) and "doc"; a category field also carries
// "categories", a JSON array of its allowed words in index order.
//
// # Standard columns
//
// Columns(false) gives the single-star columns, Columns(true) the binary
// ones. All floats are float32: seven significant digits exceed the
// accuracy of every quantity here.
//
//	column                         kind      unit   meaning
//	system_id                      int64     1      0-based index of the system in the run
//	metallicity                    float32   1      metallicity Z (mass fraction)
//	initial_mass                   float32   Msun   zero-age main-sequence mass
//	lifetime_myr                   float32   Myr    time to core collapse or to white-dwarf birth
//	final_mass                     float32   Msun   total mass at the end of the star's life
//	he_core_mass                   float32   Msun   helium core mass at the end
//	co_core_mass                   float32   Msun   carbon-oxygen core mass at the end
//	fate                           category  1      wd, sn, failed, ppisn, pisn, alive
//	remnant_type                   category  1      BH, NS, WD, none, star
//	remnant_mass                   float32   Msun   gravitational mass; 0 when none or star
//	fallback_fraction              float32   1      fraction of the ejecta that fell back
//	kick_speed                     float32   km/s   natal kick speed
//
// With binaries:
//
//	outcome                        category  1      single, bound, disrupted, interacting
//	companion_initial_mass ...     as above         the companion's copies of initial_mass
//	  companion_kick_speed                          through kick_speed, null for single stars
//	initial_separation_au          float32   AU     initial semi-major axis
//	initial_period_days            float32   d      initial orbital period
//	initial_eccentricity           float32   1      initial eccentricity
//	final_separation_au            float32   AU     semi-major axis after the last collapse
//	final_period_days              float32   d      orbital period after the last collapse
//	final_eccentricity             float32   1      eccentricity after the last collapse
//	systemic_velocity_kms          float32   km/s   centre-of-mass speed of a bound pair
//	runaway_speed_kms              float32   km/s   primary's speed at infinity if disrupted
//	companion_runaway_speed_kms    float32   km/s   companion's speed at infinity if disrupted
//	inspiral_time_myr              float32   Myr    gravitational-wave inspiral time
//	delay_time_myr                 float32   Myr    birth-to-merger time
//
// The binary columns are all nullable: null where undefined (no companion,
// orbit disrupted, not a compact pair). Category columns may be nullable
// too (companion_fate and companion_remnant_type of a single star).
package catalog
