package catalog

import (
	"encoding/json"
	"fmt"
	"strconv"
	"strings"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/array"
	"github.com/apache/arrow-go/v18/arrow/memory"
)

// Kind is the storage type of a catalogue column.
type Kind uint8

const (
	// Float32 stores IEEE-754 single precision numbers (about 7 significant digits).
	Float32 Kind = iota + 1
	// Float64 stores IEEE-754 double precision numbers.
	Float64
	// Int64 stores signed 64-bit integers.
	Int64
	// Category stores one word out of a fixed, ordered set (Column.Categories).
	// In memory a value is its index into that set; on disk it is a
	// dictionary-encoded string (Arrow dictionary<int8, utf8>).
	Category
)

// String returns the lower-case name of the kind ("float32", "float64", "int64", "category").
func (k Kind) String() string {
	switch k {
	case Float32:
		return "float32"
	case Float64:
		return "float64"
	case Int64:
		return "int64"
	case Category:
		return "category"
	}
	return "Kind(" + strconv.Itoa(int(k)) + ")"
}

func parseKind(s string) (Kind, error) {
	for _, k := range []Kind{Float32, Float64, Int64, Category} {
		if k.String() == s {
			return k, nil
		}
	}
	return 0, fmt.Errorf("unknown column kind %q (allowed: float32, float64, int64, category)", s)
}

// MaxCategories is the largest number of words a Category column may have:
// the on-disk dictionary index is a signed 8-bit integer.
const MaxCategories = 127

// Field-metadata keys of every Arrow field written by this package.
const (
	FieldUnit       = "unit"       // physical unit, "1" for dimensionless
	FieldDoc        = "doc"        // one-line description
	FieldCategories = "categories" // Category columns: JSON array of the allowed words, in index order
)

// Column describes one column of a catalogue.
type Column struct {
	// Name is the column name: a letter or underscore followed by letters,
	// digits or underscores.
	Name string
	// Unit is the physical unit, for example "Msun", "Myr", "km/s", "AU", "d",
	// or "1" for a dimensionless number. It must not be empty.
	Unit string
	// Doc is a one-line description.
	Doc string
	// Kind is the storage type.
	Kind Kind
	// Categories is, for a Category column, the full fixed set of allowed
	// words (1 to MaxCategories, distinct, no commas, quotes or spaces).
	// A value is an index into this slice.
	Categories []string
	// Nullable allows missing values (Parquet/Arrow null, empty CSV cell) in
	// a Float32, Float64 or Category column; Int64 columns cannot be nullable.
	Nullable bool
}

// Schema is a validated, immutable list of columns. Build it with NewSchema.
type Schema struct {
	cols  []Column
	index map[string]int
	arrow *arrow.Schema
	dicts []arrow.Array // per column: the category dictionary (Category kind only)
}

// NewSchema validates cols and returns a schema holding a copy of them.
func NewSchema(cols []Column) (*Schema, error) {
	if len(cols) == 0 {
		return nil, fmt.Errorf("catalog: schema has no columns; at least one is required")
	}
	s := &Schema{
		cols:  make([]Column, len(cols)),
		index: make(map[string]int, len(cols)),
		dicts: make([]arrow.Array, len(cols)),
	}
	fields := make([]arrow.Field, len(cols))
	for i, c := range cols {
		if err := c.validate(); err != nil {
			return nil, fmt.Errorf("catalog: column %d: %w", i, err)
		}
		if j, dup := s.index[c.Name]; dup {
			return nil, fmt.Errorf("catalog: column %d: name %q already used by column %d; names must be unique", i, c.Name, j)
		}
		c.Categories = append([]string(nil), c.Categories...)
		s.cols[i] = c
		s.index[c.Name] = i
		fields[i] = c.arrowField()
		if c.Kind == Category {
			b := array.NewStringBuilder(memory.DefaultAllocator)
			b.AppendValues(c.Categories, nil)
			s.dicts[i] = b.NewArray()
			b.Release()
		}
	}
	s.arrow = arrow.NewSchema(fields, nil)
	return s, nil
}

