package catalog

import (
	"errors"
	"io"
	"path/filepath"
	"strings"
	"testing"
)

// TestOpenColumns: a reader opened for some columns returns exactly those columns, in file order,
// with the same values as a full read, for every format; an unknown name is an error naming it.
func TestOpenColumns(t *testing.T) {
	for _, format := range []string{"parquet", "arrow", "csv"} {
		path := filepath.Join("testdata", "fuzz-seeds", "small."+format)
		want := []string{ColRemnantMass, ColSystemID, CompanionPrefix + ColRemnantType, ColDelayTime}
		r, err := OpenColumns(path, want...)
		if err != nil {
			t.Fatalf("%s: %v", format, err)
		}
		full, err := Open(path)
		if err != nil {
			t.Fatal(err)
		}
		s := r.Schema()
		if s.NumColumns() != 4 || s.Column(0).Name != ColSystemID || s.Column(1).Name != ColRemnantMass {
			t.Fatalf("%s: projected schema %v", format, s.Columns())
		}
		for {
			b, err := r.Next()
			fb, ferr := full.Next()
			if errors.Is(err, io.EOF) || errors.Is(ferr, io.EOF) {
				if !errors.Is(err, io.EOF) || !errors.Is(ferr, io.EOF) {
					t.Fatalf("%s: projected and full readers end at different batches", format)
				}
				break
			}
			if err != nil || ferr != nil {
				t.Fatal(err, ferr)
			}
			if err := b.Validate(); err != nil {
				t.Fatalf("%s: %v", format, err)
			}
			for k, c := range s.Columns() {
				j := fb.Schema.Index(c.Name)
				for i := range b.Len {
					p, q := b.Cols[k], fb.Cols[j]
					same := (p.F32 == nil || p.F32[i] == q.F32[i]) && (p.I64 == nil || p.I64[i] == q.I64[i]) &&
						(p.Cat == nil || p.Cat[i] == q.Cat[i]) && (p.Valid == nil || p.Valid[i] == q.Valid[i])
					if !same {
						t.Fatalf("%s: column %s row %d differs from a full read", format, c.Name, i)
					}
				}
			}
		}
		r.Close()
		full.Close()
		if _, err := OpenColumns(path, "no_such_column"); err == nil || !strings.Contains(err.Error(), "no_such_column") {
			t.Errorf("%s: unknown column: %v", format, err)
		}
	}
}
