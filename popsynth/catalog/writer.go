package catalog

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
)

// DefaultRowGroupRows is the Parquet row-group size used when
// Options.RowGroupRows is 0.
const DefaultRowGroupRows = 1 << 20

// Options control how a catalogue is written.
type Options struct {
	// Format is the file format; the zero value is Parquet.
	Format Format
	// RowGroupRows bounds the rows in one Parquet row group (0 means
	// DefaultRowGroupRows). The writer holds one row group of values in
	// memory: RowGroupRows times the row width (46 bytes for the single-star
	// columns, about 146 for the binary ones).
	RowGroupRows int
	// Metadata is file-level key/value metadata known when the file is
	// created. Keys must be non-empty without '=', '#' or line breaks.
	Metadata map[string]string
	// Compress turns on zstd compression of Arrow IPC files (Parquet pages
	// are always zstd-compressed; CSV never is).
	Compress bool
	// Workers is the number of goroutines that encode Parquet column chunks
	// concurrently (0 or 1: the calling goroutine only, which costs the
	// least CPU time). With more, the encoded row group is held in memory
	// too. The bytes written do not depend on Workers.
	Workers int
}

// encoder is a format backend.
type encoder interface {
	// write encodes the batch; b may be reused by the caller after return.
	write(b *Batch) error
	// finish writes everything after the last batch, with the final metadata
	// in key order.
	finish(md []keyValue) error
	// abort releases resources and removes any side files.
	abort()
}

type keyValue struct{ key, value string }

// errWriter forwards writes and remembers the first error.
type errWriter struct {
	w   io.Writer
	err error
}

func (e *errWriter) Write(p []byte) (int, error) {
	if e.err != nil {
		return 0, e.err
	}
	n, err := e.w.Write(p)
	if err == nil && n < len(p) {
		err = io.ErrShortWrite
	}
	if err != nil {
		e.err = err
	}
	return n, err
}

// Writer streams batches into a catalogue file. It writes to a temporary
// file in the target directory (named ".NAME.tmp-RANDOM") and renames it to
// the final path in Close, so the final path holds either nothing, the
// previous complete file, or the new complete file. A Writer is not safe for
// concurrent use.
type Writer struct {
	path, tmp string
	f         *os.File
	sink      errWriter
	bw        *bufio.Writer
	enc       encoder
	schema    *Schema
	meta      map[string]string
	rows      int64
	err       error // first failure; the writer is then dead
	closed    bool
	aborted   bool
}

