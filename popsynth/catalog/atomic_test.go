package catalog

import (
	"bytes"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"testing"
)

func rngFor(seed uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, 99)) }

// assertNoFiles fails if dir holds anything (a catalogue or a temporary file).
func assertNoFiles(t *testing.T, dir string, except ...string) {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range ents {
		keep := false
		for _, x := range except {
			keep = keep || e.Name() == x
		}
		if !keep {
			t.Errorf("unexpected file left in %s: %s", dir, e.Name())
		}
	}
}

func TestAtomicWrite(t *testing.T) {
	s := mustSchema(t, Columns(false))
	for _, format := range []Format{Parquet, Arrow, CSV} {
		t.Run(format.String(), func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "run.cat")

			// While writing, only a hidden temporary file exists.
			w, err := Create(path, s, Options{Format: format})
			if err != nil {
				t.Fatal(err)
			}
			b := NewBatch(s, 0)
			fillBatch(b, 0, 500, rngFor(1))
			if err := w.Write(b); err != nil {
				t.Fatal(err)
			}
			if _, err := os.Stat(path); !os.IsNotExist(err) {
				t.Errorf("final path exists before Close: %v", err)
			}
			ents, _ := os.ReadDir(dir)
			for _, e := range ents {
				if e.Name()[0] != '.' {
					t.Errorf("visible file %s while writing; temporary files must be hidden", e.Name())
				}
			}
			// Abort removes everything; Abort is idempotent.
			w.Abort()
			w.Abort()
			assertNoFiles(t, dir)
			wantErr(t, w.Close(), "aborted")

			// A complete file, then an aborted overwrite: the old file survives.
			writeCatalog(t, path, s, Options{Format: format}, []int{100}, 1, nil)
			old, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			w, err = Create(path, s, Options{Format: format})
			if err != nil {
				t.Fatal(err)
			}
			fillBatch(b, 0, 300, rngFor(2))
			if err := w.Write(b); err != nil {
				t.Fatal(err)
			}
			w.Abort()
			now, err := os.ReadFile(path)
			if err != nil || !bytes.Equal(old, now) {
				t.Fatalf("previous file changed by an aborted overwrite (err %v)", err)
			}
			assertNoFiles(t, dir, "run.cat")

			// A failed overwrite leaves it too.
			w, err = Create(path, s, Options{Format: format})
			if err != nil {
				t.Fatal(err)
			}
			w.sink.w = &failAfter{w: w.sink.w, err: io.ErrShortWrite}
			if a, ok := w.enc.(*arrowEncoder); ok {
				a.sink.w = &failAfter{w: a.sink.w, err: io.ErrShortWrite}
			}
			_ = w.Write(b)
			if err := w.Close(); err == nil {
				t.Fatal("Close succeeded on a failing disk")
			}
			w.Abort()
			now, _ = os.ReadFile(path)
			if !bytes.Equal(old, now) {
				t.Fatal("previous file changed by a failed overwrite")
			}
			assertNoFiles(t, dir, "run.cat")

			// A successful overwrite replaces it; Abort afterwards is harmless.
			writeCatalog(t, path, s, Options{Format: format}, []int{300}, 2, nil)
			if _, got := readAll(t, path); got.Len != 300 {
				t.Errorf("after overwrite: %d rows, want 300", got.Len)
			}
			assertNoFiles(t, dir, "run.cat")
			st, err := os.Stat(path)
			if err != nil {
				t.Fatal(err)
			}
			if st.Mode().Perm()&0o044 == 0 {
				t.Errorf("catalogue mode %v is not readable by others", st.Mode())
			}
		})
	}
}

// TestCloseThenAbort checks that Close is idempotent and that Abort after a
// successful Close keeps the file.
func TestCloseThenAbort(t *testing.T) {
	s := mustSchema(t, Columns(false))
	dir := t.TempDir()
	path := filepath.Join(dir, "c.parquet")
	w, err := Create(path, s, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	if err := w.Close(); err != nil {
		t.Errorf("second Close: %v", err)
	}
	w.Abort()
	r, got := readAll(t, path)
	if got.Len != 0 || r.NumRows() != 0 {
		t.Errorf("empty catalogue read back %d rows", got.Len)
	}
	wantErr(t, w.Write(NewBatch(s, 0)), "closed")
	wantErr(t, w.SetMetadata("k", "v"), "closed")
}

// TestMemoryBounded writes 2e6 binary-system rows (34 columns, about 146
// bytes per row: ~290 MB of values) and checks that the heap in use, sampled
// after a GC between batches, stays under 100 MB. The writer should hold one
// row group (RowGroupRows=2^18 rows: ~38 MB staged) plus buffers of a few MB,
// so 100 MB is generous yet far below what keeping all rows would need.
func TestMemoryBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("writes 2e6 rows")
	}
	s := mustSchema(t, Columns(true))
	const rows, batch = 2_000_000, 1 << 16
	// A few distinct batches, reused with fresh system ids: filling 2e6
	// random rows would dominate the test's time.
	var bs []*Batch
	for k := range 4 {
		b := NewBatch(s, batch)
		fillBatch(b, 0, batch, rngFor(uint64(k)))
		bs = append(bs, b)
	}
	path := filepath.Join(t.TempDir(), "big.parquet")
	w, err := Create(path, s, Options{RowGroupRows: 1 << 18})
	if err != nil {
		t.Fatal(err)
	}
	defer w.Abort()
	var ms runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&ms)
	base := ms.HeapInuse
	var peak uint64
	for done, k := 0, 0; done < rows; k++ {
		b := bs[k%len(bs)]
		n := min(batch, rows-done)
		b.Reset(n)
		for r := range b.Cols[0].I64 {
			b.Cols[0].I64[r] = int64(done + r)
		}
		if err := w.Write(b); err != nil {
			t.Fatal(err)
		}
		done += n
		if k%4 == 3 {
			runtime.GC()
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapInuse)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	grown := int64(peak) - int64(base)
	t.Logf("heap in use grew by %.1f MB while writing %d rows", float64(grown)/1e6, rows)
	if grown > 100e6 {
		t.Errorf("heap in use grew by %.1f MB; want < 100 MB (memory must not grow with the number of rows)", float64(grown)/1e6)
	}
	r, err := Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if r.NumRows() != rows {
		t.Errorf("NumRows %d, want %d", r.NumRows(), rows)
	}
}
