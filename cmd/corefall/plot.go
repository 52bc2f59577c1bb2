package main

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"
	"gonum.org/v1/plot/vg"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/figures"
)

// plotKinds are the figures `corefall plot` draws, what each reads, and a line of help.
var plotKinds = []struct{ name, input, doc string }{
	{"mass-spectrum", "catalogues", "NS and BH masses per unit stellar mass formed, Poisson errors"},
	{"kicks", "catalogues", "natal kick speeds of NS and BH, normalised"},
	{"period-eccentricity", "catalogues", "final period against eccentricity, bound BH + star binaries"},
	{"delay-times", "catalogues", "birth-to-merger delay times of double compact objects"},
	{"rates", "rate tables", "rate densities against redshift with 1-sigma bands"},
	{"initial-final", "physics", "remnant mass against initial mass, a line per --metallicity"},
	{"cores", "physics", "final, He-core and CO-core masses against initial mass"},
}

// plotInputs heads each group of kinds in the help.
var plotInputs = []struct{ input, head string }{
	{"catalogues", "Figures of catalogues (each FILE a catalogue; several are overlaid on common bins):"},
	{"rate tables", "Figure of rate tables (each FILE the JSON of `corefall rates --json`):"},
	{"physics", "Figures of the physics (no FILE; -c and --set choose the physics):"},
}

func plotKindInput(kind string) (string, bool) {
	for _, k := range plotKinds {
		if k.name == kind {
			return k.input, true
		}
	}
	return "", false
}

func plotKindNames() string {
	names := make([]string, len(plotKinds))
	for i, k := range plotKinds {
		names[i] = k.name
	}
	return strings.Join(names, ", ")
}

func (a *app) plotCommand() *cobra.Command {
	var (
		cf            configFlags
		out, kind     string
		logAxes       bool
		zs            []float64
		bins, dpi     int
		width, height float64
	)
	var kindHelp strings.Builder
	for _, in := range plotInputs {
		fmt.Fprintln(&kindHelp, in.head)
		for _, k := range plotKinds {
			if k.input == in.input {
				fmt.Fprintf(&kindHelp, "  %-20s %s\n", k.name, k.doc)
			}
		}
	}
	cmd := &cobra.Command{
		Use:   "plot [FILE...]",
		Short: "Draw a figure (PNG or SVG) of catalogues, rate tables or the remnant physics",
		Long: `plot draws a publication-ready figure of the kind chosen by --kind.

` + kindHelp.String() + `
A catalogue figure labels each catalogue by its file name and the assumptions that differ between
them; its title names those they share, read from the configuration stored in each catalogue.
The physics figures evolve stars of initial mass imf.sample_min to imf.sample_max through the
configured core model and remnant prescription, at the configured metallicities unless
--metallicity gives others.

The output format follows the extension of -o: .png or .svg. Without -o the figure is written to
the current directory as <first FILE's name>-<kind>.png, or as initial-final.png, cores.png
(cores-Z<Z>.png with --metallicity).`,
		Example: `  corefall plot cat.parquet --log -o bh-ns.png
  corefall plot rapid.parquet delayed.parquet --kind mass-spectrum -o compare.svg
  corefall plot --kind initial-final --metallicity 0.0002,0.002,0.0142 -o if.png
  corefall plot --kind cores --metallicity 0.0002 --set explosion.engine=delayed
  corefall plot rates.json --kind rates`,
		RunE: func(cmd *cobra.Command, files []string) error {
			input, ok := plotKindInput(kind)
			if !ok {
				return fmt.Errorf("--kind %q: unknown figure; allowed: %s", kind, plotKindNames())
			}
			size := figures.Size{Width: vg.Length(width) * vg.Inch, Height: vg.Length(height) * vg.Inch, DPI: dpi}
			if err := size.Validate(); err != nil {
				return fmt.Errorf("--width/--height/--dpi: %w", err)
			}
			if bins < 0 {
				return fmt.Errorf("--bins %d: must be >= 0 (0 chooses)", bins)
			}
			for _, z := range zs {
				if math.IsNaN(z) || z <= 0 || z >= 1 {
					return fmt.Errorf("--metallicity %v: a metallicity is a mass fraction in (0, 1), e.g. 0.0142 (solar)", z)
				}
			}
			usesConfig := cf.file != "" || len(cf.set) > 0
			switch input {
			case "physics":
				if len(files) > 0 {
					return fmt.Errorf("--kind %s takes no FILE (got %s): it evolves stars from the configuration; use -c/--set to change it", kind, strings.Join(files, " "))
				}
			default:
				if len(files) == 0 {
					return fmt.Errorf("--kind %s needs at least one FILE (%s)", kind, input)
				}
				if usesConfig {
					return fmt.Errorf("-c/--set apply to --kind initial-final and cores only; a catalogue's figures use the configuration stored in the catalogue")
				}
				if len(zs) > 0 {
					return fmt.Errorf("--metallicity applies to --kind initial-final and cores only; for --kind %s the metallicities are those of the catalogue", kind)
				}
			}
			if out == "" {
				out = defaultPlotName(kind, files, zs)
			}
			if _, err := figures.FormatOf(out); err != nil {
				return fmt.Errorf("-o: %w", err)
			}
			for _, f := range files {
				if filepath.Clean(f) == filepath.Clean(out) {
					return fmt.Errorf("-o %s is one of the input files; choose another name", out)
				}
			}
			fig, err := a.buildFigure(kind, input, files, &cf, zs, logAxes, bins)
			if err != nil {
				return err
			}
			p, err := fig.Plot()
			if err != nil {
				return err
			}
			if err := figures.Save(out, p, size); err != nil {
				return err
			}
			fmt.Fprintf(cmd.OutOrStdout(), "wrote %s (%s)\n", out, kind)
			return nil
		},
	}
	cf.register(cmd)
	cmd.Flags().StringVarP(&out, "output", "o", "", "figure file, .png or .svg (default <FILE name>-<kind>.png)")
	cmd.Flags().StringVar(&kind, "kind", "mass-spectrum", "figure: "+plotKindNames())
	cmd.Flags().BoolVar(&logAxes, "log", false, "logarithmic mass axis (mass-spectrum: bins in log10 M; initial-final, cores: log-log)")
	cmd.Flags().Float64SliceVar(&zs, "metallicity", nil, "metallicities Z for initial-final (comma-separated) or cores (one); default: those of the configuration")
	cmd.Flags().IntVar(&bins, "bins", 0, "number of bins on linear axes, bins per decade on log axes (0 chooses)")
	cmd.Flags().IntVar(&dpi, "dpi", figures.DefaultSize().DPI, "resolution of PNG figures, dots per inch")
	cmd.Flags().Float64Var(&width, "width", 6, "figure width, inches")
	cmd.Flags().Float64Var(&height, "height", 4, "figure height, inches")
	return cmd
}

