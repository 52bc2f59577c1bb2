package figures

import (
	"image/color"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// palette is the colour-blind-safe palette of Okabe & Ito (2008, "Color Universal Design"), in an
// order that alternates dark and light colours so that neighbouring series differ in greyscale
// too: blue, orange, vermillion, bluish green, reddish purple, sky blue, black. (Their yellow is
// left out: it is too pale on white paper.)
var palette = [...]color.RGBA{
	{0x00, 0x72, 0xB2, 0xFF}, // blue
	{0xE6, 0x9F, 0x00, 0xFF}, // orange
	{0xD5, 0x5E, 0x00, 0xFF}, // vermillion
	{0x00, 0x9E, 0x73, 0xFF}, // bluish green
	{0xCC, 0x79, 0xA7, 0xFF}, // reddish purple
	{0x56, 0xB4, 0xE9, 0xFF}, // sky blue
	{0x00, 0x00, 0x00, 0xFF}, // black
}

// dashes are the dash patterns of successive series (points on, off, ...).
var dashes = [...][]vg.Length{
	nil,
	{vg.Points(6), vg.Points(3)},
	{vg.Points(1.5), vg.Points(2)},
	{vg.Points(6), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)},
	{vg.Points(3), vg.Points(2)},
	{vg.Points(6), vg.Points(2), vg.Points(1.5), vg.Points(2), vg.Points(1.5), vg.Points(2)},
	{vg.Points(10), vg.Points(3)},
}

// glyphs are the marker shapes of successive series.
var glyphs = [...]draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.TriangleGlyph{}, draw.SquareGlyph{}, draw.CrossGlyph{},
	draw.RingGlyph{}, draw.PlusGlyph{}, draw.PyramidGlyph{},
}

// Colour returns the colour of series i: the colours of Okabe & Ito (2008) in turn (blue, orange,
// vermillion, bluish green, reddish purple, sky blue, black).
func Colour(i int) color.RGBA { return palette[i%len(palette)] }

// lineStyle returns the line style of series i: its colour and dash pattern.
func lineStyle(i int) draw.LineStyle {
	return draw.LineStyle{Color: Colour(i), Width: vg.Points(1.6), Dashes: dashes[i%len(dashes)]}
}

// glyphStyle returns the marker style of series i: its colour and shape.
func glyphStyle(i int) draw.GlyphStyle {
	return draw.GlyphStyle{Color: Colour(i), Radius: vg.Points(2.2), Shape: glyphs[i%len(glyphs)]}
}

// translucent returns c with opacity a (0-1).
func translucent(c color.RGBA, a float64) color.NRGBA {
	return color.NRGBA{R: c.R, G: c.G, B: c.B, A: uint8(math.Round(255 * a))}
}

// Font sizes, points, for a 6 x 4 inch figure.
const (
	titleSize  = 12
	labelSize  = 12.5
	tickSize   = 11
	legendSize = 10.5
)

var sans = font.Font{Typeface: "Liberation", Variant: "Sans"}

// newPlot returns a plot with corefall's fonts, a title and axis labels.
func newPlot(title, xlabel, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = font.From(sans, titleSize)
	p.Title.Padding = vg.Points(6)
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle.Font = font.From(sans, labelSize)
		ax.Tick.Label.Font = font.From(sans, tickSize)
		ax.Label.Padding = vg.Points(4)
		ax.Padding = vg.Points(4)
	}
	p.X.Label.Text = xlabel
	p.Y.Label.Text = ylabel
	p.X.Tick.Marker = linearTicks{}
	p.Y.Tick.Marker = linearTicks{}
	p.Legend.TextStyle.Font = font.From(sans, legendSize)
	p.Legend.Top = true
	p.Legend.ThumbnailWidth = vg.Points(24)
	p.Legend.XOffs = -vg.Points(4)
	p.Legend.YOffs = -vg.Points(2)
	return p
}

// axes maps data to plot coordinates: x and y as they are on linear axes, log10 x or log10 y on
// logarithmic ones. A logarithmic axis is drawn as a linear axis of log10 values with ticks
// labelled in data units, which keeps gonum/plot's placement of axis labels right (it centres
// the label's box at the arithmetic mean of the axis limits, which is off-centre on a log scale).
type axes struct{ logX, logY bool }

func (a axes) x(v float64) float64 {
	if a.logX {
		return math.Log10(v)
	}
	return v
}

func (a axes) y(v float64) float64 {
	if a.logY {
		return math.Log10(v)
	}
	return v
}

