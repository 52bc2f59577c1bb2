package sweep

import (
	"fmt"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
)

// SlurmOptions are the resources and settings of the Slurm job array that runs a sweep.
type SlurmOptions struct {
	// Corefall is the absolute path of the corefall binary the tasks run; it must be reachable
	// from the compute nodes.
	Corefall string
	// JobName is the job's name (sbatch --job-name).
	JobName string
	// Partition is the Slurm partition; "" for the cluster's default.
	Partition string
	// Time is the wall-time limit of one task, in a Slurm time format: "MM", "HH:MM:SS",
	// "D-HH:MM:SS" and so on.
	Time string
	// Mem is the memory of one task, e.g. "4G" or "2000M".
	Mem string
	// CPUsPerTask is the number of cores of one task; the task runs that many workers.
	CPUsPerTask int
	// Throttle is the largest number of tasks running at once (the %N of --array); 0 for no limit.
	Throttle int
	// Extra are further sbatch options, one per #SBATCH line, e.g. "--account=astro".
	Extra []string
}

// DefaultSlurmOptions returns the defaults of `corefall sweep plan`.
func DefaultSlurmOptions() SlurmOptions {
	return SlurmOptions{JobName: "corefall-sweep", Time: "01:00:00", Mem: "2G", CPUsPerTask: 1, Throttle: 50}
}

var (
	slurmTimeRE = regexp.MustCompile(`^(\d+-\d+(:\d+(:\d+)?)?|\d+(:\d+(:\d+)?)?|UNLIMITED|INFINITE|unlimited|infinite)$`)
	slurmMemRE  = regexp.MustCompile(`^\d+[KMGT]?$`)
	slurmNameRE = regexp.MustCompile(`^[A-Za-z0-9._+-]+$`)
)

// Validate checks the options, naming the bad one and what is allowed.
func (o SlurmOptions) Validate() error {
	switch {
	case o.Corefall == "" || !filepath.IsAbs(o.Corefall):
		return fmt.Errorf("sweep: corefall binary path %q must be absolute (the job runs it on the compute nodes)", o.Corefall)
	case !slurmNameRE.MatchString(o.JobName):
		return fmt.Errorf("sweep: job name %q: use letters, digits and . _ + - only", o.JobName)
	case o.Partition != "" && !slurmNameRE.MatchString(o.Partition):
		return fmt.Errorf("sweep: partition %q: use letters, digits and . _ + - only", o.Partition)
	case !slurmTimeRE.MatchString(o.Time):
		return fmt.Errorf("sweep: time limit %q is not a Slurm time; use minutes (90), HH:MM:SS (01:30:00) or D-HH:MM:SS (1-12:00:00)", o.Time)
	case !slurmMemRE.MatchString(o.Mem):
		return fmt.Errorf("sweep: memory %q is not a Slurm size; use a whole number with an optional unit K, M, G or T, e.g. 4G", o.Mem)
	case o.CPUsPerTask < 1:
		return fmt.Errorf("sweep: cpus per task = %d; want >= 1", o.CPUsPerTask)
	case o.Throttle < 0:
		return fmt.Errorf("sweep: throttle = %d; want >= 0 (0 for no limit on tasks running at once)", o.Throttle)
	}
	for _, e := range o.Extra {
		if !strings.HasPrefix(e, "-") || strings.ContainsAny(e, "\n\r") {
			return fmt.Errorf("sweep: extra sbatch option %q must be one option such as --account=astro", e)
		}
	}
	return nil
}

// SlurmScript returns the text of a Slurm batch script that runs every task of m, as one job array,
// with `corefall sweep task DIR` (DIR absolute). Each array element finds its task index in
// SLURM_ARRAY_TASK_ID. Logs go to DIR/logs/NAME-JOBID_INDEX.out.
func SlurmScript(dir string, m *Manifest, o SlurmOptions) (string, error) {
	if err := o.Validate(); err != nil {
		return "", err
	}
	if !filepath.IsAbs(dir) {
		return "", fmt.Errorf("sweep: sweep directory %q must be absolute in a job script", dir)
	}
	if strings.ContainsAny(dir, " \t\n\r%'\"\\") {
		return "", fmt.Errorf("sweep: sweep directory %q contains a space, quote, backslash or %%; Slurm's #SBATCH lines cannot hold it: choose another directory", dir)
	}
	if len(m.Tasks) == 0 {
		return "", fmt.Errorf("sweep: the manifest has no tasks")
	}
	array := fmt.Sprintf("0-%d", len(m.Tasks)-1)
	if o.Throttle > 0 {
		array += "%" + strconv.Itoa(o.Throttle)
	}
	var b strings.Builder
	fmt.Fprintf(&b, "#!/bin/bash\n")
	fmt.Fprintf(&b, "# corefall sweep: %d tasks (%d grid cells x %d repeats), planned from %s.\n", len(m.Tasks), m.Cells, m.Repeats, m.Sweep)
	fmt.Fprintf(&b, "# Submit with:  sbatch %s\n", filepath.Join(dir, "job.sbatch"))
	fmt.Fprintf(&b, "# Each array element runs one task; a finished task is skipped when its element is rerun.\n")
	fmt.Fprintf(&b, "#SBATCH --job-name=%s\n", o.JobName)
	fmt.Fprintf(&b, "#SBATCH --array=%s\n", array)
	fmt.Fprintf(&b, "#SBATCH --ntasks=1\n")
	fmt.Fprintf(&b, "#SBATCH --cpus-per-task=%d\n", o.CPUsPerTask)
	fmt.Fprintf(&b, "#SBATCH --mem=%s\n", o.Mem)
	fmt.Fprintf(&b, "#SBATCH --time=%s\n", o.Time)
	if o.Partition != "" {
		fmt.Fprintf(&b, "#SBATCH --partition=%s\n", o.Partition)
	}
	fmt.Fprintf(&b, "#SBATCH --output=%s\n", filepath.Join(dir, "logs", "%x-%A_%a.out"))
	for _, e := range o.Extra {
		fmt.Fprintf(&b, "#SBATCH %s\n", e)
	}
	fmt.Fprintf(&b, "set -eu\n")
	fmt.Fprintf(&b, "exec %s sweep task %s\n", shellQuote(o.Corefall), shellQuote(dir))
	return b.String(), nil
}

// shellQuote quotes s for a POSIX shell when it holds anything but plain path characters.
func shellQuote(s string) string {
	plain := true
	for _, r := range s {
		if !(r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("/._+-=:,@", r)) {
			plain = false
			break
		}
	}
	if plain && s != "" {
		return s
	}
	return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'"
}