// defaultPlotName is <first file's stem>-<kind>.png, or <kind>.png (cores-<Z>.png) for the physics
// figures.
func defaultPlotName(kind string, files []string, zs []float64) string {
	if len(files) > 0 {
		return figures.Stem(files[0]) + "-" + kind + ".png"
	}
	if kind == "cores" && len(zs) == 1 {
		return fmt.Sprintf("cores-Z%g.png", zs[0])
	}
	return kind + ".png"
}

// configMetallicities returns the metallicities a configuration samples: the fixed value, the
// listed values, or the ends of a log-uniform range.
func configMetallicities(cfg popsynth.Config) []float64 {
	switch m := cfg.Metallicity; m.Sampling {
	case "list":
		return append([]float64(nil), m.Values...)
	case "log-uniform":
		return []float64{m.Min, m.Max}
	default:
		return []float64{m.Fixed}
	}
}

// buildFigure reads the inputs of a figure and bins them.
func (a *app) buildFigure(kind, input string, files []string, cf *configFlags, zs []float64, logAxes bool, bins int) (figures.Figure, error) {
	switch input {
	case "physics":
		cfg, err := a.load(cf)
		if err != nil {
			return nil, err
		}
		if len(zs) == 0 {
			zs = configMetallicities(cfg)
		}
		if kind == "cores" {
			if len(zs) != 1 {
				return nil, fmt.Errorf("--kind cores draws one metallicity; give one with --metallicity (got %d: %v)", len(zs), zs)
			}
			return figures.NewCores(cfg, zs[0], logAxes)
		}
		return figures.NewInitialFinal(cfg, zs, logAxes)
	case "rate tables":
		tables := make([]figures.RateTable, len(files))
		names := make([]string, len(files))
		for i, f := range files {
			t, err := figures.ReadRateTable(f)
			if err != nil {
				return nil, err
			}
			tables[i], names[i] = t, figures.Stem(f)
		}
		return figures.NewRates(tables, names)
	}
	cats := make([]*figures.Catalogue, len(files))
	for i, f := range files {
		c, err := figures.ReadCatalogue(f)
		if err != nil {
			return nil, err
		}
		cats[i] = c
	}
	switch kind {
	case "kicks":
		return figures.NewKicks(cats, bins)
	case "period-eccentricity":
		return figures.NewPeriodEccentricity(cats)
	case "delay-times":
		return figures.NewDelayTimes(cats, bins)
	}
	return figures.NewMassSpectrum(cats, logAxes, bins)
}
