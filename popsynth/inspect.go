package popsynth

import (
	"errors"
	"fmt"
	"io"
	"strconv"

	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

// CatalogueInfo is what a catalogue says about itself: its provenance metadata and a tally of its rows.
type CatalogueInfo struct {
	Path            string
	Metadata        map[string]string
	Systems         int64 // from metadata
	MassRepresented float64
	Tally           Tally // counted from the rows
}

// Inspect reads the catalogue at path, checks its metadata and tallies every row: remnant types of
// primaries and companions, outcomes, BH and NS masses.
func Inspect(path string) (CatalogueInfo, error) {
	info := CatalogueInfo{Path: path}
	full, err := catalog.Open(path) // for the schema: which of the columns below it has
	if err != nil {
		return info, err
	}
	full.Close()
	r, err := catalog.OpenColumns(path, present(full.Schema(), catalog.ColRemnantType, catalog.ColRemnantMass, catalog.ColOutcome,
		catalog.CompanionPrefix+catalog.ColRemnantType, catalog.CompanionPrefix+catalog.ColRemnantMass)...)
	if err != nil {
		return info, err
	}
	defer r.Close()
	info.Metadata = r.Metadata()
	if info.Systems, err = strconv.ParseInt(info.Metadata[catalog.MetaSystems], 10, 64); err != nil {
		return info, fmt.Errorf("%s: metadata %s = %q is not a count of systems", path, catalog.MetaSystems, info.Metadata[catalog.MetaSystems])
	}
	if info.MassRepresented, err = strconv.ParseFloat(info.Metadata[catalog.MetaMassRepresented], 64); err != nil {
		return info, fmt.Errorf("%s: metadata %s = %q is not a mass", path, catalog.MetaMassRepresented, info.Metadata[catalog.MetaMassRepresented])
	}
	s := r.Schema()
	type starCols struct{ typ, mass int }
	stars := []starCols{{s.Index("remnant_type"), s.Index("remnant_mass")}}
	if i := s.Index("companion_remnant_type"); i >= 0 {
		stars = append(stars, starCols{i, s.Index("companion_remnant_mass")})
	}
	if stars[0].typ < 0 || stars[0].mass < 0 {
		return info, fmt.Errorf("%s: no remnant_type or remnant_mass column; is it a corefall catalogue?", path)
	}
	outcome := s.Index("outcome")
	cols := s.Columns()
	typeOf := func(col int) ([]remnant.Type, error) {
		cats := cols[col].Categories
		m := make([]remnant.Type, len(cats))
		for i, c := range cats {
			t, err := remnant.ParseType(c)
			if err != nil {
				return nil, fmt.Errorf("%s: column %s has an unknown remnant type %q", path, cols[col].Name, c)
			}
			m[i] = t
		}
		return m, nil
	}
	typeMaps := make([][]remnant.Type, len(stars))
	for k, sc := range stars {
		if typeMaps[k], err = typeOf(sc.typ); err != nil {
			return info, err
		}
	}
	var outcomeMap []Outcome
	if outcome >= 0 {
		for _, c := range cols[outcome].Categories {
			o, ok := ParseOutcome(c)
			if !ok {
				return info, fmt.Errorf("%s: column outcome has an unknown word %q", path, c)
			}
			outcomeMap = append(outcomeMap, o)
		}
	}
	t := &info.Tally
	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return info, fmt.Errorf("%s: %w", path, err)
		}
		t.Systems += int64(b.Len)
		for i := range b.Len {
			o := Single
			if outcome >= 0 {
				o = outcomeMap[b.Cols[outcome].Cat[i]]
			}
			t.Outcomes[o]++
			for k, sc := range stars {
				if v := b.Cols[sc.typ].Valid; v != nil && !v[i] {
					continue // a single star has no companion
				}
				t.AddStar(typeMaps[k][b.Cols[sc.typ].Cat[i]], float64(b.Cols[sc.mass].F32[i]))
			}
		}
	}
	if d, ok := info.Metadata[MetaDropped]; ok {
		if t.Dropped, err = strconv.ParseInt(d, 10, 64); err != nil {
			return info, fmt.Errorf("%s: metadata %s = %q is not a count", path, MetaDropped, d)
		}
	}
	if t.Systems+t.Dropped != info.Systems {
		return info, fmt.Errorf("%s holds %d rows (and %d dropped systems) but its metadata says %d systems: the file is incomplete or was altered",
			path, t.Systems, t.Dropped, info.Systems)
	}
	return info, nil
}