func (a axes) xy(x, y float64) plotter.XY { return plotter.XY{X: a.x(x), Y: a.y(y)} }

// apply sets the tick marks of p's logarithmic axes.
func (a axes) apply(p *plot.Plot) {
	if a.logX {
		p.X.Tick.Marker = logTicks{}
	}
	if a.logY {
		p.Y.Tick.Marker = logTicks{}
	}
}

// logTicks marks, on an axis of log10 values, the decades with labels in data units and 2..9
// times a decade without (on short ranges it also labels 2 and 5 times a decade; on long ones it
// labels every k-th decade so at most ~7 show).
type logTicks struct{}

func (logTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	d0 := int(math.Floor(lo))
	d1 := int(math.Ceil(hi))
	span := d1 - d0
	stride := 1 + (span-1)/7
	plain := d0 >= -3 && d1 <= 4 // else every label in exponent form
	var ticks []plot.Tick
	for d := d0; d <= d1; d++ {
		for m := 1; m <= 9; m++ {
			v := float64(d) + math.Log10(float64(m))
			if v < lo-1e-9 || v > hi+1e-9 {
				continue
			}
			t := plot.Tick{Value: v}
			switch {
			case m == 1 && d%stride == 0:
				t.Label = tickLabel(d, 1, plain)
			case (m == 2 || m == 5) && span <= 3:
				t.Label = tickLabel(d, m, plain)
			}
			if m == 1 || span <= 6 {
				ticks = append(ticks, t)
			}
		}
	}
	return ticks
}

// linearTicks labels about five round values (1, 2, 2.5 or 5 times a power of ten apart) with as
// few decimals as they need, and marks four or five minor ticks between them.
type linearTicks struct{}

func (linearTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil
	}
	step := niceStep((hi - lo) / 5)
	minor := step / 5
	exp := math.Floor(math.Log10(step))
	mant := step / math.Pow(10, exp)
	if math.Abs(mant-2) < 1e-9 {
		minor = step / 4
	}
	dec := -int(exp)
	if math.Abs(mant-2.5) < 1e-9 {
		dec++
	}
	dec = max(0, dec)
	var ticks []plot.Tick
	k0 := math.Ceil(lo/minor - 1e-9)
	for k := k0; k*minor <= hi+minor*1e-9; k++ {
		v := k * minor
		t := plot.Tick{Value: v}
		if r := math.Round(v / step); math.Abs(v/step-r) < 1e-6 {
			v = r * step
			t.Value = v
			if v == 0 {
				v = 0 // no "-0"
			}
			t.Label = strconv.FormatFloat(v, 'f', dec, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
}

// tickLabel writes m x 10^d plainly ("0.05", "200") or in exponent form ("5e-2", "1e6").
func tickLabel(d, m int, plain bool) string {
	if plain {
		return strconv.FormatFloat(float64(m)*math.Pow(10, float64(d)), 'f', max(0, -d), 64)
	}
	return strconv.Itoa(m) + "e" + strconv.Itoa(d)
}

// band shades the x range [Lo, Hi] (plot coordinates) over the whole height of the plot with a
// light fill, edges, and hatching in direction Hatch (0 none, 1 "/", 2 "\\", 3 "|", 4 "-") so
// that overlapping bands stay apart in greyscale.
type band struct {
	Lo, Hi float64
	Fill   color.Color
	Edge   draw.LineStyle
	Hatch  int
}

func (b band) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x0, x1 := max(trX(b.Lo), c.Min.X), min(trX(b.Hi), c.Max.X)
	if x1 <= x0 {
		return
	}
	b.draw(c, vg.Rectangle{Min: vg.Point{X: x0, Y: c.Min.Y}, Max: vg.Point{X: x1, Y: c.Max.Y}})
}

func (b band) Thumbnail(c *draw.Canvas) { b.draw(*c, c.Rectangle) }

func (b band) draw(c draw.Canvas, r vg.Rectangle) {
	pts := []vg.Point{r.Min, {X: r.Max.X, Y: r.Min.Y}, r.Max, {X: r.Min.X, Y: r.Max.Y}}
	if b.Fill != nil {
		c.FillPolygon(b.Fill, pts)
	}
	if b.Hatch > 0 && b.Edge.Color != nil {
		sty := b.Edge
		sty.Width = vg.Points(0.6)
		sty.Dashes = nil
		clip := c
		clip.Rectangle = r
		const gap = vg.Length(5)
		w, h := r.Max.X-r.Min.X, r.Max.Y-r.Min.Y
		var lines [][]vg.Point
		switch b.Hatch {
		case 1, 2:
			for d := -h; d < w; d += gap {
				a, z := vg.Point{X: r.Min.X + d, Y: r.Min.Y}, vg.Point{X: r.Min.X + d + h, Y: r.Max.Y}
				if b.Hatch == 2 {
					a.Y, z.Y = r.Max.Y, r.Min.Y
				}
				lines = append(lines, []vg.Point{a, z})
			}
		case 3:
			for x := r.Min.X + gap/2; x < r.Max.X; x += gap {
				lines = append(lines, []vg.Point{{X: x, Y: r.Min.Y}, {X: x, Y: r.Max.Y}})
			}
		default:
			for y := r.Min.Y + gap/2; y < r.Max.Y; y += gap {
				lines = append(lines, []vg.Point{{X: r.Min.X, Y: y}, {X: r.Max.X, Y: y}})
			}
		}
		c.StrokeLines(sty, clip.ClipLinesXY(lines...)...)
	}
	if b.Edge.Color != nil {
		c.StrokeLines(b.Edge, []vg.Point{pts[0], pts[3]}, []vg.Point{pts[1], pts[2]})
	}
}

// refLine is a horizontal (Vertical false, at Y = At) or vertical (at X = At) reference line across
// the whole plot, At in plot coordinates. It does not take part in the axis ranges.
type refLine struct {
	At       float64
	Vertical bool
	Style    draw.LineStyle
}

func (l refLine) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	if math.IsNaN(l.At) || math.IsInf(l.At, 0) {
		return
	}
	if l.Vertical {
		if x := trX(l.At); c.ContainsX(x) {
			c.StrokeLine2(l.Style, x, c.Min.Y, x, c.Max.Y)
		}
		return
	}
	if y := trY(l.At); c.ContainsY(y) {
		c.StrokeLine2(l.Style, c.Min.X, y, c.Max.X, y)
	}
}

