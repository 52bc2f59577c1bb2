package figures

import (
	"bytes"
	"encoding/json"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/corefall/corefall/popsynth"
	"github.com/corefall/corefall/popsynth/rates"
)

// rateJSON writes a rate table as `corefall rates --json` does, by encoding the rates package's
// own Result type, so that a change of its keys breaks this test.
func rateJSON(t testing.TB, path string) {
	t.Helper()
	z := []float64{0, 0.5, 1, 2, 3, 4, 6}
	res := rates.Result{
		Z:     z,
		Units: rates.Units,
		SFR:   "test-sfr",
		Rates: rates.KindSeries{
			NSFormation: []float64{1e5, 2e5, 4e5, 8e5, 6e5, 4e5, 1e5},
			BHFormation: []float64{3e4, 6e4, 1e5, 2e5, 1.5e5, 1e5, 3e4},
			BBHMerger:   []float64{20, 40, 80, 90, 0, 50, 10},
			BHNSMerger:  make([]float64, len(z)),
			NSNSMerger:  make([]float64, len(z)),
		},
		Uncertainty: rates.KindSeries{
			NSFormation: []float64{1e3, 2e3, 4e3, 8e3, 6e3, 4e3, 1e3},
			BHFormation: []float64{3e2, 6e2, 1e3, 2e3, 1.5e3, 1e3, 3e2},
			BBHMerger:   []float64{5, 8, 10, 12, 0, 9, 8},
			BHNSMerger:  make([]float64, len(z)),
			NSNSMerger:  make([]float64, len(z)),
		},
	}
	res.Cosmology.H0, res.Cosmology.OmegaM = 67.66, 0.30966
	data, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// allFigures builds one figure of every kind from a small engine run.
func allFigures(t *testing.T) map[string]Figure {
	t.Helper()
	dir := t.TempDir()
	cats := readCats(t, makeCatalogue(t, dir, "c.parquet"))
	cfg := popsynth.Default()
	figs := map[string]Figure{}
	add := func(name string, f Figure, err error) {
		t.Helper()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		figs[name] = f
	}
	f1, err := NewMassSpectrum(cats, false, 0)
	add("mass-spectrum", f1, err)
	f2, err := NewMassSpectrum(cats, true, 0)
	add("mass-spectrum-log", f2, err)
	f3, err := NewKicks(cats, 0)
	add("kicks", f3, err)
	f4, err := NewPeriodEccentricity(cats)
	add("period-eccentricity", f4, err)
	f5, err := NewDelayTimes(cats, 0)
	add("delay-times", f5, err)
	f6, err := NewInitialFinal(cfg, []float64{0.0002, 0.0142}, false)
	add("initial-final", f6, err)
	f7, err := NewInitialFinal(cfg, []float64{0.0002}, true)
	add("initial-final-log", f7, err)
	f8, err := NewCores(cfg, 0.0002, false)
	add("cores", f8, err)
	rj := filepath.Join(dir, "rates.json")
	rateJSON(t, rj)
	table, err := ReadRateTable(rj)
	if err != nil {
		t.Fatal(err)
	}
	f9, err := NewRates([]RateTable{table}, []string{"rates"})
	add("rates", f9, err)
	return figs
}

// TestRenderEveryKind: every kind draws a PNG (PNG signature, ISO/IEC 15948 section 5.2; decodes
// to 6 x 4 inches at 200 dpi) and an SVG (XML declaration or <svg> first), and its data area
// keeps most of the figure (labels, title and legend do not squeeze it).
func TestRenderEveryKind(t *testing.T) {
	out := os.Getenv("COREFALL_FIGURES_DIR") // set to keep the images for a look
	for name, f := range allFigures(t) {
		p, err := f.Plot()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		var pngBuf, svgBuf bytes.Buffer
		if err := Encode(&pngBuf, p, PNG, DefaultSize()); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !bytes.HasPrefix(pngBuf.Bytes(), []byte("\x89PNG\r\n\x1a\n")) {
			t.Errorf("%s: PNG output lacks the PNG signature", name)
		}
		img, err := png.Decode(bytes.NewReader(pngBuf.Bytes()))
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if b := img.Bounds(); b.Dx() != 1200 || b.Dy() != 800 {
			t.Errorf("%s: image %dx%d pixels, want 1200x800 (6 x 4 in at 200 dpi)", name, b.Dx(), b.Dy())
		}
		if err := Encode(&svgBuf, p, SVG, DefaultSize()); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		svg := svgBuf.String()
		if !(strings.HasPrefix(svg, "<?xml") || strings.HasPrefix(svg, "<svg")) || !strings.Contains(svg, "</svg>") {
			t.Errorf("%s: SVG output starts %q", name, svg[:min(40, len(svg))])
		}
		checkLayout(t, name, p)
		if out != "" {
			if err := Save(filepath.Join(out, name+".png"), p, DefaultSize()); err != nil {
				t.Error(err)
			}
		}
	}
}

// checkLayout: the data area of a 6 x 4 in figure is at least 70% of its width and 55% of its
// height.
func checkLayout(t *testing.T, name string, p *plot.Plot) {
	t.Helper()
	c := draw.New(vgimg.New(6*vg.Inch, 4*vg.Inch))
	d := p.DataCanvas(c)
	w, h := d.Max.X-d.Min.X, d.Max.Y-d.Min.Y
	if w < 0.7*6*vg.Inch || h < 0.55*4*vg.Inch {
		t.Errorf("%s: data area %.0f x %.0f pt of 432 x 288: labels or title squeeze it", name, w, h)
	}
}

// TestRatesFromJSON: the rate figure carries the table's non-zero kinds with their errors and
// breaks the line where a rate is zero.
func TestRatesFromJSON(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.json")
	rateJSON(t, path)
	table, err := ReadRateTable(path)
	if err != nil {
		t.Fatal(err)
	}
	f, err := NewRates([]RateTable{table}, []string{"r"})
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Series) != 3 || f.Series[2].Label != "BBH mergers" || f.Units != "Gpc^-3 yr^-1" {
		t.Fatalf("series %+v units %q", f.Series, f.Units)
	}
	if f.Series[2].Err[3] != 12 || f.Series[0].Rate[2] != 4e5 {
		t.Errorf("values not carried over: %+v", f.Series)
	}
	if runs := positiveRuns(f.Series[2].Rate); len(runs) != 2 {
		t.Errorf("BBH rate with a zero at z=3 draws as %d runs, want 2", len(runs))
	}
	bad := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(bad, []byte(`{"z":[0,1],"rates":{"bbh_merger":[1]}}`), 0o644)
	if _, err := ReadRateTable(bad); err == nil || !strings.Contains(err.Error(), "rates.bbh_merger") {
		t.Errorf("short series: error %v, want one naming rates.bbh_merger", err)
	}
}

