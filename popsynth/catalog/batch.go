package catalog

import (
	"fmt"
)

// ColumnData holds the values of one column of a Batch. Only the slice that
// matches the column's Kind is used: F32 for Float32, F64 for Float64, I64
// for Int64 and Cat for Category (an index into Column.Categories).
type ColumnData struct {
	F32 []float32
	F64 []float64
	I64 []int64
	Cat []uint8
	// Valid is used only by Nullable columns: Valid[i] is true when row i
	// has a value. A nil Valid means every value is present. Values at
	// missing rows are ignored.
	Valid []bool
}

// Batch is a reusable columnar block of rows. A producer sets Len (or calls
// Reset) and fills Cols[i] so that the slice of each column's kind, and Valid
// for nullable columns, has length Len.
type Batch struct {
	Schema *Schema
	Len    int
	Cols   []ColumnData
}

// NewBatch returns a batch for schema s whose slices have length 0 and
// the given capacity; Reset(n) with n <= capacity then allocates nothing.
func NewBatch(s *Schema, capacity int) *Batch {
	b := &Batch{Schema: s, Cols: make([]ColumnData, len(s.cols))}
	for i, c := range s.cols {
		d := &b.Cols[i]
		switch c.Kind {
		case Float32:
			d.F32 = make([]float32, 0, capacity)
		case Float64:
			d.F64 = make([]float64, 0, capacity)
		case Int64:
			d.I64 = make([]int64, 0, capacity)
		case Category:
			d.Cat = make([]uint8, 0, capacity)
		}
		if c.Nullable {
			d.Valid = make([]bool, 0, capacity)
		}
	}
	return b
}

func resize[T any](s []T, n int) []T {
	if n <= cap(s) {
		return s[:n]
	}
	return append(s[:cap(s)], make([]T, n-cap(s))...)
}

// Reset sets Len to n and gives the slice of each column's kind (and Valid,
// for nullable columns) length n, growing it if needed. Old values are not
// cleared: the producer must set every value and every Valid flag.
func (b *Batch) Reset(n int) {
	if n < 0 {
		n = 0
	}
	b.Len = n
	for i, c := range b.Schema.cols {
		d := &b.Cols[i]
		switch c.Kind {
		case Float32:
			d.F32 = resize(d.F32, n)
		case Float64:
			d.F64 = resize(d.F64, n)
		case Int64:
			d.I64 = resize(d.I64, n)
		case Category:
			d.Cat = resize(d.Cat, n)
		}
		if c.Nullable {
			d.Valid = resize(d.Valid, n)
		}
	}
}

// Validate checks that the batch is consistent with its schema: one
// ColumnData per column, every used slice of length Len, Valid either nil or
// of length Len (and nil for columns that are not Nullable), and every
// category index within the column's categories, also at missing rows
// (use 0 there).
func (b *Batch) Validate() error {
	if b.Schema == nil {
		return fmt.Errorf("catalog: batch has no schema")
	}
	if len(b.Cols) != len(b.Schema.cols) {
		return fmt.Errorf("catalog: batch has %d columns, schema has %d", len(b.Cols), len(b.Schema.cols))
	}
	if b.Len < 0 {
		return fmt.Errorf("catalog: batch Len is %d; it must be >= 0", b.Len)
	}
	for i, c := range b.Schema.cols {
		d := &b.Cols[i]
		var n int
		switch c.Kind {
		case Float32:
			n = len(d.F32)
		case Float64:
			n = len(d.F64)
		case Int64:
			n = len(d.I64)
		case Category:
			n = len(d.Cat)
		}
		if n != b.Len {
			return fmt.Errorf("catalog: column %q (%s) has %d values, batch Len is %d", c.Name, c.Kind, n, b.Len)
		}
		if d.Valid != nil {
			if !c.Nullable {
				return fmt.Errorf("catalog: column %q is not nullable but its Valid slice is set; leave Valid nil", c.Name)
			}
			if len(d.Valid) != b.Len {
				return fmt.Errorf("catalog: column %q has %d Valid flags, batch Len is %d", c.Name, len(d.Valid), b.Len)
			}
		}
		if c.Kind == Category {
			words := uint8(len(c.Categories))
			for r, v := range d.Cat {
				if v >= words {
					return fmt.Errorf("catalog: column %q row %d: category index %d out of range; allowed 0 to %d (%v)", c.Name, r, v, words-1, c.Categories)
				}
			}
		}
	}
	return nil
}
