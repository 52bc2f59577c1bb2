package main

import (
	"fmt"

	"github.com/spf13/cobra"

	"github.com/corefall/corefall/configs"
	"github.com/corefall/corefall/popsynth"
)

// configFlags are the flags that layer configuration: -c FILE and --set key=value.
type configFlags struct {
	file string
	set  []string
}

func (f *configFlags) register(cmd *cobra.Command) {
	cmd.Flags().StringVarP(&f.file, "config", "c", "", "YAML config file layered over the embedded default")
	cmd.Flags().StringArrayVar(&f.set, "set", nil, "override one config key, e.g. --set imf.law=salpeter (repeatable)")
}

// load builds the effective configuration: embedded default < file < COREFALL_* environment < --set
// (< extra, the values of command-specific flags).
func (a *app) load(f *configFlags, extra ...string) (popsynth.Config, error) {
	return popsynth.Load(popsynth.Sources{File: f.file, Environ: a.environ, Set: append(append([]string(nil), f.set...), extra...)})
}

func (a *app) configCommand() *cobra.Command {
	cmd := &cobra.Command{
		Use:   "config",
		Short: "Print the default or effective configuration, or check one",
	}
	cmd.AddCommand(&cobra.Command{
		Use:   "defaults",
		Short: "Print the embedded default configuration, every key with a comment",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			_, err := cmd.OutOrStdout().Write(configs.Default)
			return err
		},
	})
	var show configFlags
	showCmd := &cobra.Command{
		Use:   "show",
		Short: "Print the effective configuration after layering file, environment and --set",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			cfg, err := a.load(&show)
			if err != nil {
				return err
			}
			fmt.Fprint(cmd.OutOrStdout(), cfg.YAML())
			return nil
		},
	}
	show.register(showCmd)
	var check configFlags
	checkCmd := &cobra.Command{
		Use:   "check",
		Short: "Validate a configuration, including that its physics can be built (e.g. a table model's grid)",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			cfg, err := a.load(&check)
			if err != nil {
				return err
			}
			if _, err := popsynth.NewEngine(cfg); err != nil {
				return err
			}
			src := "the embedded default"
			if check.file != "" {
				src = check.file
			}
			fmt.Fprintf(cmd.OutOrStdout(), "ok: %s is a valid configuration (%d systems, imf %s, engine %s, core model %s)\n",
				src, cfg.Systems, cfg.IMF.Law, cfg.Explosion.Engine, cfg.Core.Model)
			return nil
		},
	}
	check.register(checkCmd)
	cmd.AddCommand(showCmd, checkCmd)
	return cmd
}

func (a *app) versionCommand() *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "Print corefall's version and the Go version it was built with",
		Args:  cobra.NoArgs,
		Run: func(cmd *cobra.Command, _ []string) {
			fmt.Fprintf(cmd.OutOrStdout(), "corefall %s (%s)\n", popsynth.Version, goVersion())
		},
	}
}
