package popsynth

import (
	"errors"
	"fmt"
	"io"
	"math"

	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/popsynth/rates"
	"github.com/corefall/corefall/remnant"
)

// RatesOptions says how to turn a catalogue into rate densities over redshift.
type RatesOptions struct {
	Cosmology rates.Cosmology
	SFR       rates.SFR
	// MetallicitySigma is the spread (dex) of the log-normal metallicity distribution of new stars
	// about the mean relation of Madau & Fragos (2017); used unless the catalogue has one fixed Z.
	MetallicitySigma float64
	ZMax, DZ         float64 // the redshift grid [0, ZMax] in steps of DZ
}

// CatalogueRates reads the catalogue at path and returns the formation rate densities of neutron
// stars and black holes and the merger rate densities of BBH, BH-NS and NS-NS pairs on a redshift
// grid. Every neutron star and black hole (primaries and companions) is a formation event at its
// collapse time; every bound pair of compact remnants is a merger event at its delay time. Each row
// is weighted by the inverse of the stellar mass its sub-population represents (the whole catalogue,
// or for metallicity.sampling = list the part drawn at its metallicity) and reweighted from the
// catalogue's own metallicity sampling to the cosmic metallicity distribution (package rates
// explains the estimator).
func CatalogueRates(path string, opt RatesOptions) (rates.Result, error) {
	zs, err := rates.RedshiftGrid(opt.ZMax, opt.DZ)
	if err != nil {
		return rates.Result{}, err
	}
	info, mc, schema, err := catalogueConfig(path)
	if err != nil {
		return rates.Result{}, err
	}
	est := rates.Estimator{Cosmology: opt.Cosmology, SFR: opt.SFR}
	switch mc.Sampling {
	case "fixed":
		est.Sampling = rates.FixedZ(mc.Fixed)
	case "list":
		est.Sampling = rates.DiscreteZ(mc.Values...)
	case "log-uniform":
		est.Sampling = rates.LogUniformZ(mc.Min, mc.Max)
	}
	if mc.Sampling != "fixed" {
		est.Metallicity = rates.MadauFragos2017Metallicity(opt.MetallicitySigma)
	}
	tally, err := est.NewTally()
	if err != nil {
		return rates.Result{}, err
	}

	// The mass each row stands for: the whole catalogue's, shared by its rows; for a list of
	// metallicities, the part drawn at the row's value (counted in a first pass).
	rowsAt := map[float32]int64{}
	var rows int64
	if mc.Sampling == "list" {
		r, err := catalog.OpenColumns(path, catalog.ColMetallicity)
		if err != nil {
			return rates.Result{}, err
		}
		for {
			b, err := r.Next()
			if errors.Is(err, io.EOF) {
				break
			}
			if err != nil {
				r.Close()
				return rates.Result{}, fmt.Errorf("%s: %w", path, err)
			}
			for _, z := range b.Cols[0].F32[:b.Len] {
				rowsAt[z]++
			}
			rows += int64(b.Len)
		}
		r.Close()
	}
	weight := func(z float32) float64 {
		if mc.Sampling == "list" {
			return float64(rows) / (info.MassRepresented * float64(rowsAt[z]))
		}
		return 1 / info.MassRepresented
	}
	// Stored metallicities are float32; the estimator needs the configured float64 values.
	exactZ := func(z float32) float64 {
		if mc.Sampling == "list" {
			for _, v := range mc.Values {
				if float32(v) == z {
					return v
				}
			}
		}
		if mc.Sampling == "fixed" {
			return mc.Fixed
		}
		return float64(z)
	}

	err = scanCatalogue(path, present(schema, rateColumnNames...), func(b *catalog.Batch, c *rateColumns) error {
		for i := range b.Len {
			z32 := b.Cols[c.z].F32[i]
			z, w := exactZ(z32), weight(z32)
			add := func(kind rates.EventKind, delay float64) error {
				return tally.Add(rates.Event{Kind: kind, DelayMyr: delay, Metallicity: z, Weight: w})
			}
			for _, s := range c.stars {
				if s.typ < 0 || (b.Cols[s.mass].Valid != nil && !b.Cols[s.mass].Valid[i]) {
					continue
				}
				switch c.types[s.typ][b.Cols[s.typ].Cat[i]] {
				case remnant.NS:
					if err := add(rates.NSFormation, float64(b.Cols[s.life].F32[i])); err != nil {
						return err
					}
				case remnant.BH:
					if err := add(rates.BHFormation, float64(b.Cols[s.life].F32[i])); err != nil {
						return err
					}
				}
			}
			if c.delay < 0 || !b.Cols[c.delay].Valid[i] {
				continue
			}
			t1 := c.types[c.stars[0].typ][b.Cols[c.stars[0].typ].Cat[i]]
			t2 := c.types[c.stars[1].typ][b.Cols[c.stars[1].typ].Cat[i]]
			kind := rates.NSNSMerger
			switch {
			case t1 == remnant.BH && t2 == remnant.BH:
				kind = rates.BBHMerger
			case t1 == remnant.BH || t2 == remnant.BH:
				kind = rates.BHNSMerger
			}
			if err := add(kind, float64(b.Cols[c.delay].F32[i])); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return rates.Result{}, err
	}
	return tally.Rates(zs)
}

// catalogueConfig reads a catalogue's provenance, the metallicity sampling it was made with and its
// schema.
func catalogueConfig(path string) (CatalogueInfo, MetallicityConfig, *catalog.Schema, error) {
	r, err := catalog.Open(path)
	if err != nil {
		return CatalogueInfo{}, MetallicityConfig{}, nil, err
	}
	defer r.Close()
	info := CatalogueInfo{Path: path, Metadata: r.Metadata()}
	cfg, err := ParseYAMLConfig(path+" (stored config)", info.Metadata[catalog.MetaConfig])
	if err != nil {
		return info, MetallicityConfig{}, nil, fmt.Errorf("%s: the stored configuration does not load: %w", path, err)
	}
	if _, err := fmt.Sscan(info.Metadata[catalog.MetaMassRepresented], &info.MassRepresented); err != nil ||
		!(info.MassRepresented > 0) || math.IsInf(info.MassRepresented, 0) {
		return info, MetallicityConfig{}, nil, fmt.Errorf("%s: metadata %s = %q is not a positive mass", path,
			catalog.MetaMassRepresented, info.Metadata[catalog.MetaMassRepresented])
	}
	return info, cfg.Metallicity, r.Schema(), nil
}

// rateColumnNames are the columns the rate estimator reads, where the catalogue has them.
var rateColumnNames = []string{catalog.ColMetallicity, catalog.ColDelayTime,
	catalog.ColRemnantType, catalog.ColRemnantMass, catalog.ColLifetime,
	catalog.CompanionPrefix + catalog.ColRemnantType, catalog.CompanionPrefix + catalog.ColRemnantMass,
	catalog.CompanionPrefix + catalog.ColLifetime}

type rateStar struct{ typ, mass, life int }

// rateColumns are the positions of the columns the rate estimator reads.
type rateColumns struct {
	z     int
	stars []rateStar
	delay int // -1 for a single-star catalogue
	types map[int][]remnant.Type
}

// scanCatalogue reads the named columns of the catalogue at path and calls fn with every batch.
func scanCatalogue(path string, names []string, fn func(*catalog.Batch, *rateColumns) error) error {
	r, err := catalog.OpenColumns(path, names...)
	if err != nil {
		return err
	}
	defer r.Close()
	s := r.Schema()
	c := &rateColumns{z: s.Index(catalog.ColMetallicity), delay: s.Index(catalog.ColDelayTime), types: map[int][]remnant.Type{}}
	for _, prefix := range []string{"", catalog.CompanionPrefix} {
		st := rateStar{s.Index(prefix + catalog.ColRemnantType), s.Index(prefix + catalog.ColRemnantMass), s.Index(prefix + catalog.ColLifetime)}
		if st.typ < 0 {
			if prefix == "" {
				return fmt.Errorf("%s has no %s column: is it a corefall catalogue?", path, catalog.ColRemnantType)
			}
			continue
		}
		var ts []remnant.Type
		for _, w := range s.Columns()[st.typ].Categories {
			t, err := remnant.ParseType(w)
			if err != nil {
				return fmt.Errorf("%s: %w", path, err)
			}
			ts = append(ts, t)
		}
		c.types[st.typ] = ts
		c.stars = append(c.stars, st)
	}
	if c.z < 0 {
		return fmt.Errorf("%s has no %s column: is it a corefall catalogue?", path, catalog.ColMetallicity)
	}
	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return fmt.Errorf("%s: %w", path, err)
		}
		if err := fn(b, c); err != nil {
			return err
		}
	}
}

// present returns those of names that s has (a single-star catalogue has no companion or orbit
// columns).
func present(s *catalog.Schema, names ...string) []string {
	var have []string
	for _, n := range names {
		if s.Index(n) >= 0 {
			have = append(have, n)
		}
	}
	return have
}
