package main

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"

	"github.com/corefall/corefall/popsynth/sweep"
)

func (a *app) sweepCommand() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "sweep",
		Short: "Run a population over a grid of configurations, locally or as a Slurm/Kubernetes job array",
		Long: `sweep runs corefall over a grid of configurations. A sweep file (YAML) holds a base config,
the keys to vary (their Cartesian product is the grid), an optional zip group of keys that vary
together, and repeats (independent seeds per grid cell):

  base:
    systems: 200000
  vary:
    explosion.engine: [rapid, delayed]
    metallicity.fixed: [0.0002, 0.002, 0.0142]
  repeats: 2

  corefall sweep plan SWEEP.yaml -o DIR   write DIR/manifest.json and the Slurm script DIR/job.sbatch
  sbatch DIR/job.sbatch                   run every task on a Slurm cluster (or: corefall sweep local DIR)
  corefall sweep status DIR               done, pending, failed tasks
  corefall sweep collect DIR              check every part and write DIR/summary.parquet

Each task writes one part of the hive-partitioned dataset DIR/catalogue/KEY=VALUE/.../part-NNNNN.parquet,
atomically; a rerun skips finished parts.`,
	}
	cmd.AddCommand(a.sweepPlanCommand(), a.sweepTaskCommand(), a.sweepLocalCommand(), a.sweepStatusCommand(), a.sweepCollectCommand())
	return cmd
}

