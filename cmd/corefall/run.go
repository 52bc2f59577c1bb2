package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"runtime/pprof"
	"strconv"
	"strings"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/remnant"
)

func goVersion() string { return runtime.Version() }

// formatFromExtension returns the output format a file name asks for, or "".
func formatFromExtension(path string) string {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".parquet", ".pq":
		return "parquet"
	case ".arrow", ".feather", ".ipc":
		return "arrow"
	case ".csv":
		return "csv"
	}
	return ""
}

func (a *app) runCommand() *cobra.Command {
	var (
		cf      configFlags
		out     string
		workers int
		quiet   bool
		cpuProf string
	)
	cmd := &cobra.Command{
		Use:   "run",
		Short: "Evolve a population and write its remnant catalogue",
		Long: `run evolves the configured population and writes its catalogue (Parquet by default).
The catalogue appears under its final name only when complete; Ctrl-C stops the run within a
second and leaves no partial file.`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			var extra []string
			if out != "" {
				extra = append(extra, "output.path="+out)
				if f := formatFromExtension(out); f != "" && !setsKey(cf.set, "output.format") {
					extra = append(extra, "output.format="+f)
				}
			}
			if cmd.Flags().Changed("workers") {
				extra = append(extra, "workers="+strconv.Itoa(workers))
			}
			cfg, err := a.load(&cf, extra...)
			if err != nil {
				return err
			}
			eng, err := popsynth.NewEngine(cfg)
			if err != nil {
				return err
			}
			if cpuProf != "" {
				stop, err := startCPUProfile(cpuProf)
				if err != nil {
					return err
				}
				defer stop()
			}
			var progress popsynth.Progress
			if !quiet && isTerminal(a.stderr) {
				bar := progressbar.NewOptions64(cfg.Systems,
					progressbar.OptionSetWriter(a.stderr),
					progressbar.OptionSetDescription("evolving"),
					progressbar.OptionShowCount(),
					progressbar.OptionSetItsString("systems"),
					progressbar.OptionShowIts(),
					progressbar.OptionThrottle(100_000_000),
					progressbar.OptionClearOnFinish(),
				)
				progress = func(done int64) { _ = bar.Set64(done) }
				defer bar.Finish()
			}
			sum, err := eng.WriteCatalogue(cmd.Context(), cfg.Output.Path, progress)
			if err != nil {
				return err
			}
			if !quiet {
				printRunSummary(cmd.OutOrStdout(), cfg, sum)
			}
			return nil
		},
	}
	cf.register(cmd)
	cmd.Flags().StringVarP(&out, "output", "o", "", "catalogue path (sets output.path; the extension .parquet, .arrow or .csv also sets output.format)")
	cmd.Flags().IntVar(&workers, "workers", 0, "worker goroutines (sets workers; 0 = one per core)")
	cmd.Flags().BoolVarP(&quiet, "quiet", "q", false, "print nothing but errors")
	cmd.Flags().StringVar(&cpuProf, "cpuprofile", "", "write a CPU profile of the run to this file (for go tool pprof)")
	return cmd
}

// startCPUProfile starts a CPU profile written to path and returns the function that stops it.
func startCPUProfile(path string) (func(), error) {
	f, err := os.Create(path)
	if err != nil {
		return nil, fmt.Errorf("--cpuprofile: %w", err)
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return nil, fmt.Errorf("--cpuprofile: %w", err)
	}
	return func() { pprof.StopCPUProfile(); f.Close() }, nil
}

func setsKey(set []string, key string) bool {
	for _, kv := range set {
		if k, _, _ := strings.Cut(kv, "="); strings.TrimSpace(k) == key {
			return true
		}
	}
	return false
}

func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

// printRunSummary prints counts by remnant type, BH mass quantiles, mass represented and speed.
func printRunSummary(w io.Writer, cfg popsynth.Config, s popsynth.Summary) {
	fmt.Fprintf(w, "wrote %s: %d systems", s.Path, s.Systems)
	if s.Binaries() > 0 {
		fmt.Fprintf(w, " (%d binaries)", s.Binaries())
	}
	fmt.Fprintf(w, " in %.2f s (%.3g systems/s)\n", s.Seconds, s.SystemsPerSecond())
	fmt.Fprintf(w, "mass represented: %.6g Msun (IMF %s over %g-%g Msun, sampled %g-%g)\n",
		s.MassRepresented, cfg.IMF.Law, cfg.IMF.Min, cfg.IMF.Max, cfg.IMF.SampleMin, cfg.IMF.SampleMax)
	printCounts(w, &s.Tally)
	if s.Binaries() > 0 {
		o := &s.Outcomes
		fmt.Fprintf(w, "binaries: %d bound, %d disrupted, %d interacting (not followed", o[popsynth.Bound], o[popsynth.Disrupted], o[popsynth.Interacting])
		if s.Dropped > 0 {
			fmt.Fprintf(w, "; %d left out of the catalogue", s.Dropped)
		}
		fmt.Fprintln(w, ")")
	}
}

// printCounts prints remnant counts and fractions and the BH and NS mass quantiles.
func printCounts(w io.Writer, t *popsynth.Tally) {
	var stars int64
	for _, c := range t.Counts {
		stars += c
	}
	fmt.Fprintf(w, "%-6s %12s %8s\n", "type", "count", "share")
	for _, typ := range []remnant.Type{remnant.BH, remnant.NS, remnant.WD, remnant.None, remnant.Star} {
		share := 0.0
		if stars > 0 {
			share = float64(t.Count(typ)) / float64(stars)
		}
		fmt.Fprintf(w, "%-6s %12d %7.2f%%\n", typ, t.Count(typ), 100*share)
	}
	quant := func(name string, h *popsynth.MassHist) {
		if h.N == 0 {
			fmt.Fprintf(w, "%s masses: none\n", name)
			return
		}
		fmt.Fprintf(w, "%s mass (Msun): p05 %.2f  p50 %.2f  p95 %.2f  max %.2f\n",
			name, h.Quantile(0.05), h.Quantile(0.5), h.Quantile(0.95), h.Max)
	}
	quant("BH", &t.BH)
	quant("NS", &t.NS)
}