func validName(name string) bool {
	if name == "" {
		return false
	}
	for i, r := range name {
		switch {
		case r == '_', r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z':
		case r >= '0' && r <= '9' && i > 0:
		default:
			return false
		}
	}
	return true
}

func (c Column) validate() error {
	if !validName(c.Name) {
		return fmt.Errorf("name %q is not allowed: use a letter or underscore followed by letters, digits or underscores", c.Name)
	}
	if c.Unit == "" || strings.ContainsAny(c.Unit, "\n\r") {
		return fmt.Errorf("column %q: unit %q is not allowed: give a one-line unit such as \"Msun\", or \"1\" for a dimensionless number", c.Name, c.Unit)
	}
	if strings.ContainsAny(c.Doc, "\n\r") {
		return fmt.Errorf("column %q: doc must be a single line", c.Name)
	}
	switch c.Kind {
	case Float32, Float64:
	case Int64:
		if c.Nullable {
			return fmt.Errorf("column %q: Nullable is allowed only for float32, float64 and category columns, not %s", c.Name, c.Kind)
		}
	case Category:
		if n := len(c.Categories); n == 0 || n > MaxCategories {
			return fmt.Errorf("column %q: category column has %d categories; allowed 1 to %d", c.Name, n, MaxCategories)
		}
		seen := make(map[string]bool, len(c.Categories))
		for _, w := range c.Categories {
			if w == "" || strings.ContainsAny(w, ",\"' \t\n\r#") {
				return fmt.Errorf("column %q: category %q is not allowed: words must be non-empty without commas, quotes, spaces or '#'", c.Name, w)
			}
			if seen[w] {
				return fmt.Errorf("column %q: category %q appears twice; categories must be distinct", c.Name, w)
			}
			seen[w] = true
		}
		return nil
	default:
		return fmt.Errorf("column %q: kind %d is not one of Float32, Float64, Int64, Category", c.Name, c.Kind)
	}
	if len(c.Categories) != 0 {
		return fmt.Errorf("column %q: Categories given for a %s column; they are allowed only for Category columns", c.Name, c.Kind)
	}
	return nil
}

// categoryDictType is the Arrow type of every Category column.
var categoryDictType = &arrow.DictionaryType{IndexType: arrow.PrimitiveTypes.Int8, ValueType: arrow.BinaryTypes.String}

func (c Column) arrowType() arrow.DataType {
	switch c.Kind {
	case Float32:
		return arrow.PrimitiveTypes.Float32
	case Float64:
		return arrow.PrimitiveTypes.Float64
	case Int64:
		return arrow.PrimitiveTypes.Int64
	default:
		return categoryDictType
	}
}

func (c Column) arrowField() arrow.Field {
	keys := []string{FieldUnit, FieldDoc}
	vals := []string{c.Unit, c.Doc}
	if c.Kind == Category {
		js, _ := json.Marshal(c.Categories) // []string always marshals
		keys = append(keys, FieldCategories)
		vals = append(vals, string(js))
	}
	return arrow.Field{Name: c.Name, Type: c.arrowType(), Nullable: c.Nullable, Metadata: arrow.NewMetadata(keys, vals)}
}

// columnFromArrow rebuilds a Column from an Arrow field written by this package.
func columnFromArrow(f arrow.Field) (Column, error) {
	c := Column{Name: f.Name, Nullable: f.Nullable}
	if i := f.Metadata.FindKey(FieldUnit); i >= 0 {
		c.Unit = f.Metadata.Values()[i]
	}
	if i := f.Metadata.FindKey(FieldDoc); i >= 0 {
		c.Doc = f.Metadata.Values()[i]
	}
	switch f.Type.ID() {
	case arrow.FLOAT32:
		c.Kind = Float32
	case arrow.FLOAT64:
		c.Kind = Float64
	case arrow.INT64:
		c.Kind = Int64
		c.Nullable = false
	case arrow.DICTIONARY, arrow.STRING:
		c.Kind = Category
		i := f.Metadata.FindKey(FieldCategories)
		if i < 0 {
			return c, fmt.Errorf("column %q: category column has no %q field metadata", f.Name, FieldCategories)
		}
		if err := json.Unmarshal([]byte(f.Metadata.Values()[i]), &c.Categories); err != nil {
			return c, fmt.Errorf("column %q: %q field metadata is not a JSON array of strings: %v", f.Name, FieldCategories, err)
		}
	default:
		return c, fmt.Errorf("column %q has Arrow type %s; a catalogue holds only float32, float64, int64 and dictionary<int8, utf8> columns", f.Name, f.Type)
	}
	return c, nil
}