func (a *app) sweepPlanCommand() *cobra.Command {
	var (
		out      string
		force    bool
		corefall string
		opt      = sweep.DefaultSlurmOptions()
	)
	cmd := &cobra.Command{
		Use:   "plan SWEEP.yaml -o DIR",
		Short: "Validate every configuration of a sweep and write its manifest and Slurm job script",
		Long: `plan expands the sweep file into tasks, checks every task's configuration before anything runs,
and writes DIR/manifest.json (each task's index, seed, varied values, part path and effective config)
and DIR/job.sbatch (a Slurm job array with one element per task). Planning the same sweep into
the same directory again keeps the finished parts; a different plan is refused unless --force,
which deletes the old catalogue and records.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return fmt.Errorf("sweep plan: give the sweep directory with -o DIR")
			}
			spec, err := sweep.ReadSpec(args[0])
			if err != nil {
				return err
			}
			m, err := spec.Plan()
			if err != nil {
				return err
			}
			bin, warn, err := corefallBinary(corefall)
			if err != nil {
				return err
			}
			opt.Corefall = bin
			d, err := sweep.WritePlan(out, m, opt, force)
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			shape := make([]string, 0, len(spec.Axes))
			for _, ax := range spec.Axes {
				shape = append(shape, fmt.Sprintf("%d %s", ax.Len(), strings.Join(ax.Keys, "+")))
			}
			if len(shape) == 0 {
				shape = append(shape, "1 cell")
			}
			fmt.Fprintf(w, "planned %d tasks in %s: %s x %d repeats\n", len(m.Tasks), d.Path, strings.Join(shape, " x "), m.Repeats)
			fmt.Fprintf(w, "  manifest:   %s\n", filepath.Join(d.Path, sweep.ManifestFile))
			fmt.Fprintf(w, "  job script: %s (array 0-%d, %d cpus, %s, %s per task; runs %s)\n",
				filepath.Join(d.Path, sweep.JobFile), len(m.Tasks)-1, opt.CPUsPerTask, opt.Mem, opt.Time, bin)
			if warn != "" {
				fmt.Fprintf(a.stderr, "warning: %s\n", warn)
			}
			if len(m.Tasks) > 1000 {
				fmt.Fprintf(a.stderr, "warning: %d tasks exceed Slurm's default MaxArraySize (1001); ask your admins for a larger one or split the sweep\n", len(m.Tasks))
			}
			fmt.Fprintf(w, "submit it to Slurm with:\n  sbatch %s\n", filepath.Join(d.Path, sweep.JobFile))
			fmt.Fprintf(w, "or run it on this machine with:\n  corefall sweep local %s\n", d.Path)
			fmt.Fprintf(w, "then:\n  corefall sweep status %s\n  corefall sweep collect %s\n", d.Path, d.Path)
			return nil
		},
	}
	f := cmd.Flags()
	f.StringVarP(&out, "output", "o", "", "sweep directory to write (created if needed)")
	f.BoolVar(&force, "force", false, "replace a different plan in DIR, deleting its catalogue and records")
	f.StringVar(&corefall, "corefall", "", "corefall binary the tasks run (default: this one); must be reachable from the compute nodes")
	f.IntVar(&opt.Throttle, "throttle", opt.Throttle, "most tasks running at once (the %N of --array); 0 for no limit")
	f.IntVar(&opt.CPUsPerTask, "cpus-per-task", opt.CPUsPerTask, "cores per task (the task runs that many workers)")
	f.StringVar(&opt.Mem, "mem", opt.Mem, "memory per task, e.g. 4G")
	f.StringVar(&opt.Time, "time", opt.Time, "wall-time limit per task, e.g. 02:00:00")
	f.StringVar(&opt.Partition, "partition", "", "Slurm partition (default: the cluster's default)")
	f.StringVar(&opt.JobName, "job-name", opt.JobName, "Slurm job name")
	f.StringArrayVar(&opt.Extra, "sbatch", nil, "extra #SBATCH option, e.g. --sbatch=--account=astro (repeatable)")
	return cmd
}

// corefallBinary returns the absolute path of the binary tasks should run, and a warning when it
// looks temporary.
func corefallBinary(flag string) (string, string, error) {
	if flag != "" {
		abs, err := filepath.Abs(flag)
		if err != nil {
			return "", "", err
		}
		if st, err := os.Stat(abs); err != nil || st.IsDir() {
			return "", "", fmt.Errorf("sweep plan: --corefall %s is not a file", flag)
		}
		return abs, "", nil
	}
	exe, err := os.Executable()
	if err != nil {
		return "", "", fmt.Errorf("sweep plan: cannot find this program's path (%v); give --corefall PATH", err)
	}
	if r, err := filepath.EvalSymlinks(exe); err == nil {
		exe = r
	}
	warn := ""
	if strings.Contains(exe, "go-build") || strings.HasSuffix(exe, ".test") {
		warn = fmt.Sprintf("the job script runs %s, which looks temporary (go run or go test); give --corefall PATH to an installed corefall", exe)
	}
	return exe, warn, nil
}

func (a *app) sweepTaskCommand() *cobra.Command {
	var (
		index int
		force bool
	)
	cmd := &cobra.Command{
		Use:   "task DIR",
		Short: "Run one task of a planned sweep (the command of each job-array element)",
		Long: `task runs one task of the sweep in DIR and writes its part and done-record. The index comes from
--index, else SLURM_ARRAY_TASK_ID (Slurm job arrays), else JOB_COMPLETION_INDEX (Kubernetes indexed
Jobs). A finished task (done-record present, checksum matching) is skipped unless --force. Workers:
SLURM_CPUS_PER_TASK when set, else the config's workers (0: one per core).`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			d, err := sweep.Open(args[0])
			if err != nil {
				return err
			}
			flag := -1
			if cmd.Flags().Changed("index") {
				if index < 0 {
					return fmt.Errorf("sweep task: --index %d; want 0 to %d", index, d.NumTasks()-1)
				}
				flag = index
			}
			i, from, err := sweep.TaskIndex(flag, a.environ)
			if err != nil {
				return err
			}
			if _, err := d.Task(i); err != nil {
				return fmt.Errorf("%w (index from %s)", err, from)
			}
			workers := 0
			if v := a.getenv("SLURM_CPUS_PER_TASK"); v != "" {
				if n, err := strconv.Atoi(v); err == nil && n > 0 {
					workers = n
				}
			}
			res, err := d.RunTask(cmd.Context(), i, sweep.TaskOptions{Force: force, Workers: workers})
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			if res.Skipped {
				fmt.Fprintf(w, "task %d: already done (%s, %d rows); --force reruns it\n", i, res.Record.Part, res.Record.Rows)
				return nil
			}
			fmt.Fprintf(w, "task %d: wrote %s (%d systems, %d rows) in %.2f s\n", i, res.Record.Part, res.Record.Systems, res.Record.Rows, res.Record.Seconds)
			return nil
		},
	}
	cmd.Flags().IntVar(&index, "index", 0, "task index (default: $SLURM_ARRAY_TASK_ID, else $JOB_COMPLETION_INDEX)")
	cmd.Flags().BoolVar(&force, "force", false, "rerun the task even if its part is done")
	return cmd
}

