package catalog

import (
	"errors"
	"io"
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
	f.Add([]byte("PAR1"))
	f.Add([]byte("ARROW1\x00\x00"))
	f.Add([]byte("# corefall.schema_version=\"1\"\nsystem_id\n0\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(t.TempDir(), "c")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		r, err := Open(path)
		if err != nil {
			return
		}
		defer r.Close()
		for range 1 << 12 {
			b, err := r.Next()
			if errors.Is(err, io.EOF) || err != nil {
				return
			}
			if err := b.Validate(); err != nil {
				t.Fatalf("reader returned an inconsistent batch: %v", err)
			}
		}
	})
}
