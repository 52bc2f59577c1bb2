package catalog

import (
	"io"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// fillBatch fills b with n rows of random-looking but plausible values:
// system ids from first, masses drawn from a power law, a few metallicities,
// skewed categories and, in nullable columns, about one missing value in five.
// It does not depend on the schema beyond kinds and names.
func fillBatch(b *Batch, first int64, n int, src *rand.Rand) {
	b.Reset(n)
	for i, c := range b.Schema.cols {
		d := &b.Cols[i]
		switch c.Kind {
		case Int64:
			for r := range d.I64 {
				d.I64[r] = first + int64(r)
			}
		case Float32:
			switch c.Name {
			case ColMetallicity:
				zs := [...]float32{0.0001, 0.001, 0.004, 0.008, 0.014, 0.02}
				for r := range d.F32 {
					d.F32[r] = zs[src.IntN(len(zs))]
				}
			default:
				for r := range d.F32 {
					// Salpeter-like power law between 5 and 150.
					u := src.Float64()
					d.F32[r] = float32(5 * math.Pow(1-u*(1-math.Pow(30, -1.35)), -1/1.35))
				}
			}
		case Float64:
			for r := range d.F64 {
				d.F64[r] = src.NormFloat64()
			}
		case Category:
			k := len(c.Categories)
			for r := range d.Cat {
				// Skewed: low indices are common, like remnant types.
				v := src.IntN(k)
				if src.IntN(2) == 0 {
					v = 0
				}
				d.Cat[r] = uint8(v)
			}
		}
		if c.Nullable {
			for r := range d.Valid {
				d.Valid[r] = src.IntN(5) != 0
			}
		}
	}
}

func mustSchema(t testing.TB, cols []Column) *Schema {
	t.Helper()
	s, err := NewSchema(cols)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// writeWithPqarrow writes rows [0, rows) of b straight through pqarrow, as
// another program would, with the writer properties props, to w (closed if
// it is a Closer). The Arrow schema carries corefall's schema-version key
// so that Open accepts the file.
func writeWithPqarrow(t *testing.T, w io.Writer, s *Schema, b *Batch, rows int, props ...parquet.WriterProperty) {
	t.Helper()
	meta := arrow.NewMetadata([]string{MetaSchemaVersion}, []string{SchemaVersion})
	as := arrow.NewSchema(s.Arrow().Fields(), &meta)
	fw, err := pqarrow.NewFileWriter(as, w, parquet.NewWriterProperties(props...), pqarrow.NewArrowWriterProperties(pqarrow.WithStoreSchema()))
	if err != nil {
		t.Fatal(err)
	}
	rb := newRecordBuilder(s)
	rec := rb.record(b, 0, rows)
	err = fw.Write(array2schema(rec, as))
	rec.Release()
	if err != nil {
		t.Fatal(err)
	}
	if err := fw.Close(); err != nil {
		t.Fatal(err)
	}
}
