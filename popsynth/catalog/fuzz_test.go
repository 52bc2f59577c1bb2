package catalog

import (
	"errors"
	"fmt"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// FuzzOpen feeds arbitrary bytes to the catalogue reader as a file: it must return an error or
// rows, never panic or loop, and batches it returns must be internally consistent.
func FuzzOpen(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("testdata", "fuzz-seeds", "*"))
	for _, s := range seeds {
		b, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	// Tiny catalogues, mostly structure: the fuzzer mutates and minimizes
	// them far faster than the 20-30 KB seeds.
	tiny := mustSchema(f, []Column{
		{Name: ColSystemID, Unit: "1", Kind: Int64},
		{Name: ColInitialMass, Unit: "Msun", Kind: Float32},
		{Name: ColRemnantType, Unit: "1", Kind: Category, Categories: RemnantWords()},
		{Name: ColKickSpeed, Unit: "km/s", Kind: Float32, Nullable: true},
	})
	dir := f.TempDir()
	for i, opt := range []Options{{Format: Parquet}, {Format: Arrow}, {Format: Arrow, Compress: true}, {Format: CSV}} {
		path := filepath.Join(dir, fmt.Sprint(i))
		w, err := Create(path, tiny, opt)
		if err != nil {
			f.Fatal(err)
		}
		b := NewBatch(tiny, 5)
		fillBatch(b, 0, 5, rand.New(rand.NewPCG(1, 1)))
		if err := w.Write(b); err != nil {
			f.Fatal(err)
		}
		if err := w.Close(); err != nil {
			f.Fatal(err)
		}
		data, err := os.ReadFile(path)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte("PAR1"))
	f.Add([]byte("ARROW1\x00\x00"))
	f.Add([]byte("# corefall.schema_version=\"1\"\nsystem_id\n0\n"))
	// One file per worker process, rewritten for each input (the inputs
	// of a process run one after the other).
	path := filepath.Join(dir, "c")
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		r, err := Open(path)
		if err != nil {
			return
		}
		defer r.Close()
		// The fuzzing engine fails an input that runs for 10 s, and a
		// damaged file may declare (and, compressed, hold) billions of
		// rows, which read no faster than real ones: stop after 2^20.
		rows := 0
		for range 1 << 12 {
			b, err := r.Next()
			if errors.Is(err, io.EOF) || err != nil {
				return
			}
			if err := b.Validate(); err != nil {
				t.Fatalf("reader returned an inconsistent batch: %v", err)
			}
			if rows += b.Len; rows > 1<<20 {
				return
			}
		}
	})
}
