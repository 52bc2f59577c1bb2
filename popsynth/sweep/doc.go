// Package sweep runs a corefall population over a grid of configurations, as many independent
// tasks, on one machine or as a cluster job array (Slurm, or a Kubernetes indexed Job).
//
// A sweep file (YAML) has a base configuration, nested as in configs/default.yaml, and the keys to
// vary:
//
//	base:
//	  systems: 200000
//	vary:
//	  explosion.engine: [rapid, delayed]
//	  metallicity.fixed: [0.0002, 0.002, 0.0142]
//	zip:                      # keys that vary together (one grid dimension)
//	  kicks.ns_sigma: [265, 150]
//	  kicks.bh_mode: [fallback, momentum]
//	repeats: 2                # independent seeds per grid cell
//
// The grid is the Cartesian product of the vary lists (first key outermost) and the zip group
// (after them; or, when zip lists keys of vary, at the place of its first key). Each grid cell is
// run Repeats times; task i is cell i/Repeats, repeat i%Repeats, and draws from the seed
// popsynth.DeriveSeed(base seed, i), so any task can be rerun alone and gives the same rows.
//
// Plan expands a Spec into a Manifest and validates every task's configuration (popsynth.Load
// and popsynth.NewEngine) before anything runs. WritePlan stores it in a sweep directory with a
// Slurm batch script:
//
//	DIR/manifest.json                     every task: index, seed, varied values, part, config
//	DIR/job.sbatch                        the Slurm job array
//	DIR/logs/                             Slurm's log files
//	DIR/catalogue/K1=V1/K2=V2/part-NNNNN.parquet   one part per task (a hive-partitioned dataset)
//	DIR/done/NNNNN.json                   a task's done-record: rows, sha256 of its part, seconds, seed
//	DIR/failed/NNNNN.json                 a task's failure record: the error
//	DIR/summary.parquet                   one row per task, written by Collect
//
// Partition keys are the varied config keys with dots and dashes turned into underscores
// (explosion.engine becomes explosion_engine). A key whose name would equal a column of the
// catalogue or of the summary (for example systems) gets the prefix "cfg_" (cfg_systems), so a
// reader never sees one column name with two types. When Repeats > 1 a last level repeat=R is
// added. Partition values keep letters, digits and . + - and turn anything else into '_'; a value
// never starts with '.' or '_', which readers take for hidden files.
//
// Every file is written atomically (a temporary name in the same directory, then a rename): a
// killed task leaves nothing under a final name. A task is done when its done-record is present and
// the sha256 of its part matches it; Status reports the others as pending or failed (corrupt when
// the checksum does not match), RunLocal runs them, and Collect writes the summary only when every
// task is done.
package sweep
