package catalog

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/apache/arrow-go/v18/arrow"
	"github.com/apache/arrow-go/v18/arrow/ipc"
	"github.com/apache/arrow-go/v18/arrow/memory"
	"github.com/apache/arrow-go/v18/parquet"
	"github.com/apache/arrow-go/v18/parquet/compress"
	"github.com/apache/arrow-go/v18/parquet/file"
	"github.com/apache/arrow-go/v18/parquet/pqarrow"
)

// written is what a test wrote: every row, kept for comparison.
type written struct {
	s    *Schema
	rows []*Batch // copies
}

// copyBatch returns a deep copy of b.
func copyBatch(b *Batch) *Batch {
	c := NewBatch(b.Schema, b.Len)
	c.Reset(b.Len)
	for i := range b.Cols {
		copy(c.Cols[i].F32, b.Cols[i].F32)
		copy(c.Cols[i].F64, b.Cols[i].F64)
		copy(c.Cols[i].I64, b.Cols[i].I64)
		copy(c.Cols[i].Cat, b.Cols[i].Cat)
		if b.Cols[i].Valid == nil {
			if c.Cols[i].Valid != nil {
				for k := range c.Cols[i].Valid {
					c.Cols[i].Valid[k] = true
				}
			}
		} else {
			copy(c.Cols[i].Valid, b.Cols[i].Valid)
		}
	}
	return c
}

// writeCatalog writes batches of the given sizes with random contents and
// returns the path and the rows written. The batch is reused between
// writes, as the engine does.
func writeCatalog(t *testing.T, path string, s *Schema, opt Options, sizes []int, seed uint64, late map[string]string) written {
	t.Helper()
	w, err := Create(path, s, opt)
	if err != nil {
		t.Fatal(err)
	}
	src := rand.New(rand.NewPCG(seed, 7))
	b := NewBatch(s, 16)
	out := written{s: s}
	var first int64
	for _, n := range sizes {
		fillBatch(b, first, n, src)
		first += int64(n)
		out.rows = append(out.rows, copyBatch(b))
		if err := w.Write(b); err != nil {
			t.Fatal(err)
		}
	}
	for k, v := range late {
		if err := w.SetMetadata(k, v); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return out
}

// flatten concatenates batches into one.
func flatten(s *Schema, bs []*Batch) *Batch {
	n := 0
	for _, b := range bs {
		n += b.Len
	}
	out := NewBatch(s, n)
	out.Reset(0)
	for _, b := range bs {
		for i := range b.Cols {
			d, o := &b.Cols[i], &out.Cols[i]
			o.F32 = append(o.F32, d.F32...)
			o.F64 = append(o.F64, d.F64...)
			o.I64 = append(o.I64, d.I64...)
			o.Cat = append(o.Cat, d.Cat...)
			if o.Valid != nil {
				o.Valid = append(o.Valid, d.Valid...)
			}
		}
		out.Len += b.Len
	}
	return out
}

func readAll(t *testing.T, path string) (*Reader, *Batch) {
	t.Helper()
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	var got []*Batch
	for {
		b, err := r.Next()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, copyBatch(b))
	}
	if err := r.Close(); err != nil {
		t.Fatal(err)
	}
	return r, flatten(r.Schema(), got)
}

// compareBatches compares floats bit for bit (float32 is stored exactly in
// every format: CSV uses the shortest decimal that reads back to the same
// float32), and presence, integers and categories exactly.
func compareBatches(t *testing.T, want, got *Batch) {
	t.Helper()
	if want.Len != got.Len {
		t.Fatalf("rows: got %d, want %d", got.Len, want.Len)
	}
	for i, c := range want.Schema.cols {
		wd, gd := &want.Cols[i], &got.Cols[i]
		bad := 0
		for r := 0; r < want.Len && bad < 3; r++ {
			present := wd.Valid == nil || wd.Valid[r]
			if c.Nullable && gd.Valid[r] != present {
				t.Errorf("column %s row %d: present=%v, want %v", c.Name, r, gd.Valid[r], present)
				bad++
				continue
			}
			if !present {
				continue
			}
			var ok bool
			var w, g any
			switch c.Kind {
			case Float32:
				w, g = wd.F32[r], gd.F32[r]
				ok = math.Float32bits(wd.F32[r]) == math.Float32bits(gd.F32[r])
			case Float64:
				w, g = wd.F64[r], gd.F64[r]
				ok = math.Float64bits(wd.F64[r]) == math.Float64bits(gd.F64[r])
			case Int64:
				w, g = wd.I64[r], gd.I64[r]
				ok = wd.I64[r] == gd.I64[r]
			case Category:
				w, g = c.Categories[wd.Cat[r]], c.Categories[gd.Cat[r]]
				ok = wd.Cat[r] == gd.Cat[r]
			}
			if !ok {
				t.Errorf("column %s row %d: got %v, want %v", c.Name, r, g, w)
				bad++
			}
		}
	}
}

