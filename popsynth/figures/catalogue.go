package figures

import (
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/catalog"
)

// Info is a catalogue's provenance, as its figures show it.
type Info struct {
	Path            string
	Name            string // file name without directory and extension, the legend's first word
	Metadata        map[string]string
	Config          popsynth.Config // decoded from the corefall.config metadata when HasConfig
	HasConfig       bool            // false when the metadata holds no configuration this version reads
	MassRepresented float64         // Msun of stars the catalogue stands for; 0 when the metadata lacks it
	Systems         int64           // from the metadata
}

// Stem returns the file name of path without its directory and extension.
func Stem(path string) string {
	base := filepath.Base(path)
	return strings.TrimSuffix(base, filepath.Ext(base))
}

// Catalogue holds what the catalogue figures draw from one catalogue file: its neutron stars and
// black holes (primaries and companions alike), its bound black-hole + star binaries and its bound
// double compact objects.
type Catalogue struct {
	Info
	NS, BH Remnants
	// BHStar holds the bound binaries of one black hole and one (still living) star.
	BHStar Orbits
	// Delays holds the delay times (Myr) from birth to merger of bound double compact objects, by
	// class: BBH (two black holes), BHNS (a black hole and a neutron star), NSNS.
	Delays [numDCO][]float64
	Rows   int64 // rows read
}

// Remnants are the masses (Msun) and natal kick speeds (km/s) of remnants of one type.
type Remnants struct {
	Mass, Kick []float64
}

// Orbits are final orbital periods (days) and eccentricities of binaries.
type Orbits struct {
	PeriodDays, Eccentricity []float64
}

// DCO is a class of double compact objects.
type DCO uint8

// Classes of double compact objects.
const (
	BBH  DCO = iota // two black holes
	BHNS            // a black hole and a neutron star
	NSNS            // two neutron stars
	numDCO
)

// String returns "BBH", "BH-NS" or "NS-NS".
func (c DCO) String() string {
	switch c {
	case BBH:
		return "BBH"
	case BHNS:
		return "BH-NS"
	case NSNS:
		return "NS-NS"
	}
	return "DCO(" + strconv.Itoa(int(c)) + ")"
}

// readInfo decodes a catalogue's metadata.
func readInfo(path string, md map[string]string) (Info, error) {
	info := Info{Path: path, Name: Stem(path), Metadata: md}
	if s, ok := md[catalog.MetaMassRepresented]; ok {
		m, err := strconv.ParseFloat(s, 64)
		if err != nil || !(m > 0) {
			return info, fmt.Errorf("%s: metadata %s = %q is not a positive mass in Msun", path, catalog.MetaMassRepresented, s)
		}
		info.MassRepresented = m
	}
	if s, ok := md[catalog.MetaSystems]; ok {
		n, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			return info, fmt.Errorf("%s: metadata %s = %q is not a count of systems", path, catalog.MetaSystems, s)
		}
		info.Systems = n
	}
	// A configuration this version cannot decode (one written by another version, say) leaves
	// the figure without assumptions in its title rather than without a figure.
	if text, ok := md[catalog.MetaConfig]; ok {
		if cfg, err := popsynth.ParseYAMLConfig(path, text); err == nil {
			info.Config, info.HasConfig = cfg, true
		}
	}
	return info, nil
}

// starCols are the positions of one star's columns (the primary's or the companion's) and the
// category codes of BH, NS and star in its remnant_type column (-1 when absent).
type starCols struct {
	typ, mass, kick int
	bh, ns, star    int
}