func TestFormatOf(t *testing.T) {
	for _, c := range []struct {
		path string
		want Format
		ok   bool
	}{
		{"a.png", PNG, true}, {"b/c.SVG", SVG, true}, {"x.pdf", 0, false}, {"noext", 0, false},
	} {
		f, err := FormatOf(c.path)
		if (err == nil) != c.ok || (c.ok && f != c.want) {
			t.Errorf("FormatOf(%q) = %v, %v", c.path, f, err)
		}
		if !c.ok && (err == nil || !strings.Contains(err.Error(), ".png, .svg")) {
			t.Errorf("FormatOf(%q): error %v does not list the allowed extensions", c.path, err)
		}
	}
	if err := (Size{Width: vg.Inch / 2, Height: 4 * vg.Inch, DPI: 100}).Validate(); err == nil {
		t.Error("half-inch figure: want an error")
	}
}

// TestSaveAtomic: Save writes the file under its name and leaves no temporary file behind.
func TestSaveAtomic(t *testing.T) {
	dir := t.TempDir()
	f, err := NewCores(popsynth.Default(), 0.0142, false)
	if err != nil {
		t.Fatal(err)
	}
	p, err := f.Plot()
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "c.svg")
	if err := Save(path, p, DefaultSize()); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 || entries[0].Name() != "c.svg" {
		t.Errorf("directory holds %v, want only c.svg", entries)
	}
	if err := Save(filepath.Join(dir, "c.pdf"), p, DefaultSize()); err == nil {
		t.Error("Save to .pdf: want an error")
	}
}

var sinkHist Hist

func BenchmarkNewHist(b *testing.B) {
	xs := make([]float64, 100000)
	for i := range xs {
		xs[i] = float64(i%5000) / 100
	}
	edges := NiceLinearEdges(0, 50, 80)
	b.ReportAllocs()
	for b.Loop() {
		sinkHist, _ = NewHist(xs, edges)
	}
}

var sinkBytes int

func BenchmarkMassSpectrumPNG(b *testing.B) {
	path := makeCatalogue(b, b.TempDir(), "b.parquet")
	c, err := ReadCatalogue(path)
	if err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	b.ReportAllocs()
	for b.Loop() {
		f, err := NewMassSpectrum([]*Catalogue{c}, true, 0)
		if err != nil {
			b.Fatal(err)
		}
		p, err := f.Plot()
		if err != nil {
			b.Fatal(err)
		}
		buf.Reset()
		if err := Encode(&buf, p, PNG, DefaultSize()); err != nil {
			b.Fatal(err)
		}
		sinkBytes = buf.Len()
	}
}