// Create starts writing a catalogue with schema s to path. Nothing appears
// under path until Close succeeds; call Abort to give up.
func Create(path string, s *Schema, opt Options) (*Writer, error) {
	if s == nil {
		return nil, fmt.Errorf("catalog: Create %s: schema is nil", path)
	}
	if opt.Format > CSV {
		return nil, fmt.Errorf("catalog: Create %s: format %d unknown; allowed: Parquet, Arrow, CSV", path, opt.Format)
	}
	if opt.RowGroupRows < 0 {
		return nil, fmt.Errorf("catalog: Create %s: RowGroupRows is %d; it must be >= 0 (0 means %d)", path, opt.RowGroupRows, DefaultRowGroupRows)
	}
	if opt.RowGroupRows == 0 {
		opt.RowGroupRows = DefaultRowGroupRows
	}
	if opt.Workers < 0 {
		return nil, fmt.Errorf("catalog: Create %s: Workers is %d; it must be >= 0", path, opt.Workers)
	}
	meta := map[string]string{MetaSchemaVersion: SchemaVersion}
	for k, v := range opt.Metadata {
		if err := checkMetaKey(k); err != nil {
			return nil, fmt.Errorf("%w (Create %s)", err, path)
		}
		if k == MetaSchemaVersion && v != SchemaVersion {
			return nil, fmt.Errorf("catalog: Create %s: metadata %s is set by the writer to %q; do not set it to %q", path, k, SchemaVersion, v)
		}
		meta[k] = v
	}
	if path == "" {
		return nil, errors.New("catalog: Create: empty output path; give a file name such as run.parquet")
	}
	dir, base := filepath.Dir(path), filepath.Base(path)
	if strings.HasSuffix(path, string(filepath.Separator)) || base == "." || base == ".." || base == string(filepath.Separator) {
		return nil, fmt.Errorf("catalog: Create %s: the path names a directory; give a file name such as %s", path, filepath.Join(path, "catalog.parquet"))
	}
	if st, err := os.Stat(dir); err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, fmt.Errorf("catalog: cannot create %s: directory %s does not exist; create it first", path, dir)
		}
		return nil, fmt.Errorf("catalog: cannot create %s: %v", path, err)
	} else if !st.IsDir() {
		return nil, fmt.Errorf("catalog: cannot create %s: %s is not a directory", path, dir)
	}
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return nil, fmt.Errorf("catalog: cannot create %s: it is an existing directory; give a file name", path)
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return nil, fmt.Errorf("catalog: cannot create %s: cannot make a temporary file in %s (is the directory writable?): %v", path, dir, err)
	}
	w := &Writer{path: path, tmp: f.Name(), f: f, schema: s, meta: meta}
	w.sink.w = f
	w.bw = bufio.NewWriterSize(&w.sink, 1<<20)
	fail := func(err error) (*Writer, error) {
		w.Abort()
		return nil, w.wrap(err)
	}
	if err := f.Chmod(0o644); err != nil {
		return fail(err)
	}
	switch opt.Format {
	case Parquet:
		w.enc, err = newParquetEncoder(w.bw, s, opt)
	case Arrow:
		w.enc, err = newArrowEncoder(w.bw, s, opt, w.tmp)
	case CSV:
		w.enc, err = newCSVEncoder(w.bw, s, w.sortedMeta())
	}
	if err != nil {
		return fail(err)
	}
	return w, nil
}

// wrap turns a low-level error into one that names the file and says what to do.
func (w *Writer) wrap(err error) error {
	if err == nil {
		return nil
	}
	hint := ""
	switch {
	case errors.Is(err, syscall.ENOSPC), errors.Is(err, syscall.EDQUOT):
		hint = "; the disk is full: free space or choose another directory"
	case errors.Is(err, os.ErrPermission):
		hint = "; check the permissions of the directory"
	}
	return fmt.Errorf("catalog: writing %s (temporary file %s, removed): %w%s", w.path, filepath.Base(w.tmp), err, hint)
}

// Path returns the final path of the catalogue.
func (w *Writer) Path() string { return w.path }

// Rows returns the number of rows written so far.
func (w *Writer) Rows() int64 { return w.rows }

// Schema returns the schema the writer was created with.
func (w *Writer) Schema() *Schema { return w.schema }

// Write appends the rows of b. The batch must have the writer's schema (the
// same *Schema or an equal one) and pass Batch.Validate. The writer does not
// keep b: the caller may reuse it as soon as Write returns. After a failed
// Write the temporary file is removed and the Writer is dead: every later
// call returns the same error.
func (w *Writer) Write(b *Batch) error {
	if err := w.usable(); err != nil {
		return err
	}
	if b == nil {
		return fmt.Errorf("catalog: Write %s: batch is nil", w.path)
	}
	if b.Schema != w.schema && !w.schema.Equal(b.Schema) {
		return fmt.Errorf("catalog: Write %s: batch schema differs from the writer's schema", w.path)
	}
	if err := b.Validate(); err != nil {
		return fmt.Errorf("%w (Write %s)", err, w.path)
	}
	if err := w.enc.write(b); err != nil {
		return w.die(err)
	}
	if w.sink.err != nil {
		return w.die(w.sink.err)
	}
	w.rows += int64(b.Len)
	return nil
}