func (l refLine) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	c.StrokeLine2(l.Style, c.Min.X, y, c.Max.X, y)
}

// referenceStyle is the thin grey line of reference marks (boundaries, thresholds, the age of the
// Universe), unlike any data series.
var referenceStyle = draw.LineStyle{Color: color.Gray{Y: 0x60}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(7), vg.Points(2), vg.Points(1), vg.Points(2)}}

// sheet builds a plot: it adds plotters and legend entries and remembers the data points, so
// that finish can make room for the legend.
type sheet struct {
	p      *plot.Plot
	a      axes
	labels []string
	pts    plotter.XYs // data points in plot coordinates
}

func newSheet(title, xlabel, ylabel string, a axes) *sheet {
	s := &sheet{p: newPlot(title, xlabel, ylabel), a: a}
	a.apply(s.p)
	return s
}

// add adds a plotter whose data points are pts (plot coordinates).
func (s *sheet) add(pl plot.Plotter, pts ...plotter.XYs) {
	s.p.Add(pl)
	for _, xy := range pts {
		s.pts = append(s.pts, xy...)
	}
}

// legend adds a legend entry.
func (s *sheet) legend(text string, th ...plot.Thumbnailer) {
	s.p.Legend.Add(text, th...)
	s.labels = append(s.labels, text)
}

// Assumed size of the data area, points, for placing the legend: that of a 6 x 4 inch figure with
// a two-line title. Larger figures only gain room.
const (
	figureWidth = 6 * 72
	dataWidth   = figureWidth - 80
	dataHeight  = 4*72 - 100
)

// fitText shrinks the font of sty (down to 7 pt) until the widest line of text fits in width
// points.
func fitText(sty *text.Style, txt string, width float64) {
	w := float64(sty.Width(txt))
	if w <= width || w == 0 {
		return
	}
	size := math.Max(7, math.Floor(float64(sty.Font.Size)*width/w*10)/10)
	sty.Font.Size = font.Length(size)
}