// getenv looks a variable up in the app's environment.
func (a *app) getenv(name string) string {
	for _, kv := range a.environ {
		if k, v, ok := strings.Cut(kv, "="); ok && k == name {
			return v
		}
	}
	return ""
}

func (a *app) sweepLocalCommand() *cobra.Command {
	var (
		jobs  int
		force bool
	)
	cmd := &cobra.Command{
		Use:   "local DIR",
		Short: "Run the sweep's unfinished tasks on this machine, N at a time",
		Long: `local runs every task of the sweep in DIR that is not done (pending, failed or corrupt), --jobs at a
time, each with max(1, cores/jobs) workers. A task that fails does not stop the others. Ctrl-C stops
the running tasks, which leave no part behind.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			d, err := sweep.Open(args[0])
			if err != nil {
				return err
			}
			if jobs < 1 {
				return fmt.Errorf("sweep local: --jobs %d; want >= 1", jobs)
			}
			var todo []int
			if force {
				for i := range d.NumTasks() {
					todo = append(todo, i)
				}
			} else {
				todo = d.Status().Unfinished()
			}
			w := cmd.OutOrStdout()
			if len(todo) == 0 {
				fmt.Fprintf(w, "all %d tasks are done; nothing to run (`corefall sweep collect %s` writes the summary)\n", d.NumTasks(), d.Path)
				return nil
			}
			workers := max(1, runtime.GOMAXPROCS(0)/jobs)
			fmt.Fprintf(w, "running %d of %d tasks, %d at a time with %d workers each\n", len(todo), d.NumTasks(), jobs, workers)
			opt := sweep.LocalOptions{Jobs: jobs, Workers: workers, Force: force}
			var bar *progressbar.ProgressBar
			var finished int
			if isTerminal(a.stderr) {
				bar = progressbar.NewOptions64(d.TotalSystems(todo),
					progressbar.OptionSetWriter(a.stderr),
					progressbar.OptionSetDescription(fmt.Sprintf("sweep 0/%d tasks", len(todo))),
					progressbar.OptionShowCount(),
					progressbar.OptionSetItsString("systems"),
					progressbar.OptionShowIts(),
					progressbar.OptionThrottle(100_000_000),
					progressbar.OptionClearOnFinish(),
				)
				opt.Progress = func(done int64) { _ = bar.Set64(done) }
			}
			var mu sync.Mutex // TaskDone calls are serialised already; mu guards the writers against the bar
			opt.TaskDone = func(r sweep.TaskResult, err error) {
				mu.Lock()
				defer mu.Unlock()
				finished++
				if bar != nil {
					bar.Describe(fmt.Sprintf("sweep %d/%d tasks", finished, len(todo)))
					if err != nil {
						_ = bar.Clear()
						fmt.Fprintf(a.stderr, "task %d failed: %v\n", r.Index, err)
					}
					return
				}
				printTaskLine(a.stderr, finished, len(todo), r, err)
			}
			res, err := d.RunLocal(cmd.Context(), todo, opt)
			if bar != nil {
				_ = bar.Finish()
			}
			if err != nil {
				return err
			}
			fmt.Fprintf(w, "ran %d tasks", res.Ran)
			if res.Skipped > 0 {
				fmt.Fprintf(w, " (%d already done)", res.Skipped)
			}
			fmt.Fprintf(w, "; next: corefall sweep collect %s\n", d.Path)
			return nil
		},
	}
	cmd.Flags().IntVarP(&jobs, "jobs", "j", 1, "tasks to run at once")
	cmd.Flags().BoolVar(&force, "force", false, "rerun every task, done or not")
	return cmd
}

func printTaskLine(w io.Writer, n, total int, r sweep.TaskResult, err error) {
	switch {
	case err != nil:
		fmt.Fprintf(w, "[%d/%d] task %d failed: %v\n", n, total, r.Index, err)
	case r.Skipped:
		fmt.Fprintf(w, "[%d/%d] task %d: already done\n", n, total, r.Index)
	default:
		fmt.Fprintf(w, "[%d/%d] task %d: %s (%d rows, %.2f s)\n", n, total, r.Index, r.Record.Part, r.Record.Rows, r.Record.Seconds)
	}
}

func (a *app) sweepStatusCommand() *cobra.Command {
	var asJSON bool
	cmd := &cobra.Command{
		Use:   "status DIR",
		Short: "Count the sweep's tasks: done, pending, failed (and corrupt)",
		Long: `status checks every task of the sweep in DIR: done (part and done-record present, checksum
matching), failed (failure record, part without done-record, or checksum mismatch: corrupt) or
pending. With --json it prints one object with the keys "tasks", "done", "pending", "failed",
"corrupt", "pending_tasks" and "failed_tasks".`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			d, err := sweep.Open(args[0])
			if err != nil {
				return err
			}
			st := d.Status()
			w := cmd.OutOrStdout()
			if asJSON {
				enc := json.NewEncoder(w)
				return enc.Encode(st)
			}
			fmt.Fprintf(w, "%s: %d tasks: %d done, %d pending, %d failed", d.Path, st.Tasks, st.Done, st.Pending, st.Failed)
			if st.Corrupt > 0 {
				fmt.Fprintf(w, " (%d corrupt)", st.Corrupt)
			}
			fmt.Fprintln(w)
			for k, p := range st.FailedTasks {
				if k == 20 {
					fmt.Fprintf(w, "  ... and %d more failed tasks (--json lists them all)\n", len(st.FailedTasks)-k)
					break
				}
				t, _ := d.Task(p.Index)
				fmt.Fprintf(w, "  task %d (%s): %s\n", p.Index, sweep.CellLabel(t.Vary), p.Reason)
			}
			switch {
			case st.Done == st.Tasks:
				fmt.Fprintf(w, "all done: corefall sweep collect %s\n", d.Path)
			case st.Failed > 0:
				fmt.Fprintf(w, "rerun the unfinished tasks with `corefall sweep local %s`, or resubmit `sbatch %s` (finished tasks are skipped)\n",
					d.Path, filepath.Join(d.Path, sweep.JobFile))
			}
			return nil
		},
	}
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	return cmd
}

func (a *app) sweepCollectCommand() *cobra.Command {
	var out string
	cmd := &cobra.Command{
		Use:   "collect DIR",
		Short: "Check every part of a finished sweep and write its summary (one row per task)",
		Long: `collect verifies every task's part against its done-record (sha256) and writes DIR/summary.parquet:
one row per task with its index, the varied keys, counts by remnant type (BH, NS, WD, none, star),
black-hole mass quantiles (p05, p50, p95, max), the mass represented and the systems. It refuses,
listing them, while any task is pending, failed or corrupt.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			d, err := sweep.Open(args[0])
			if err != nil {
				return err
			}
			res, err := d.Collect(out)
			if err != nil {
				return err
			}
			fmt.Fprintf(cmd.OutOrStdout(), "checked %d parts; wrote %s (%d rows)\nthe whole catalogue: %s (hive-partitioned Parquet)\n",
				res.Rows, res.Path, res.Rows, filepath.Join(d.Path, sweep.CatalogueDir))
			return nil
		},
	}
	cmd.Flags().StringVarP(&out, "output", "o", "", "summary file (default DIR/summary.parquet)")
	return cmd
}