func (w *Writer) usable() error {
	switch {
	case w.err != nil:
		return w.err
	case w.closed:
		return fmt.Errorf("catalog: %s: writer already closed", w.path)
	case w.aborted:
		return fmt.Errorf("catalog: %s: writer was aborted", w.path)
	}
	return nil
}

// die records the first failure, removes the temporary file and returns the error.
func (w *Writer) die(err error) error {
	if w.sink.err != nil && !errors.Is(err, w.sink.err) {
		err = fmt.Errorf("%w (after %v)", w.sink.err, err)
	}
	w.err = w.wrap(err)
	w.cleanup()
	return w.err
}

// SetMetadata sets a file-level metadata entry, for values known only at
// the end of a run. It may be called any time before Close and replaces an
// earlier value of the same key. Parquet and Arrow files store only the
// final values, in the footer. A CSV file has its metadata in comment lines
// at the top, written with the first rows; an entry set after that is
// written as a comment line after the last row, and a later line for a key
// overrides an earlier one.
func (w *Writer) SetMetadata(key, value string) error {
	if err := w.usable(); err != nil {
		return err
	}
	if err := checkMetaKey(key); err != nil {
		return fmt.Errorf("%w (SetMetadata %s)", err, w.path)
	}
	if key == MetaSchemaVersion && value != SchemaVersion {
		return fmt.Errorf("catalog: SetMetadata %s: %s is set by the writer to %q; do not set it to %q", w.path, key, SchemaVersion, value)
	}
	w.meta[key] = value
	if c, ok := w.enc.(*csvEncoder); ok {
		c.setMeta(key, value)
	}
	return nil
}

func (w *Writer) sortedMeta() []keyValue {
	keys := make([]string, 0, len(w.meta))
	for k := range w.meta {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	md := make([]keyValue, len(keys))
	for i, k := range keys {
		md[i] = keyValue{k, w.meta[k]}
	}
	return md
}

// Close finishes the file, flushes it to stable storage and renames the
// temporary file to the final path, replacing any previous file there. On
// error the temporary file is removed and the final path is untouched.
// Close after a successful Close returns nil.
func (w *Writer) Close() error {
	if w.closed {
		return w.err
	}
	if w.aborted {
		return fmt.Errorf("catalog: Close %s: writer was aborted", w.path)
	}
	if w.err != nil {
		return w.err
	}
	w.closed = true
	if err := w.enc.finish(w.sortedMeta()); err != nil {
		return w.die(err)
	}
	if err := w.bw.Flush(); err != nil {
		return w.die(err)
	}
	if err := w.f.Sync(); err != nil {
		return w.die(err)
	}
	err := w.f.Close()
	w.f = nil
	if err != nil {
		return w.die(err)
	}
	if err := os.Rename(w.tmp, w.path); err != nil {
		return w.die(err)
	}
	// Make the rename durable; some file systems refuse to sync a
	// directory, which does not make the catalogue incomplete.
	if d, err := os.Open(filepath.Dir(w.path)); err == nil {
		_ = d.Sync()
		_ = d.Close()
	}
	return nil
}

// Abort gives up: it removes the temporary file and leaves the final path
// as it was. It is safe after a failed Write or Close and may be called
// more than once; after a successful Close it does nothing.
func (w *Writer) Abort() {
	if w.aborted || (w.closed && w.err == nil) {
		return
	}
	w.aborted = true
	w.cleanup()
}

func (w *Writer) cleanup() {
	if w.enc != nil {
		w.enc.abort()
		w.enc = nopEncoder{}
	}
	if w.f != nil {
		_ = w.f.Close()
		w.f = nil
	}
	if w.tmp != "" {
		_ = os.Remove(w.tmp)
	}
}

type nopEncoder struct{}

func (nopEncoder) write(*Batch) error      { return errors.New("writer is finished") }
func (nopEncoder) finish([]keyValue) error { return errors.New("writer is finished") }
func (nopEncoder) abort()                  {}
