package popsynth

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"flag"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/corefall/corefall/popsynth/catalog"
)

var updateRegression = flag.Bool("update-regression", false, "rewrite testdata/regression.sha256 from the current physics")

const regressionFile = "../testdata/regression.sha256"

// contentHash hashes a catalogue's rows (every column's values and validity, in order), not its
// bytes, so the hash does not depend on the Go version recorded in the metadata or on encodings.
func contentHash(t *testing.T, path string) string {
	t.Helper()
	r, err := catalog.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	h := sha256.New()
	var buf [8]byte
	put := func(x uint64) {
		binary.LittleEndian.PutUint64(buf[:], x)
		h.Write(buf[:])
	}
	for _, c := range r.Schema().Columns() {
		io.WriteString(h, c.Name+"|"+strings.Join(c.Categories, ",")+";")
	}
	for {
		b, err := r.Next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		for _, cd := range b.Cols {
			for i := range b.Len {
				if cd.Valid != nil && !cd.Valid[i] {
					put(math.MaxUint64)
					continue
				}
				switch {
				case cd.F32 != nil:
					put(uint64(math.Float32bits(cd.F32[i])))
				case cd.F64 != nil:
					put(math.Float64bits(cd.F64[i]))
				case cd.I64 != nil:
					put(uint64(cd.I64[i]))
				case cd.Cat != nil:
					put(uint64(cd.Cat[i]))
				}
			}
		}
	}
	return hex.EncodeToString(h.Sum(nil))
}

// TestRegressionHash is a regression guard, not a proof of correctness (the physics is checked
// against its sources in the physics packages): it pins the content of a small catalogue with
// binaries and a spread of metallicities, so that an unintended change in the physics or in the
// order of random draws shows up. Regenerate on purpose with
// go test ./popsynth -run TestRegressionHash -update-regression
func TestRegressionHash(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.parquet")
	runTo(t, load(t, "systems=4000", "seed=11", "binary_fraction=0.6", "metallicity.sampling=log-uniform",
		"imf.sample_min=5", "explosion.engine=delayed"), path)
	got := contentHash(t, path)
	if *updateRegression {
		if err := os.WriteFile(regressionFile, []byte(got+"\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		t.Logf("wrote %s", regressionFile)
		return
	}
	want, err := os.ReadFile(regressionFile)
	if err != nil {
		t.Fatalf("%v: create it with -update-regression", err)
	}
	if got != strings.TrimSpace(string(want)) {
		t.Errorf("catalogue content hash %s differs from the pinned %s: the physics or the draw order changed. "+
			"If on purpose, regenerate with -update-regression and say why in the commit", got, strings.TrimSpace(string(want)))
	}
}
