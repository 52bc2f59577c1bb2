package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"strconv"

	"github.com/spf13/cobra"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/rates"
)

// sfrByName returns the star-formation history named on the command line: a published one, or a
// CSV table "redshift,sfr" at that path.
func sfrByName(name string) (rates.SFR, error) {
	switch name {
	case "madau-dickinson-2014":
		return rates.MadauDickinson2014(), nil
	case "madau-fragos-2017":
		return rates.MadauFragos2017(), nil
	}
	f, err := os.Open(name)
	if err != nil {
		return nil, fmt.Errorf("--sfr %q: not madau-dickinson-2014, madau-fragos-2017 or a readable table (%v)", name, err)
	}
	defer f.Close()
	t, err := rates.ParseSFRTable(f, name)
	if err != nil {
		return nil, fmt.Errorf("--sfr %s: %w", name, err)
	}
	return t, nil
}

var rateKinds = []rates.EventKind{rates.NSFormation, rates.BHFormation, rates.BBHMerger, rates.BHNSMerger, rates.NSNSMerger}

func (a *app) ratesCommand() *cobra.Command {
	var (
		sfrName       string
		zmax, dz, sig float64
		asJSON, asCSV bool
	)
	cmd := &cobra.Command{
		Use:   "rates FILE",
		Short: "Rate densities of NS/BH formation and compact mergers over redshift",
		Long: `rates weights a catalogue by the stellar mass it represents, by the cosmic star-formation
history at each formation redshift and by the metallicity distribution there, and prints
formation rate densities of neutron stars and black holes and merger rate densities of BBH,
BH-NS and NS-NS pairs, in Gpc^-3 yr^-1, with Poisson uncertainties from the catalogue size.
A catalogue made at one fixed metallicity stands for all star formation at every redshift.`,
		Example: `  corefall rates catalogue.parquet
  corefall rates catalogue.parquet --sfr madau-dickinson-2014 --z-max 6 --dz 0.1 --json
  corefall rates catalogue.parquet --sfr my-sfr.csv --csv > rates.csv`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if asJSON && asCSV {
				return fmt.Errorf("give at most one of --json and --csv")
			}
			sfr, err := sfrByName(sfrName)
			if err != nil {
				return err
			}
			if err := flagPositive("metallicity-sigma", sig); err != nil {
				return err
			}
			res, err := popsynth.CatalogueRates(args[0], popsynth.RatesOptions{
				Cosmology: rates.Planck18(), SFR: sfr, MetallicitySigma: sig, ZMax: zmax, DZ: dz,
			})
			if err != nil {
				return err
			}
			w := cmd.OutOrStdout()
			switch {
			case asJSON:
				return writeJSON(w, res)
			case asCSV:
				return writeRatesCSV(w, res)
			}
			printRates(w, res)
			return nil
		},
	}
	cmd.Flags().StringVar(&sfrName, "sfr", "madau-fragos-2017", "star-formation history: madau-dickinson-2014, madau-fragos-2017, or a CSV table path (redshift,sfr)")
	cmd.Flags().Float64Var(&zmax, "z-max", 10, "largest redshift of the grid")
	cmd.Flags().Float64Var(&dz, "dz", 0.05, "redshift step of the grid")
	cmd.Flags().Float64Var(&sig, "metallicity-sigma", 0.5, "spread (dex) of the log-normal metallicity distribution of new stars")
	cmd.Flags().BoolVar(&asJSON, "json", false, "print one JSON object")
	cmd.Flags().BoolVar(&asCSV, "csv", false, "print CSV for spreadsheets")
	return cmd
}

func writeRatesCSV(w io.Writer, r rates.Result) error {
	cw := csv.NewWriter(w)
	header := []string{"z"}
	for _, k := range rateKinds {
		header = append(header, k.String(), k.String()+"_uncertainty")
	}
	if err := cw.Write(header); err != nil {
		return err
	}
	for i, z := range r.Z {
		row := []string{strconv.FormatFloat(z, 'g', -1, 64)}
		for _, k := range rateKinds {
			row = append(row, strconv.FormatFloat(r.Rates.Of(k)[i], 'g', 6, 64), strconv.FormatFloat(r.Uncertainty.Of(k)[i], 'g', 6, 64))
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// printRates prints a readable table, thinned to about 20 rows.
func printRates(w io.Writer, r rates.Result) {
	fmt.Fprintf(w, "rate densities in %s (source frame), star formation %s\n", r.Units, r.SFR)
	fmt.Fprintf(w, "cosmology: flat Lambda-CDM, H0 = %.2f km/s/Mpc, Omega_m = %.5f, age %.3f Gyr\n", r.Cosmology.H0, r.Cosmology.OmegaM, r.Cosmology.AgeGyr)
	fmt.Fprintf(w, "metallicity: %s\n\n", r.Metallicity)
	fmt.Fprintf(w, "%6s %11s %11s %11s %11s %11s\n", "z", "NS form.", "BH form.", "BBH merge", "BH-NS", "NS-NS")
	step := max(1, len(r.Z)/20)
	for i := 0; i < len(r.Z); i += step {
		fmt.Fprintf(w, "%6.2f", r.Z[i])
		for _, k := range rateKinds {
			fmt.Fprintf(w, " %11.4g", r.Rates.Of(k)[i])
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintln(w, "\nuse --json or --csv for every grid point and the Poisson uncertainties")
}
