package main

import (
	"fmt"
	"image/color"
	"image/png"
	"io"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"ssbkit/modem/spectral"
)

// levelAnchors are the control colours of the waterfall's colour map, in
// rising CIE L* (about 8, 24, 47, 70, 92): night blue, indigo, teal,
// moss green, pale straw. moreland.NewLuminance interpolates between them
// in CIELAB with L* linear in the value, so equal steps in dB look like
// equal steps in brightness.
var levelAnchors = []color.Color{
	color.RGBA{0x12, 0x14, 0x2e, 0xff},
	color.RGBA{0x3a, 0x2f, 0x7a, 0xff},
	color.RGBA{0x1d, 0x7b, 0x86, 0xff},
	color.RGBA{0x8c, 0xb8, 0x4c, 0xff},
	color.RGBA{0xf4, 0xeb, 0xb8, 0xff},
}

// levelColours returns the colour map from lo to hi dB.
func levelColours(lo, hi float64) (palette.ColorMap, error) {
	cm, err := moreland.NewLuminance(levelAnchors)
	if err != nil {
		return nil, err
	}
	cm.SetMin(lo)
	cm.SetMax(hi)
	return cm, nil
}

// freqAxis converts offsets from the capture centre to axis units: absolute
// MHz (or kHz) when the centre is known, otherwise offsets in Hz or kHz.
type freqAxis struct {
	origin, scale float64
	label         string
}

func newFreqAxis(center float64, hasCenter bool, span float64) freqAxis {
	switch {
	case hasCenter && math.Abs(center) >= 1e6:
		return freqAxis{center, 1e-6, "frequency (MHz)"}
	case hasCenter && math.Abs(center) >= 1e3:
		return freqAxis{center, 1e-3, "frequency (kHz)"}
	case hasCenter:
		return freqAxis{center, 1, "frequency (Hz)"}
	case span >= 20e3:
		return freqAxis{0, 1e-3, "offset from centre (kHz)"}
	}
	return freqAxis{0, 1, "offset from centre (Hz)"}
}

func (a freqAxis) at(offset float64) float64 { return (a.origin + offset) * a.scale }

// plainTicks prints frequency ticks as plain decimals, without exponent.
type plainTicks struct{}

func (plainTicks) Ticks(lo, hi float64) []plot.Tick {
	t := plot.DefaultTicks{}.Ticks(lo, hi)
	step := 0.0
	for i := 1; i < len(t); i++ {
		if t[i].Label != "" && t[i-1].Label != "" {
			step = t[i].Value - t[i-1].Value
			break
		}
	}
	prec := 0
	if step > 0 && step < 1 {
		prec = int(math.Ceil(-math.Log10(step) + 1e-9))
	}
	for i := range t {
		if t[i].Label != "" {
			t[i].Label = fmt.Sprintf("%.*f", prec, t[i].Value)
		}
	}
	return t
}

// timeTicks labels an axis holding end − t with t, so that time runs
// downwards on a normal axis.
type timeTicks struct{ end float64 }

func (tt timeTicks) Ticks(lo, hi float64) []plot.Tick {
	t := plot.DefaultTicks{}.Ticks(tt.end-hi, tt.end-lo)
	for i := range t {
		t[i].Value = tt.end - t[i].Value
	}
	return t
}

// waterfallGrid adapts waterfall rows (dB) to plotter.GridXYZ.
type waterfallGrid struct {
	z      [][]float64 // [row][col] dB
	x0, dx float64     // column centres on the axis
	dt     float64     // row duration, s
	end    float64     // capture duration, s: row 0 is drawn at the top
	lo, hi float64
}

func (g *waterfallGrid) Dims() (c, r int)   { return len(g.z[0]), len(g.z) }
func (g *waterfallGrid) Z(c, r int) float64 { return g.z[r][c] }
func (g *waterfallGrid) X(c int) float64    { return g.x0 + (float64(c)+0.5)*g.dx }
func (g *waterfallGrid) Y(r int) float64    { return g.end - (float64(r)+0.5)*g.dt }
func (g *waterfallGrid) Min() float64       { return g.lo }
func (g *waterfallGrid) Max() float64       { return g.hi }

// rasterHeatMap draws a rasterised heat map without reporting a glyph box
// per cell: plot.HeatMap.GlyphBoxes returns one for each of the
// waterfall's ~600 000 cells, and the layout asked for them several
// times a picture (about 2 GB of allocation), while a raster has no
// glyph reaching beyond the data area.
type rasterHeatMap struct{ hm *plotter.HeatMap }