func schemaFromArrow(as *arrow.Schema) (*Schema, error) {
	cols := make([]Column, as.NumFields())
	for i, f := range as.Fields() {
		c, err := columnFromArrow(f)
		if err != nil {
			return nil, err
		}
		cols[i] = c
	}
	return NewSchema(cols)
}

// Columns returns a copy of the schema's columns.
func (s *Schema) Columns() []Column {
	out := make([]Column, len(s.cols))
	for i, c := range s.cols {
		c.Categories = append([]string(nil), c.Categories...)
		out[i] = c
	}
	return out
}

// NumColumns returns the number of columns.
func (s *Schema) NumColumns() int { return len(s.cols) }

// Column returns column i (0-based). The Categories slice is shared: do not modify it.
func (s *Schema) Column(i int) Column { return s.cols[i] }

// Index returns the position of the named column, or -1 if there is none.
func (s *Schema) Index(name string) int {
	if i, ok := s.index[name]; ok {
		return i
	}
	return -1
}

// Arrow returns the Arrow schema: one field per column, with the unit, doc
// and (for Category columns) the category list in the field metadata under
// the keys FieldUnit, FieldDoc and FieldCategories. Category columns are
// dictionary<int8, utf8>; Nullable float columns are nullable fields.
func (s *Schema) Arrow() *arrow.Schema { return s.arrow }

// Equal reports whether two schemas have identical columns.
func (s *Schema) Equal(o *Schema) bool {
	if s == o {
		return true
	}
	if s == nil || o == nil || len(s.cols) != len(o.cols) {
		return false
	}
	for i, a := range s.cols {
		b := o.cols[i]
		if a.Name != b.Name || a.Unit != b.Unit || a.Doc != b.Doc || a.Kind != b.Kind || a.Nullable != b.Nullable || len(a.Categories) != len(b.Categories) {
			return false
		}
		for j := range a.Categories {
			if a.Categories[j] != b.Categories[j] {
				return false
			}
		}
	}
	return true
}

// columnJSON is the CSV header description of a column.
type columnJSON struct {
	Name       string   `json:"name"`
	Unit       string   `json:"unit"`
	Doc        string   `json:"doc,omitempty"`
	Kind       string   `json:"kind"`
	Categories []string `json:"categories,omitempty"`
	Nullable   bool     `json:"nullable,omitempty"`
}

func (s *Schema) marshalJSON() []byte {
	out := make([]columnJSON, len(s.cols))
	for i, c := range s.cols {
		out[i] = columnJSON{Name: c.Name, Unit: c.Unit, Doc: c.Doc, Kind: c.Kind.String(), Categories: c.Categories, Nullable: c.Nullable}
	}
	js, _ := json.Marshal(out) // plain strings and bools always marshal
	return js
}

func schemaFromJSON(js []byte) (*Schema, error) {
	var in []columnJSON
	if err := json.Unmarshal(js, &in); err != nil {
		return nil, fmt.Errorf("column list is not valid JSON: %v", err)
	}
	cols := make([]Column, len(in))
	for i, c := range in {
		k, err := parseKind(c.Kind)
		if err != nil {
			return nil, fmt.Errorf("column %q: %v", c.Name, err)
		}
		cols[i] = Column{Name: c.Name, Unit: c.Unit, Doc: c.Doc, Kind: k, Categories: c.Categories, Nullable: c.Nullable}
	}
	return NewSchema(cols)
}
