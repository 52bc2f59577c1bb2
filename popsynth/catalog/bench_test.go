package catalog

import (
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"syscall"
	"testing"
	"time"
)

// Benchmarks write batches of benchBatch rows, like the engine's batches.
// A few distinct batches are prepared once and cycled, with fresh system
// ids, so that only writing is timed.
const (
	benchRows  = 1 << 21    // rows per iteration, most benchmarks
	runRows    = 10_000_000 // a whole single-star run
	benchBatch = 1 << 16
)

var sinkInt int64

// cpuTime returns the user plus system CPU time of the process so far, in
// nanoseconds: on a shared machine it measures the work better than wall time.
func cpuTime() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return ru.Utime.Nano() + ru.Stime.Nano()
}

func benchBatches(b *testing.B, s *Schema) []*Batch {
	src := rand.New(rand.NewPCG(1, 2))
	out := make([]*Batch, 16)
	for k := range out {
		out[k] = NewBatch(s, benchBatch)
		fillBatch(out[k], 0, benchBatch, src)
	}
	return out
}

// writeRows writes rows rows to w from the prepared batches.
func writeRows(w *Writer, batches []*Batch, rows int) error {
	for done, k := 0, 0; done < rows; k++ {
		bt := batches[k%len(batches)]
		n := min(benchBatch, rows-done)
		bt.Reset(n)
		for r := range bt.Cols[0].I64 {
			bt.Cols[0].I64[r] = int64(done + r)
		}
		if err := w.Write(bt); err != nil {
			return err
		}
		done += n
	}
	return nil
}

func benchWrite(b *testing.B, opt Options, binaries bool, rows int) {
	s := mustSchema(b, Columns(binaries))
	batches := benchBatches(b, s)
	path := filepath.Join(b.TempDir(), "bench.cat")
	b.ReportAllocs()
	start := time.Now()
	cpu0 := cpuTime()
	n := 0
	for b.Loop() {
		w, err := Create(path, s, opt)
		if err != nil {
			b.Fatal(err)
		}
		if err := writeRows(w, batches, rows); err != nil {
			b.Fatal(err)
		}
		if err := w.Close(); err != nil {
			b.Fatal(err)
		}
		sinkInt += w.Rows()
		n++
	}
	el := time.Since(start).Seconds()
	b.ReportMetric(float64(n*rows)/el, "rows/s")
	b.ReportMetric(float64(cpuTime()-cpu0)/float64(n*rows), "cpu-ns/row")
	if st, err := os.Stat(path); err == nil {
		b.ReportMetric(float64(st.Size())/float64(rows), "B/row")
	}
}

// BenchmarkWriteParquet writes a whole single-star run per iteration: 10^7
// rows of Columns(false) (12 columns) to zstd Parquet, the default output.
// Workers=1 is the cost when the other core is busy computing.
func BenchmarkWriteParquet(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run("workers="+strconv.Itoa(workers), func(b *testing.B) {
			benchWrite(b, Options{Format: Parquet, Workers: workers}, false, runRows)
		})
	}
}

// BenchmarkWriteParquetBinaries writes the 34 binary columns.
func BenchmarkWriteParquetBinaries(b *testing.B) {
	benchWrite(b, Options{Format: Parquet}, true, benchRows)
}

func BenchmarkWriteArrow(b *testing.B) {
	b.Run("plain", func(b *testing.B) { benchWrite(b, Options{Format: Arrow}, false, benchRows) })
	b.Run("zstd", func(b *testing.B) { benchWrite(b, Options{Format: Arrow, Compress: true}, false, benchRows) })
}

func BenchmarkWriteCSV(b *testing.B) {
	benchWrite(b, Options{Format: CSV}, false, benchRows)
}

func benchRead(b *testing.B, format Format) {
	s := mustSchema(b, Columns(false))
	batches := benchBatches(b, s)
	path := filepath.Join(b.TempDir(), "bench.cat")
	w, err := Create(path, s, Options{Format: format})
	if err != nil {
		b.Fatal(err)
	}
	if err := writeRows(w, batches, benchRows); err != nil {
		b.Fatal(err)
	}
	if err := w.Close(); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	start := time.Now()
	n := 0
	for b.Loop() {
		r, err := Open(path)
		if err != nil {
			b.Fatal(err)
		}
		for {
			bt, err := r.Next()
			if err == io.EOF {
				break
			}
			if err != nil {
				b.Fatal(err)
			}
			sinkInt += int64(bt.Len)
		}
		r.Close()
		n++
	}
	b.ReportMetric(float64(n*benchRows)/time.Since(start).Seconds(), "rows/s")
}

func BenchmarkRead(b *testing.B) {
	for _, f := range []Format{Parquet, Arrow, CSV} {
		b.Run(f.String(), func(b *testing.B) { benchRead(b, f) })
	}
}