// finish raises the top of the y axis, if the data need it, so that the legend, drawn at the top
// of the plot (left or right), clears every data point; it returns the plot.
func (s *sheet) finish() *plot.Plot {
	p := s.p
	fitText(&p.Title.TextStyle, p.Title.Text, figureWidth-8)
	fitText(&p.Legend.TextStyle, strings.Join(s.labels, "\n"), dataWidth-float64(p.Legend.ThumbnailWidth)-12)
	if !(p.Y.Max > p.Y.Min) || !(p.X.Max > p.X.Min) {
		return p
	}
	p.Y.Max += 0.04 * (p.Y.Max - p.Y.Min) // the highest point stays off the frame
	if len(s.labels) == 0 {
		return p
	}
	l := &p.Legend
	var w vg.Length
	for _, t := range s.labels {
		w = max(w, l.TextStyle.Width(t))
	}
	w += l.ThumbnailWidth + l.TextStyle.Width(" ") + vg.Points(8)
	h := vg.Length(len(s.labels))*l.TextStyle.Height("Mg") + vg.Points(6)
	fx := math.Min(1, float64(w)/dataWidth)
	fy := math.Min(0.7, float64(h)/dataHeight)
	top := math.Inf(-1) // highest data point under the legend, as a fraction of the y range
	for _, pt := range s.pts {
		x := (pt.X - p.X.Min) / (p.X.Max - p.X.Min)
		if l.Left {
			x = 1 - x
		}
		if x < 1-fx || math.IsNaN(pt.Y) || math.IsInf(pt.Y, 0) {
			continue
		}
		top = math.Max(top, (pt.Y-p.Y.Min)/(p.Y.Max-p.Y.Min))
	}
	const margin = 0.02
	if top > 1-fy-margin {
		// Stretch the axis so that top lands just below the legend.
		p.Y.Max = p.Y.Min + (p.Y.Max-p.Y.Min)*top/(1-fy-margin)
	}
	return p
}

// stepLines returns the outline of a histogram as polylines in plot coordinates: the tops of the
// bins joined by vertical steps, dropping to floor (data units) at the ends of each run of drawn
// bins. With skipEmpty, empty bins are not drawn (a log axis cannot show zero) and break the
// outline.
func stepLines(h *Hist, a axes, floor float64, skipEmpty bool) []plotter.XYs {
	var lines []plotter.XYs
	var cur plotter.XYs
	flush := func(end float64) {
		if len(cur) > 0 {
			cur = append(cur, a.xy(end, floor))
			lines = append(lines, cur)
			cur = nil
		}
	}
	for i, v := range h.Values {
		if skipEmpty && h.Counts[i] == 0 {
			flush(h.Edges[i])
			continue
		}
		if len(cur) == 0 {
			cur = append(cur, a.xy(h.Edges[i], floor))
		}
		cur = append(cur, a.xy(h.Edges[i], v), a.xy(h.Edges[i+1], v))
	}
	flush(h.Edges[len(h.Edges)-1])
	return lines
}

// yErrors are asymmetric error bars for plotter.YErrorBars.
type yErrors struct {
	plotter.XYs
	plotter.YErrors
}

// errorBars returns Poisson error bars at the bin centres of h (geometric centres on a log x
// axis), for the non-empty bins; on a log y axis a bar's lower end stops at floor.
func errorBars(h *Hist, a axes, floor float64, sty draw.LineStyle) (*plotter.YErrorBars, error) {
	var e yErrors
	for i, c := range h.Counts {
		if c == 0 {
			continue
		}
		x := (h.Edges[i] + h.Edges[i+1]) / 2
		if a.logX {
			x = math.Sqrt(h.Edges[i] * h.Edges[i+1])
		}
		v, lo, hi := h.Values[i], h.Values[i]-h.Errors[i], h.Values[i]+h.Errors[i]
		if a.logY {
			lo = math.Max(lo, floor)
		}
		e.XYs = append(e.XYs, a.xy(x, v))
		e.YErrors = append(e.YErrors, struct{ Low, High float64 }{a.y(v) - a.y(lo), a.y(hi) - a.y(v)})
	}
	if len(e.XYs) == 0 {
		return nil, nil
	}
	bars, err := plotter.NewYErrorBars(e)
	if err != nil {
		return nil, err
	}
	sty.Dashes = nil
	sty.Width = vg.Points(0.9)
	bars.LineStyle = sty
	bars.CapWidth = vg.Points(3)
	return bars, nil
}

// logFloor returns a lower limit for a log y axis that shows the smallest positive height of hs:
// half of it.
func logFloor(hs ...*Hist) float64 {
	lo := math.Inf(1)
	for _, h := range hs {
		for i, v := range h.Values {
			if h.Counts[i] > 0 && v > 0 {
				lo = math.Min(lo, v)
			}
		}
	}
	if math.IsInf(lo, 1) {
		return 1
	}
	return lo / 2
}
