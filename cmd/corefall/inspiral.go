package main

import (
	"fmt"
	"math"

	"github.com/spf13/cobra"

	"github.com/corefall/corefall/binary"
)

type inspiralJSON struct {
	MergeTimeGyr float64 `json:"merge_time_gyr"`
	SeparationAU float64 `json:"separation_au"`
	Eccentricity float64 `json:"eccentricity"`
}

func (a *app) inspiralCommand() *cobra.Command {
	var (
		m1, m2, sep, period, ecc float64
		asJSON                   bool
	)
	cmd := &cobra.Command{
		Use:   "inspiral --m1 A --m2 B (--separation-au X | --period-days P)",
		Short: "Gravitational-wave merger time of a compact binary (Peters 1964)",
		Example: `  corefall inspiral --m1 1.4398 --m2 1.3886 --period-days 0.322997448918 --eccentricity 0.617134
  corefall inspiral --m1 30 --m2 25 --separation-au 0.1 --json`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, _ []string) error {
			if err := flagPositive("m1", m1); err != nil {
				return err
			}
			if err := flagPositive("m2", m2); err != nil {
				return err
			}
			hasSep, hasP := cmd.Flags().Changed("separation-au"), cmd.Flags().Changed("period-days")
			if hasSep == hasP {
				return fmt.Errorf("give exactly one of --separation-au and --period-days")
			}
			if hasP {
				if err := flagPositive("period-days", period); err != nil {
					return err
				}
				sep = binary.SeparationAU(period, m1+m2)
			} else if err := flagPositive("separation-au", sep); err != nil {
				return err
			}
			if math.IsNaN(ecc) || ecc < 0 || ecc >= 1 {
				return fmt.Errorf("--eccentricity %v: must lie in [0, 1)", ecc)
			}
			gyr := binary.MergeTime(m1, m2, sep, ecc) / 1e3
			if asJSON {
				return writeJSON(cmd.OutOrStdout(), inspiralJSON{MergeTimeGyr: gyr, SeparationAU: sep, Eccentricity: ecc})
			}
			w := cmd.OutOrStdout()
			fmt.Fprintf(w, "%.4g + %.4g Msun at a = %.6g AU (P = %.6g d), e = %.4g\n", m1, m2, sep, binary.PeriodDays(sep, m1+m2), ecc)
			fmt.Fprintf(w, "merges by gravitational radiation in %.4g Gyr (%.4g Myr; Peters 1964)\n", gyr, gyr*1e3)
			if gyr > 13.787 {
				fmt.Fprintln(w, "  (longer than the age of the Universe, 13.787 Gyr: it has not merged yet)")
			}
			return nil
		},
	}
	cmd.Flags().Float64Var(&m1, "m1", 0, "mass of the first body, Msun")
	cmd.Flags().Float64Var(&m2, "m2", 0, "mass of the second body, Msun")
	cmd.Flags().Float64Var(&sep, "separation-au", 0, "semi-major axis, AU")
	cmd.Flags().Float64Var(&period, "period-days", 0, "orbital period, days")
	cmd.Flags().Float64Var(&ecc, "eccentricity", 0, "orbital eccentricity in [0, 1)")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	_ = cmd.MarkFlagRequired("m1")
	_ = cmd.MarkFlagRequired("m2")
	return cmd
}