func (r rasterHeatMap) Plot(c draw.Canvas, p *plot.Plot) { r.hm.Plot(c, p) }

func (r rasterHeatMap) DataRange() (xmin, xmax, ymin, ymax float64) { return r.hm.DataRange() }

// spectrumPicture is what `spectrum` draws.
type spectrumPicture struct {
	name       string
	spec       *spectral.Spectrum
	rows       [][]float64 // waterfall, power per Hz
	rowSeconds float64
	lastRow    float64 // seconds in the last row
	axis       freqAxis
	floor      float64 // noise density, power per Hz
	signals    []spectral.Signal
}

// writeSpectrumPNG draws the averaged spectrum above the waterfall, with a
// dBFS/Hz colour bar beside the waterfall, as a PNG of w×h points.
func writeSpectrumPNG(out io.Writer, p *spectrumPicture, width, height vg.Length) error {
	s := p.spec
	n := s.Len()
	// spectrum line
	top := plot.New()
	top.Title.Text = fmt.Sprintf("%s — averaged spectrum (%d segments, %.3g Hz bins)", p.name, s.Segments, s.BinHz())
	top.Y.Label.Text = "dBFS/Hz"
	top.X.Label.Text = p.axis.label
	top.X.Tick.Marker = plainTicks{}
	top.Y.Tick.Marker = plainTicks{}
	// more bins than the picture has columns: keep each column's lowest
	// and highest value and fill between them, so that narrow peaks stay
	// visible. A filled band is cheap to rasterise; the same envelope
	// drawn as a zig-zag line cost the rasteriser about 2.5 s a picture.
	step := max(1, n/int(2*width.Points()))
	upper := make(plotter.XYs, 0, n/step+1)
	lower := make(plotter.XYs, 0, n/step+1)
	hi := math.Inf(-1)
	for j := 0; j < n; j += step {
		lo, hi2 := math.Inf(1), math.Inf(-1)
		for k := j; k < min(j+step, n); k++ {
			v := spectral.DB(s.Density[k])
			lo = math.Min(lo, v)
			hi2 = math.Max(hi2, v)
		}
		x := p.axis.at(s.Freq(j + (min(j+step, n)-j)/2))
		upper = append(upper, plotter.XY{X: x, Y: hi2})
		lower = append(lower, plotter.XY{X: x, Y: lo})
		hi = math.Max(hi, hi2)
	}
	lo := spectral.DB(p.floor) - 15
	traceColour := color.RGBA{0x1d, 0x4e, 0x89, 0xff}
	var line plot.Plotter
	if step == 1 {
		l, err := plotter.NewLine(upper)
		if err != nil {
			return err
		}
		l.Color = traceColour
		l.Width = vg.Points(0.6)
		line = l
	} else {
		band := slices.Clone(upper)
		for i := len(lower) - 1; i >= 0; i-- {
			band = append(band, lower[i])
		}
		poly, err := plotter.NewPolygon(band)
		if err != nil {
			return err
		}
		poly.Color = traceColour
		poly.LineStyle.Color = traceColour
		poly.LineStyle.Width = vg.Points(0.4)
		line = poly
	}
	top.Add(plotter.NewGrid(), line)
	top.Y.Min, top.Y.Max = lo, hi+6
	for _, sg := range p.signals {
		lbl, err := plotter.NewLabels(plotter.XYLabels{
			XYs:    plotter.XYs{{X: p.axis.at(sg.OffsetHz), Y: hi + 3}},
			Labels: []string{sg.Kind},
		})
		if err == nil {
			lbl.TextStyle[0].XAlign = draw.XCenter
			lbl.TextStyle[0].Color = color.RGBA{0x8a, 0x1c, 0x1c, 0xff}
			top.Add(lbl)
		}
		mark := plotter.XYs{{X: p.axis.at(sg.LowHz), Y: hi + 1}, {X: p.axis.at(sg.HighHz), Y: hi + 1}}
		if l, err := plotter.NewLine(mark); err == nil {
			l.Color = color.RGBA{0x8a, 0x1c, 0x1c, 0xff}
			l.Width = vg.Points(2)
			top.Add(l)
		}
	}
	top.X.Min, top.X.Max = p.axis.at(-s.Rate/2), p.axis.at(s.Rate/2)

	// waterfall
	bottom := plot.New()
	bottom.Title.Text = "waterfall"
	bottom.X.Label.Text = p.axis.label
	bottom.Y.Label.Text = "time (s)"
	bottom.X.Tick.Marker = plainTicks{}
	z := make([][]float64, len(p.rows))
	zlo, zhi := lo+5, lo+5
	for r, row := range p.rows {
		z[r] = make([]float64, len(row))
		for c, v := range row {
			z[r][c] = spectral.DB(v)
			zhi = math.Max(zhi, z[r][c])
		}
	}
	if zhi-zlo < 10 {
		zhi = zlo + 10
	}
	cols := len(p.rows[0])
	g := &waterfallGrid{
		z:  z,
		x0: p.axis.at(-s.Rate / 2), dx: (p.axis.at(s.Rate/2) - p.axis.at(-s.Rate/2)) / float64(cols),
		dt: p.rowSeconds, lo: zlo, hi: zhi,
	}
	g.end = float64(len(p.rows)-1)*p.rowSeconds + p.lastRow
	if len(p.rows) == 1 {
		g.end = p.rowSeconds // one row: draw it full height
	}
	cm, err := levelColours(zlo, zhi)
	if err != nil {
		return err
	}
	hm := plotter.NewHeatMap(g, cm.Palette(256))
	hm.Rasterized = true
	hm.Underflow = levelAnchors[0]
	hm.Overflow = levelAnchors[len(levelAnchors)-1]
	bottom.Add(rasterHeatMap{hm})
	bottom.X.Min, bottom.X.Max = top.X.Min, top.X.Max
	// time runs downwards: the axis holds end − t, labelled t
	bottom.Y.Min, bottom.Y.Max = g.end-float64(len(p.rows))*p.rowSeconds, g.end
	bottom.Y.Tick.Marker = timeTicks{g.end}

	// colour bar
	bar := plot.New()
	bar.HideX()
	bar.Y.Label.Text = "dBFS/Hz"
	cb := &plotter.ColorBar{ColorMap: cm, Vertical: true}
	bar.Add(cb)

	img := vgimg.New(width, height)
	dc := draw.New(img)
	barW := vg.Points(100)
	left := draw.Crop(dc, 0, -barW, 0, 0)
	tiles := draw.Tiles{Rows: 2, Cols: 1, PadTop: 4, PadBottom: 4, PadLeft: 4, PadRight: 4, PadY: 10}
	canv := plot.Align([][]*plot.Plot{{top}, {bottom}}, tiles, left)
	top.Draw(canv[0][0])
	bottom.Draw(canv[1][0])
	// the bar spans the waterfall's data area
	wd := bottom.DataCanvas(canv[1][0])
	right := draw.Canvas{Canvas: img, Rectangle: vg.Rectangle{
		Min: vg.Point{X: dc.Max.X - barW + 10, Y: wd.Min.Y},
		Max: vg.Point{X: dc.Max.X - 8, Y: wd.Max.Y},
	}}
	bar.Draw(right)
	// fastest deflate: the waterfall's noise compresses poorly at any
	// level; on a 60 s 2.4 MS/s capture the default level spent ~0.45 s
	// for a file 22 % smaller (615 kB against 786 kB)
	return (&png.Encoder{CompressionLevel: png.BestSpeed}).Encode(out, img.Image())
}

