package popsynth

import (
	"fmt"

	"github.com/corefall/corefall/popsynth/catalog"
	"github.com/corefall/corefall/remnant"
)

// starColumns are the positions of one star's columns in a batch (the primary's, or the
// companion's with the "companion_" prefix), and the category codes of the remnant words.
type starColumns struct {
	initialMass, lifetime, finalMass, heCore, coCore, fate, typ, mass, fallback, kick int
	fateCode, typeCode                                                                [8]uint8
}

// columns are the positions of every column the engine fills.
type columns struct {
	id, z     int
	star      starColumns
	companion starColumns
	outcome   int
	outcomeOf [numOutcomes]uint8
	orbit     orbitColumns
	nullable  []int // every nullable column
}

type orbitColumns struct {
	a0, p0, e0, a, p, e, vsys, vinf1, vinf2, tinsp, tdelay int
}

func mustIndex(s *catalog.Schema, name string) int {
	i := s.Index(name)
	if i < 0 {
		panic(fmt.Sprintf("popsynth: catalogue schema has no column %q", name))
	}
	return i
}

// categoryCodes maps each value 0..7 of a remnant enumeration to the position of its word in the
// column's category list.
func categoryCodes(col catalog.Column, word func(uint8) string) [8]uint8 {
	var codes [8]uint8
	for v := range uint8(8) {
		for j, c := range col.Categories {
			if c == word(v) {
				codes[v] = uint8(j)
			}
		}
	}
	return codes
}

func indexStar(s *catalog.Schema, prefix string) starColumns {
	c := starColumns{
		initialMass: mustIndex(s, prefix+"initial_mass"),
		lifetime:    mustIndex(s, prefix+"lifetime_myr"),
		finalMass:   mustIndex(s, prefix+"final_mass"),
		heCore:      mustIndex(s, prefix+"he_core_mass"),
		coCore:      mustIndex(s, prefix+"co_core_mass"),
		fate:        mustIndex(s, prefix+"fate"),
		typ:         mustIndex(s, prefix+"remnant_type"),
		mass:        mustIndex(s, prefix+"remnant_mass"),
		fallback:    mustIndex(s, prefix+"fallback_fraction"),
		kick:        mustIndex(s, prefix+"kick_speed"),
	}
	cols := s.Columns()
	c.fateCode = categoryCodes(cols[c.fate], func(v uint8) string { return remnant.Fate(v).String() })
	c.typeCode = categoryCodes(cols[c.typ], func(v uint8) string { return remnant.Type(v).String() })
	return c
}

func indexColumns(s *catalog.Schema, binaries bool) columns {
	c := columns{
		id:   mustIndex(s, "system_id"),
		z:    mustIndex(s, "metallicity"),
		star: indexStar(s, ""),
	}
	for j, col := range s.Columns() {
		if col.Nullable {
			c.nullable = append(c.nullable, j)
		}
	}
	if !binaries {
		return c
	}
	c.companion = indexStar(s, "companion_")
	c.outcome = mustIndex(s, "outcome")
	cats := s.Columns()[c.outcome].Categories
	for o := range numOutcomes {
		for j, w := range cats {
			if w == o.String() {
				c.outcomeOf[o] = uint8(j)
			}
		}
	}
	c.orbit = orbitColumns{
		a0: mustIndex(s, "initial_separation_au"), p0: mustIndex(s, "initial_period_days"),
		e0: mustIndex(s, "initial_eccentricity"), a: mustIndex(s, "final_separation_au"),
		p: mustIndex(s, "final_period_days"), e: mustIndex(s, "final_eccentricity"),
		vsys: mustIndex(s, "systemic_velocity_kms"), vinf1: mustIndex(s, "runaway_speed_kms"),
		vinf2: mustIndex(s, "companion_runaway_speed_kms"), tinsp: mustIndex(s, "inspiral_time_myr"),
		tdelay: mustIndex(s, "delay_time_myr"),
	}
	return c
}

func (c *columns) putSystem(b *catalog.Batch, i int, id int64, z float64) {
	b.Cols[c.id].I64[i] = id
	b.Cols[c.z].F32[i] = float32(z)
}

// put writes a star's life and remnant into row i.
func (c *starColumns) put(b *catalog.Batch, i int, s *StarResult) {
	setF32(b, c.initialMass, i, s.Core.InitialMass)
	setF32(b, c.lifetime, i, s.Core.LifetimeMyr)
	setF32(b, c.finalMass, i, s.Core.FinalMass)
	setF32(b, c.heCore, i, s.Core.HeCoreMass)
	setF32(b, c.coCore, i, s.Core.COCoreMass)
	setCat(b, c.fate, i, c.fateCode[s.Remnant.Fate])
	setCat(b, c.typ, i, c.typeCode[s.Remnant.Type])
	setF32(b, c.mass, i, s.Remnant.Mass)
	setF32(b, c.fallback, i, s.Remnant.FallbackFraction)
	setF32(b, c.kick, i, s.KickSpeed())
}

// setCat sets a category column value (and marks it present when the column is nullable).
func setCat(b *catalog.Batch, col, i int, code uint8) {
	cd := &b.Cols[col]
	cd.Cat[i] = code
	if cd.Valid != nil {
		cd.Valid[i] = true
	}
}

// setF32 sets a float32 column value (and marks it present when the column is nullable).
func setF32(b *catalog.Batch, col, i int, x float64) {
	cd := &b.Cols[col]
	cd.F32[i] = float32(x)
	if cd.Valid != nil {
		cd.Valid[i] = true
	}
}

// clearNullable makes every nullable column of the batch null in all its rows (a fast memory
// clear), so that rows set only the values they have.
func (c *columns) clearNullable(b *catalog.Batch) {
	for _, j := range c.nullable {
		cd := &b.Cols[j]
		clear(cd.Valid)
		clear(cd.F32)
		clear(cd.Cat)
	}
}

// clearRow makes every nullable column null in row i.
func (c *columns) clearRow(b *catalog.Batch, i int) {
	for _, j := range c.nullable {
		cd := &b.Cols[j]
		cd.Valid[i] = false
		if cd.F32 != nil {
			cd.F32[i] = 0
		}
		if cd.Cat != nil {
			cd.Cat[i] = 0
		}
	}
}
