package figures

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Format is an image file format.
type Format uint8

// Image formats.
const (
	PNG Format = iota // raster, at Size.DPI
	SVG               // vector
)

// String returns "png" or "svg".
func (f Format) String() string {
	if f == SVG {
		return "svg"
	}
	return "png"
}

// FormatOf returns the image format named by the extension of path: .png or .svg (any case).
func FormatOf(path string) (Format, error) {
	switch ext := strings.ToLower(filepath.Ext(path)); ext {
	case ".png":
		return PNG, nil
	case ".svg":
		return SVG, nil
	case "":
		return 0, fmt.Errorf("%q has no extension; allowed: .png, .svg", path)
	default:
		return 0, fmt.Errorf("%q: unknown figure format %q; allowed extensions: .png, .svg", path, ext)
	}
}

// Size is the size of a figure: Width and Height, and DPI, the resolution of PNG images
// (dots per inch).
type Size struct {
	Width, Height vg.Length
	DPI           int
}

// DefaultSize returns the size figures are designed for: 6 x 4 inches, at 200 dots per inch.
func DefaultSize() Size { return Size{Width: 6 * vg.Inch, Height: 4 * vg.Inch, DPI: 200} }

// Validate checks that the size is drawable: width and height between 1 and 40 inches, DPI
// between 50 and 1200.
func (s Size) Validate() error {
	for _, d := range []struct {
		name string
		v    vg.Length
	}{{"width", s.Width}, {"height", s.Height}} {
		if !(d.v >= vg.Inch && d.v <= 40*vg.Inch) {
			return fmt.Errorf("figure %s %.3g in: must lie in [1, 40] inches", d.name, float64(d.v/vg.Inch))
		}
	}
	if s.DPI < 50 || s.DPI > 1200 {
		return fmt.Errorf("figure resolution %d dpi: must lie in [50, 1200]", s.DPI)
	}
	return nil
}

// Encode draws p in format f at size s and writes the image to w.
func Encode(w io.Writer, p *plot.Plot, f Format, s Size) error {
	if err := s.Validate(); err != nil {
		return err
	}
	var c vg.CanvasWriterTo
	switch f {
	case PNG:
		c = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(s.Width, s.Height), vgimg.UseDPI(s.DPI))}
	case SVG:
		c = vgsvg.New(s.Width, s.Height)
	default:
		return fmt.Errorf("figures: unknown format %d", f)
	}
	p.Draw(draw.New(c))
	if f == PNG {
		_, err := c.WriteTo(w)
		return err
	}
	// Name fallbacks after Liberation Sans, which is metric-compatible with Arial and Helvetica,
	// for viewers that lack it.
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		return err
	}
	_, err := w.Write(bytes.ReplaceAll(buf.Bytes(), []byte("font-family:Liberation Sans;"),
		[]byte("font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")))
	return err
}

// Save draws p at size s and writes it to path, as PNG or SVG by the extension of path. The file
// appears under its name only when complete.
func Save(path string, p *plot.Plot, s Size) error {
	f, err := FormatOf(path)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := Encode(&buf, p, f, s); err != nil {
		return err
	}
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.tmp")
	if err != nil {
		return err
	}
	_, err = tmp.Write(buf.Bytes())
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp.Name(), 0o644)
	}
	if err == nil {
		err = os.Rename(tmp.Name(), path)
	}
	if err != nil {
		os.Remove(tmp.Name())
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}