// writeMeasurePNG draws the spectrum around the carrier as line levels
// (dBFS per line, flat-top) with the wanted and unwanted bands shaded and
// the tones, products and carrier marked.
func writeMeasurePNG(out io.Writer, name string, r *spectral.Result, width, height vg.Length) error {
	s := r.Lines
	c := r.CarrierOffsetHz
	span := 1.5 * r.BandHz[1]
	if r.TwoTone {
		for _, t := range append(slices.Clone(r.Tones), r.Products...) {
			span = math.Max(span, math.Abs(t.OffsetHz)+200)
		}
	}
	// within the spectrum, which is centred on the carrier after narrowing
	span = math.Min(span, s.Rate/2-math.Abs(c-s.Centre))
	p := plot.New()
	p.Title.Text = fmt.Sprintf("%s — %s sideband, carrier at %+.1f Hz", name, r.Sideband, c)
	p.X.Label.Text = "offset from carrier (Hz)"
	p.Y.Label.Text = "line level (dBFS, flat-top)"
	p.X.Tick.Marker = plainTicks{}
	p.Y.Tick.Marker = plainTicks{}
	j0 := max(0, int(math.Floor(s.Index(c-span))))
	j1 := min(s.Len()-1, int(math.Ceil(s.Index(c+span))))
	pts := make(plotter.XYs, 0, j1-j0+1)
	top := math.Inf(-1)
	for j := j0; j <= j1; j++ {
		v := spectral.DB(s.BinPower(j))
		pts = append(pts, plotter.XY{X: s.Freq(j) - c, Y: v})
		top = math.Max(top, v)
	}
	bottom := r.NoiseDBFSPerHz + 10*math.Log10(s.BinHz()*s.ENBW) - 15
	if top-bottom > 140 {
		bottom = top - 140
	}
	lo, hi := r.BandHz[0], r.BandHz[1]
	wantSign := 1.0
	if r.Sideband == spectral.Lower {
		wantSign = -1
	}
	shade := func(a, b float64, col color.Color) {
		poly, err := plotter.NewPolygon(plotter.XYs{{X: a, Y: bottom}, {X: b, Y: bottom}, {X: b, Y: top + 12}, {X: a, Y: top + 12}})
		if err == nil {
			poly.Color = col
			poly.LineStyle.Width = 0
			p.Add(poly)
		}
	}
	shade(wantSign*lo, wantSign*hi, color.RGBA{0xd8, 0xea, 0xd3, 0xff})
	shade(-wantSign*lo, -wantSign*hi, color.RGBA{0xf3, 0xdc, 0xd4, 0xff})
	line, err := plotter.NewLine(pts)
	if err != nil {
		return err
	}
	line.Color = color.RGBA{0x1d, 0x4e, 0x89, 0xff}
	line.Width = vg.Points(0.7)
	p.Add(plotter.NewGrid(), line)
	var marks plotter.XYLabels
	add := func(f, dbfs float64, text string) {
		marks.XYs = append(marks.XYs, plotter.XY{X: f, Y: dbfs + 2})
		marks.Labels = append(marks.Labels, text)
	}
	add(0, r.CarrierDBFS, fmt.Sprintf("carrier %.1f dBc", r.CarrierDBc))
	if r.TwoTone {
		for i, t := range r.Tones {
			add(t.OffsetHz, t.DBFS, fmt.Sprintf("f%d", i+1))
		}
		for i, t := range r.Products {
			order := "IMD3"
			if i >= 2 {
				order = "IMD5"
			}
			add(t.OffsetHz, t.DBFS, order)
		}
	}
	if l, err := plotter.NewLabels(marks); err == nil {
		for i := range l.TextStyle {
			l.TextStyle[i].XAlign = draw.XCenter
			l.TextStyle[i].Color = color.RGBA{0x8a, 0x1c, 0x1c, 0xff}
		}
		p.Add(l)
	}
	if sc, err := plotter.NewScatter(marks.XYs); err == nil {
		sc.GlyphStyle.Shape = draw.TriangleGlyph{}
		sc.GlyphStyle.Color = color.RGBA{0x8a, 0x1c, 0x1c, 0xff}
		sc.GlyphStyle.Radius = vg.Points(2.5)
		p.Add(sc)
	}
	// figures at the noise are bounds, marked as in the text report
	ge := ""
	if r.UnwantedAtNoise {
		ge = "≥ "
	}
	le := func(atNoise bool) string {
		if atNoise {
			return "≤ "
		}
		return ""
	}
	summary := fmt.Sprintf("suppression %s%.1f dB   PEP %.1f dBFS   carrier %s%.1f dBc   99%% OBW %.0f Hz",
		ge, r.SuppressionDB, r.PEPDBFS, le(r.CarrierAtNoise), r.CarrierDBc, r.OccupiedBandwidthHz)
	if r.TwoTone {
		summary += fmt.Sprintf("   IMD3 %s%.1f dBc   IMD5 %s%.1f dBc", le(r.IMD3AtNoise), r.IMD3DBc, le(r.IMD5AtNoise), r.IMD5DBc)
	}
	p.X.Label.Text = "offset from carrier (Hz)\n" + summary
	p.X.Min, p.X.Max = -span, span
	p.Y.Min, p.Y.Max = bottom, top+12
	img := vgimg.New(width, height)
	p.Draw(draw.New(img))
	_, err = vgimg.PngCanvas{Canvas: img}.WriteTo(out)
	return err
}
