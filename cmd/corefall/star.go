package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"

	"github.com/spf13/cobra"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/remnant"
)

// remnantJSON is the interface form of a remnant (DESIGN.md: fixed keys).
type remnantJSON struct {
	Type             string  `json:"type"`
	Mass             float64 `json:"mass"`
	BaryonicMass     float64 `json:"baryonic_mass"`
	ProtoMass        float64 `json:"proto_mass"`
	FallbackMass     float64 `json:"fallback_mass"`
	FallbackFraction float64 `json:"fallback_fraction"`
}

func toRemnantJSON(r remnant.Remnant) remnantJSON {
	return remnantJSON{
		Type: r.Type.String(), Mass: r.Mass, BaryonicMass: r.BaryonicMass, ProtoMass: r.ProtoMass,
		FallbackMass: r.FallbackMass, FallbackFraction: r.FallbackFraction,
	}
}

type starJSON struct {
	InitialMass float64     `json:"initial_mass"`
	Metallicity float64     `json:"metallicity"`
	LifetimeMyr float64     `json:"lifetime_myr"`
	FinalMass   float64     `json:"final_mass"`
	HeCoreMass  float64     `json:"he_core_mass"`
	COCoreMass  float64     `json:"co_core_mass"`
	Remnant     remnantJSON `json:"remnant"`
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

// flagPositive checks that a numeric flag is a finite number > 0.
func flagPositive(name string, x float64) error {
	if math.IsNaN(x) || math.IsInf(x, 0) || x <= 0 {
		return fmt.Errorf("--%s %v: must be a finite number > 0", name, x)
	}
	return nil
}

func (a *app) starCommand() *cobra.Command {
	var (
		cf      configFlags
		mass, z float64
		asJSON  bool
	)
	cmd := &cobra.Command{
		Use:   "star --mass M --metallicity Z",
		Short: "Follow one star's life to its remnant",
		Example: `  corefall star --mass 30 --metallicity 0.0142
  corefall star --mass 80 --metallicity 0.0002 --set explosion.engine=delayed --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagPositive("mass", mass); err != nil {
				return err
			}
			if math.IsNaN(z) || z <= 0 || z >= 1 {
				return fmt.Errorf("--metallicity %v: a metallicity is a mass fraction in (0, 1), e.g. 0.0142 (solar)", z)
			}
			cfg, err := a.load(&cf)
			if err != nil {
				return err
			}
			phys, err := cfg.Physics()
			if err != nil {
				return err
			}
			s, err := phys.Star(mass, z, popsynth.Stream(cfg.Seed, 0))
			if err != nil {
				return err
			}
			if asJSON {
				return writeJSON(cmd.OutOrStdout(), starJSON{
					InitialMass: s.Core.InitialMass, Metallicity: s.Core.Metallicity, LifetimeMyr: s.Core.LifetimeMyr,
					FinalMass: s.Core.FinalMass, HeCoreMass: s.Core.HeCoreMass, COCoreMass: s.Core.COCoreMass,
					Remnant: toRemnantJSON(s.Remnant),
				})
			}
			printStar(cmd.OutOrStdout(), cfg, s)
			return nil
		},
	}
	cf.register(cmd)
	cmd.Flags().Float64Var(&mass, "mass", 0, "initial mass, Msun")
	cmd.Flags().Float64Var(&z, "metallicity", 0, "metallicity Z (mass fraction; solar 0.0142)")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	_ = cmd.MarkFlagRequired("mass")
	_ = cmd.MarkFlagRequired("metallicity")
	return cmd
}

// printStar prints a readable account of one star's life.
func printStar(w io.Writer, cfg popsynth.Config, s popsynth.StarResult) {
	c, r := s.Core, s.Remnant
	fmt.Fprintf(w, "A %.4g Msun star of metallicity Z = %.4g (%.3g x solar, Z_sun = 0.0142)\n",
		c.InitialMass, c.Metallicity, c.Metallicity/0.0142)
	fmt.Fprintf(w, "  lives %.4g Myr\n", c.LifetimeMyr)
	if r.Type == remnant.Star {
		fmt.Fprintf(w, "  and is still a star at the time limit of %.4g Myr (time_limit_myr)\n", cfg.TimeLimitMyr)
		return
	}
	fmt.Fprintf(w, "  loses %.4g Msun to winds, ending with %.4g Msun\n", c.InitialMass-c.FinalMass, c.FinalMass)
	fmt.Fprintf(w, "  helium core %.4g Msun, carbon-oxygen core %.4g Msun\n", c.HeCoreMass, c.COCoreMass)
	if c.MaxRadius > 0 {
		fmt.Fprintf(w, "  largest radius %.4g Rsun\n", c.MaxRadius)
	}
	printRemnant(w, cfg, r)
}

// fateText explains a fate in words.
func fateText(f remnant.Fate) string {
	switch f {
	case remnant.WDFate:
		return "the core never collapses: it sheds its envelope and cools as a white dwarf"
	case remnant.SN:
		return "the core collapses and the supernova succeeds"
	case remnant.Failed:
		return "the core collapses directly: no successful explosion, everything falls back"
	case remnant.PPISN:
		return "pair-instability pulsations strip mass, then the core collapses"
	case remnant.PISN:
		return "a pair-instability supernova disrupts the whole star"
	case remnant.Alive:
		return "still a star"
	}
	return f.String()
}

func typeText(t remnant.Type) string {
	switch t {
	case remnant.BH:
		return "black hole"
	case remnant.NS:
		return "neutron star"
	case remnant.WD:
		return "white dwarf"
	case remnant.None:
		return "no remnant"
	}
	return t.String()
}

// printRemnant prints a remnant decision in words.
func printRemnant(w io.Writer, cfg popsynth.Config, r remnant.Remnant) {
	fmt.Fprintf(w, "  fate: %s\n", fateText(r.Fate))
	if r.Fate == remnant.SN || r.Fate == remnant.Failed {
		fmt.Fprintf(w, "  %s engine (Fryer et al. 2012): proto-core %.4g Msun, fallback %.4g Msun (fraction %.3g)\n",
			cfg.Explosion.Engine, r.ProtoMass, r.FallbackMass, r.FallbackFraction)
	}
	if r.Type == remnant.None {
		fmt.Fprintln(w, "  -> no remnant")
		return
	}
	fmt.Fprintf(w, "  -> %s of %.4g Msun", typeText(r.Type), r.Mass)
	if r.BaryonicMass > 0 && r.BaryonicMass != r.Mass {
		fmt.Fprintf(w, " (baryonic %.4g Msun)", r.BaryonicMass)
	}
	fmt.Fprintln(w)
}

func (a *app) remnantCommand() *cobra.Command {
	var (
		cf                       configFlags
		co, fin, he, z, initMass float64
		engine                   string
		asJSON                   bool
	)
	cmd := &cobra.Command{
		Use:   "remnant --co-core C --final-mass F",
		Short: "Decide the remnant of a pre-collapse star from its core masses",
		Example: `  corefall remnant --co-core 9 --final-mass 25 --engine rapid
  corefall remnant --co-core 4 --final-mass 15 --engine delayed --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagPositive("co-core", co); err != nil {
				return err
			}
			if err := flagPositive("final-mass", fin); err != nil {
				return err
			}
			if co > fin {
				return fmt.Errorf("--co-core %v exceeds --final-mass %v: the CO core lies inside the star", co, fin)
			}
			if !cmd.Flags().Changed("he-core") {
				he = co
			}
			if he < co || he > fin {
				return fmt.Errorf("--he-core %v must lie between --co-core (%v) and --final-mass (%v)", he, co, fin)
			}
			if err := flagPositive("metallicity", z); err != nil {
				return err
			}
			var extra []string
			if engine != "" {
				extra = append(extra, "explosion.engine="+engine)
			}
			cfg, err := a.load(&cf, extra...)
			if err != nil {
				if engine != "" {
					return fmt.Errorf("--engine %q: must be rapid or delayed", engine)
				}
				return err
			}
			p, err := cfg.Prescription()
			if err != nil {
				return err
			}
			r := p.Decide(remnant.Core{InitialMass: initMass, Metallicity: z, FinalMass: fin, HeCoreMass: he, COCoreMass: co})
			if asJSON {
				return writeJSON(cmd.OutOrStdout(), toRemnantJSON(r))
			}
			fmt.Fprintf(cmd.OutOrStdout(), "A star of %.4g Msun with a %.4g Msun helium core and a %.4g Msun CO core (Z = %.4g)\n", fin, he, co, z)
			printRemnant(cmd.OutOrStdout(), cfg, r)
			return nil
		},
	}
	cf.register(cmd)
	cmd.Flags().Float64Var(&co, "co-core", 0, "carbon-oxygen core mass, Msun")
	cmd.Flags().Float64Var(&fin, "final-mass", 0, "final (pre-collapse) stellar mass, Msun")
	cmd.Flags().Float64Var(&he, "he-core", 0, "helium core mass, Msun (default: the CO core mass)")
	cmd.Flags().Float64Var(&z, "metallicity", 0.0142, "metallicity Z (used by the pair-instability fit)")
	cmd.Flags().Float64Var(&initMass, "initial-mass", 0, "initial mass, Msun (used by the white-dwarf relation; 0 = unknown)")
	cmd.Flags().StringVar(&engine, "engine", "", "rapid | delayed (sets explosion.engine)")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	_ = cmd.MarkFlagRequired("co-core")
	_ = cmd.MarkFlagRequired("final-mass")
	return cmd
}