// extraColumns exercises the kinds the standard columns do not use.
func extraColumns() []Column {
	return []Column{
		{Name: "id", Unit: "1", Kind: Int64, Doc: "row"},
		{Name: "x64", Unit: "Msun", Kind: Float64, Doc: "a float64"},
		{Name: "x64n", Unit: "km/s", Kind: Float64, Nullable: true},
		{Name: "flag", Unit: "1", Kind: Category, Categories: []string{"a", "b"}, Nullable: true},
	}
}

func TestRoundTrip(t *testing.T) {
	schemas := map[string][]Column{
		"single":   Columns(false),
		"binaries": Columns(true),
		"extra":    extraColumns(),
	}
	late := map[string]string{MetaSystems: "2345", MetaMassRepresented: "1.5e6"}
	meta := map[string]string{
		MetaSeed:   "42",
		MetaConfig: "run:\n  systems: 2345\n  note: \"quotes\", commas, = signs, <tags> & unicode Z☉\n",
	}
	for _, format := range []Format{Parquet, Arrow, CSV} {
		for name, cols := range schemas {
			t.Run(format.String()+"/"+name, func(t *testing.T) {
				s := mustSchema(t, cols)
				path := filepath.Join(t.TempDir(), "cat")
				// Row-group size 1000 splits batches across row groups.
				opt := Options{Format: format, RowGroupRows: 1000, Metadata: meta, Compress: true}
				wrote := writeCatalog(t, path, s, opt, []int{700, 0, 1, 1500, 144}, 3, late)
				r, got := readAll(t, path)
				if r.Format() != format {
					t.Errorf("detected format %v, want %v", r.Format(), format)
				}
				if !r.Schema().Equal(s) {
					t.Errorf("schema read back differs:\n got %+v\nwant %+v", r.Schema().Columns(), s.Columns())
				}
				compareBatches(t, flatten(s, wrote.rows), got)
				md := r.Metadata()
				want := map[string]string{MetaSchemaVersion: SchemaVersion}
				for k, v := range meta {
					want[k] = v
				}
				for k, v := range late {
					want[k] = v
				}
				if len(md) != len(want) {
					t.Errorf("metadata has %d keys, want %d: %q", len(md), len(want), md)
				}
				for k, v := range want {
					if md[k] != v {
						t.Errorf("metadata %s = %q, want %q", k, md[k], v)
					}
				}
				if format == Parquet && r.NumRows() != 2345 {
					t.Errorf("NumRows = %d, want 2345", r.NumRows())
				}
			})
		}
	}
}

// TestUnitsForOtherReaders reads the Arrow schema the way an external Arrow
// reader would (pqarrow / ipc directly, not through Reader) and checks that
// every field carries its unit and that categories are dictionary-typed.
func TestUnitsForOtherReaders(t *testing.T) {
	s := mustSchema(t, Columns(true))
	for _, format := range []Format{Parquet, Arrow} {
		t.Run(format.String(), func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "cat")
			writeCatalog(t, path, s, Options{Format: format}, []int{10}, 1, nil)
			f, err := os.Open(path)
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			var fields []arrow.Field
			switch format {
			case Parquet:
				pr, err := file.NewParquetReader(f)
				if err != nil {
					t.Fatal(err)
				}
				fr, err := pqarrow.NewFileReader(pr, pqarrow.ArrowReadProperties{}, memory.DefaultAllocator)
				if err != nil {
					t.Fatal(err)
				}
				as, err := fr.Schema()
				if err != nil {
					t.Fatal(err)
				}
				fields = as.Fields()
				tbl, err := fr.ReadTable(context.Background())
				if err != nil {
					t.Fatal(err)
				}
				defer tbl.Release()
				if got := tbl.Schema().Field(s.Index(ColRemnantType)).Type.String(); got != categoryDictType.String() {
					t.Errorf("remnant_type read as %s, want %s", got, categoryDictType)
				}
			case Arrow:
				fr, err := ipc.NewFileReader(f)
				if err != nil {
					t.Fatal(err)
				}
				defer fr.Close()
				fields = fr.Schema().Fields()
			}
			for i, c := range s.Columns() {
				f := fields[i]
				if f.Name != c.Name {
					t.Fatalf("field %d is %q, want %q", i, f.Name, c.Name)
				}
				if u, ok := f.Metadata.GetValue(FieldUnit); !ok || u != c.Unit {
					t.Errorf("field %s unit = %q (present %v), want %q", c.Name, u, ok, c.Unit)
				}
				if c.Kind == Category && f.Type.String() != categoryDictType.String() {
					t.Errorf("field %s type %s, want %s", c.Name, f.Type, categoryDictType)
				}
			}
		})
	}
}