// ReadCatalogue reads the catalogue at path (Parquet, Arrow IPC or CSV, as catalog.Open reads them)
// and keeps what the catalogue figures need. It streams the file batch by batch; the memory it
// keeps grows with the number of neutron stars, black holes and selected binaries only.
func ReadCatalogue(path string) (*Catalogue, error) {
	r, err := catalog.Open(path)
	if err != nil {
		return nil, err
	}
	defer r.Close()
	info, err := readInfo(path, r.Metadata())
	if err != nil {
		return nil, err
	}
	c := &Catalogue{Info: info}
	s := r.Schema()
	cols := s.Columns()
	need := func(name string) (int, error) {
		i := s.Index(name)
		if i < 0 {
			return -1, fmt.Errorf("%s: no column %q; is it a corefall catalogue?", path, name)
		}
		return i, nil
	}
	code := func(col int, word string) int {
		for j, w := range cols[col].Categories {
			if w == word {
				return j
			}
		}
		return -1
	}
	star := func(prefix string) (starCols, error) {
		var sc starCols
		var err error
		if sc.typ, err = need(prefix + catalog.ColRemnantType); err != nil {
			return sc, err
		}
		if sc.mass, err = need(prefix + catalog.ColRemnantMass); err != nil {
			return sc, err
		}
		if sc.kick, err = need(prefix + catalog.ColKickSpeed); err != nil {
			return sc, err
		}
		sc.bh, sc.ns, sc.star = code(sc.typ, "BH"), code(sc.typ, "NS"), code(sc.typ, "star")
		return sc, nil
	}
	stars := make([]starCols, 1, 2)
	if stars[0], err = star(""); err != nil {
		return nil, err
	}
	binaries := s.Index(catalog.ColOutcome) >= 0
	var outcome, bound, period, ecc, delay int
	if binaries {
		sc, err := star(catalog.CompanionPrefix)
		if err != nil {
			return nil, err
		}
		stars = append(stars, sc)
		for _, p := range []struct {
			dst  *int
			name string
		}{{&outcome, catalog.ColOutcome}, {&period, catalog.ColFinalPeriod}, {&ecc, catalog.ColFinalEccentricity}, {&delay, catalog.ColDelayTime}} {
			if *p.dst, err = need(p.name); err != nil {
				return nil, err
			}
		}
		bound = code(outcome, "bound")
	}

	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		c.Rows += int64(b.Len)
		f := func(col, row int) (float64, bool) {
			d := &b.Cols[col]
			if d.Valid != nil && !d.Valid[row] {
				return 0, false
			}
			if cols[col].Kind == catalog.Float64 {
				return d.F64[row], true
			}
			return float64(d.F32[row]), true
		}
		// word returns the category code of a row, or -1 when it is null.
		word := func(col, row int) int {
			d := &b.Cols[col]
			if d.Valid != nil && !d.Valid[row] {
				return -1
			}
			return int(d.Cat[row])
		}
		for row := range b.Len {
			typ := [2]int{-1, -1}
			for k, sc := range stars {
				t := word(sc.typ, row)
				typ[k] = t
				if t < 0 {
					continue
				}
				if t != sc.bh && t != sc.ns {
					continue
				}
				m, okM := f(sc.mass, row)
				v, okV := f(sc.kick, row)
				if !okM || !okV {
					continue // a companion's columns are null for a single star
				}
				dst := &c.NS
				if t == sc.bh {
					dst = &c.BH
				}
				dst.Mass = append(dst.Mass, m)
				dst.Kick = append(dst.Kick, v)
			}
			if !binaries || word(outcome, row) != bound {
				continue
			}
			p, s2 := stars[0], stars[1]
			bh1, bh2 := typ[0] == p.bh, typ[1] == s2.bh
			ns1, ns2 := typ[0] == p.ns, typ[1] == s2.ns
			switch {
			case (bh1 && typ[1] == s2.star) || (bh2 && typ[0] == p.star):
				per, ok1 := f(period, row)
				e, ok2 := f(ecc, row)
				if ok1 && ok2 {
					c.BHStar.PeriodDays = append(c.BHStar.PeriodDays, per)
					c.BHStar.Eccentricity = append(c.BHStar.Eccentricity, e)
				}
			case (bh1 || ns1) && (bh2 || ns2):
				t, ok := f(delay, row)
				if !ok {
					continue
				}
				cls := BHNS
				if bh1 && bh2 {
					cls = BBH
				} else if ns1 && ns2 {
					cls = NSNS
				}
				c.Delays[cls] = append(c.Delays[cls], t)
			}
		}
	}
	return c, nil
}