// TestParquetLayout checks the encodings chosen for speed and for readers:
// zstd pages, dictionary pages only for categories, DELTA_BINARY_PACKED
// system ids, and row groups bounded by RowGroupRows.
func TestParquetLayout(t *testing.T) {
	s := mustSchema(t, Columns(false))
	path := filepath.Join(t.TempDir(), "cat.parquet")
	writeCatalog(t, path, s, Options{RowGroupRows: 1000}, []int{999, 1200, 301}, 5, nil)
	pr, err := file.OpenParquetFile(path, false)
	if err != nil {
		t.Fatal(err)
	}
	defer pr.Close()
	md := pr.MetaData()
	if got, want := md.NumRowGroups(), 3; got != want {
		t.Fatalf("row groups = %d, want %d (2500 rows, 1000 per group)", got, want)
	}
	for g, want := range []int64{1000, 1000, 500} {
		if got := md.RowGroup(g).NumRows(); got != want {
			t.Errorf("row group %d has %d rows, want %d", g, got, want)
		}
	}
	rg := md.RowGroup(0)
	for i, c := range s.Columns() {
		cc, err := rg.ColumnChunk(i)
		if err != nil {
			t.Fatal(err)
		}
		if cc.Compression() != compress.Codecs.Zstd {
			t.Errorf("column %s compression %v, want zstd", c.Name, cc.Compression())
		}
		dict := cc.HasDictionaryPage()
		if want := c.Kind == Category; dict != want {
			t.Errorf("column %s dictionary page = %v, want %v", c.Name, dict, want)
		}
		encs := fmt.Sprint(cc.Encodings())
		if c.Kind == Int64 && !strings.Contains(encs, parquet.Encodings.DeltaBinaryPacked.String()) {
			t.Errorf("column %s encodings %s, want DELTA_BINARY_PACKED", c.Name, encs)
		}
	}
}

func TestByteIdentical(t *testing.T) {
	s := mustSchema(t, Columns(true))
	dir := t.TempDir()
	for _, format := range []Format{Parquet, Arrow, CSV} {
		t.Run(format.String(), func(t *testing.T) {
			var files [][]byte
			for k, workers := range []int{1, 1, 2} {
				if format != Parquet && workers > 1 {
					continue
				}
				path := filepath.Join(dir, fmt.Sprintf("%s-%d", format, k))
				opt := Options{Format: format, RowGroupRows: 3000, Workers: workers, Metadata: map[string]string{MetaSeed: "9", MetaVersion: "test"}}
				writeCatalog(t, path, s, opt, []int{2048, 2048, 2048, 100}, 11, map[string]string{MetaSystems: "6244"})
				b, err := os.ReadFile(path)
				if err != nil {
					t.Fatal(err)
				}
				files = append(files, b)
			}
			for k := 1; k < len(files); k++ {
				if !bytes.Equal(files[0], files[k]) {
					t.Errorf("file %d differs from file 0 (%d vs %d bytes)", k, len(files[k]), len(files[0]))
				}
			}
		})
	}
}

// TestEmptyCatalogue: a run with no systems still gives a readable file
// with its schema and metadata.
func TestEmptyCatalogue(t *testing.T) {
	s := mustSchema(t, Columns(true))
	for _, format := range []Format{Parquet, Arrow, CSV} {
		t.Run(format.String(), func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "empty")
			writeCatalog(t, path, s, Options{Format: format, Metadata: map[string]string{MetaSystems: "0"}}, []int{0}, 1, nil)
			r, got := readAll(t, path)
			if got.Len != 0 {
				t.Errorf("%d rows, want 0", got.Len)
			}
			if !r.Schema().Equal(s) {
				t.Error("schema differs")
			}
			if r.Metadata()[MetaSystems] != "0" {
				t.Errorf("metadata %v", r.Metadata())
			}
		})
	}
}
