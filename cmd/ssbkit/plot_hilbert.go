package main

import (
	"image/color"
	"io"
	"math"
	"math/cmplx"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"ssbkit/hilbert"
)

// designColours gives each splitter design its own colour, in the order of
// hilbert.Designs: well apart in hue and lightness so the lines stay
// distinct in print and for common colour-vision deficiencies.
var designColours = map[string]color.RGBA{
	"rect":       {0x8a, 0x8a, 0x8a, 0xff},
	"hamming":    {0xc9, 0x8b, 0x2b, 0xff},
	"blackman":   {0x6b, 0x4c, 0x9a, 0xff},
	"kaiser":     {0x1f, 0x6f, 0xb4, 0xff},
	"equiripple": {0xd1, 0x3f, 0x31, 0xff},
	"allpass":    {0x2a, 0x9d, 0x6e, 0xff},
	"fft":        {0x3d, 0x3d, 0x3d, 0xff},
	"weaver":     {0xe3, 0x7f, 0xb1, 0xff},
	"analog":     {0x8c, 0x56, 0x2d, 0xff},
}

var designShapes = map[string]draw.GlyphDrawer{
	"rect":       draw.CircleGlyph{},
	"hamming":    draw.SquareGlyph{},
	"blackman":   draw.TriangleGlyph{},
	"kaiser":     draw.CircleGlyph{},
	"equiripple": draw.SquareGlyph{},
	"allpass":    draw.TriangleGlyph{},
	"fft":        draw.CrossGlyph{},
	"weaver":     draw.PlusGlyph{},
	"analog":     draw.RingGlyph{},
}

// sweepPlotMaxDB is where the sweep plot's suppression axis stops: designs
// beyond it are far past what float32 streaming can deliver.
const sweepPlotMaxDB = 200

// dbTicks marks a dB axis every step dB.
type dbTicks struct{ step float64 }

func (t dbTicks) Ticks(lo, hi float64) []plot.Tick {
	var ts []plot.Tick
	for v := math.Ceil(lo/t.step) * t.step; v <= hi; v += t.step {
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'f', -1, 64)})
	}
	return ts
}

// writeSweepPNG draws the sweep: minimum suppression against length (left)
// and against multiply-adds per sample (right), one line per design.
func writeSweepPNG(w io.Writer, title string, designs []string, rows []sweepRow) error {
	byLen := plot.New()
	byLen.Title.Text = title
	byLen.X.Label.Text = "length (taps; FFT block; all-pass or analog sections)"
	byCost := plot.New()
	byCost.Title.Text = "… against cost"
	byCost.X.Label.Text = "real multiply-adds per sample"
	for _, p := range []*plot.Plot{byLen, byCost} {
		p.Y.Label.Text = "minimum suppression (dB)"
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = plot.LogTicks{Prec: -1}
		p.Add(plotter.NewGrid())
		p.Legend.Top = true
		p.Legend.Left = true
		p.Legend.XOffs = vg.Points(10)
		p.Y.Tick.Marker = dbTicks{step: 20}
	}
	byLen.Y.Label.Text = "minimum suppression (dB; axis stops at 200)"
	for _, d := range designs {
		var xl, xc plotter.XYs
		for _, r := range rows {
			if r.Design != d {
				continue
			}
			xl = append(xl, plotter.XY{X: float64(r.Length), Y: r.SuppressionMinDB})
			xc = append(xc, plotter.XY{X: math.Max(r.MACsPerSample, 0.5), Y: r.SuppressionMinDB})
		}
		if len(xl) == 0 {
			continue
		}
		for i, p := range []*plot.Plot{byLen, byCost} {
			xy := xl
			if i == 1 {
				if d == "analog" {
					continue // no multiplications
				}
				xy = xc
			}
			l, pts, err := plotter.NewLinePoints(xy)
			if err != nil {
				return err
			}
			l.Color = designColours[d]
			l.Width = vg.Points(1.5)
			pts.Color = designColours[d]
			pts.Shape = designShapes[d]
			pts.Radius = vg.Points(2.5)
			p.Add(l, pts)
			p.Legend.Add(d, l, pts)
		}
	}
	for _, p := range []*plot.Plot{byLen, byCost} {
		p.Y.Min = 0
		p.Y.Max = math.Min(p.Y.Max+5, sweepPlotMaxDB)
	}
	img := vgimg.New(14*vg.Inch, 6*vg.Inch)
	dc := draw.New(img)
	tiles := draw.Tiles{Rows: 1, Cols: 2, PadX: vg.Points(20), PadTop: vg.Points(8), PadBottom: vg.Points(8), PadLeft: vg.Points(8), PadRight: vg.Points(12)}
	cs := plot.Align([][]*plot.Plot{{byLen, byCost}}, tiles, dc)
	byLen.Draw(cs[0][0])
	byCost.Draw(cs[0][1])
	_, err := vgimg.PngCanvas{Canvas: img}.WriteTo(w)
	return err
}

// splitterPaths returns the I and Q path responses of a splitter from its
// analytic response: for real I and Q, I(f) = (H(f) + H(−f)*)/2 and
// Q(f) = (H(f) − H(−f)*)/(2j).
func splitterPaths(sp hilbert.Splitter, f float64) (i, q complex128) {
	h, n := sp.Response(f), cmplx.Conj(sp.Response(-f))
	return (h + n) / 2, (h - n) / complex(0, 2)
}

// writeSplitterPNG draws the whole-circle response of the analytic filter
// in dB (top), and over the band the phase-difference error of Q against
// I and their gain ratio.
func writeSplitterPNG(w io.Writer, title string, sp hilbert.Splitter, low, high, minDB float64) error {
	rate := sp.Spec().Rate
	resp := plot.New()
	resp.Title.Text = title
	resp.X.Label.Text = "frequency (Hz): negative = opposite sideband"
	resp.Y.Label.Text = "|H(f)| (dB, 0 dB = wanted gain)"
	resp.Add(plotter.NewGrid())
	const n = 4001
	var xy plotter.XYs
	floor := -math.Min(220, minDB+60) // show the stop band, not float64 dust
	for k := range n {
		f := -rate/2 + rate*float64(k)/(n-1)
		g := cmplx.Abs(sp.Response(f)) / 2
		db := floor
		if g > 0 {
			db = math.Max(floor, 20*math.Log10(g))
		}
		xy = append(xy, plotter.XY{X: f, Y: db})
	}
	l, err := plotter.NewLine(xy)
	if err != nil {
		return err
	}
	l.Color = designColours["kaiser"]
	l.Width = vg.Points(1.2)
	resp.Add(l)
	// The band and its mirror, as dashed verticals.
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, p := range xy {
		ymin, ymax = math.Min(ymin, p.Y), math.Max(ymax, p.Y)
	}
	for _, f := range []float64{-high, -low, low, high} {
		v, err := plotter.NewLine(plotter.XYs{{X: f, Y: ymin}, {X: f, Y: ymax + 3}})
		if err != nil {
			return err
		}
		v.Color = designColours["equiripple"]
		v.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
		resp.Add(v)
		if f == high {
			resp.Legend.Add("band (positive) and its mirror (negative)", v)
		}
	}
	resp.Legend.Add("analytic filter |H(f)|", l)
	resp.Legend.Left = false
	resp.Legend.Top = false
	resp.Legend.YOffs = vg.Points(20)

	phase := plot.New()
	phase.Title.Text = "Phase difference of Q against I, departure from −90°, over the band"
	phase.X.Label.Text = "audio frequency (Hz)"
	phase.Y.Label.Text = "phase error (degrees)"
	phase.Add(plotter.NewGrid())
	gain := plot.New()
	gain.Title.Text = "Gain of Q against I over the band"
	gain.X.Label.Text = "audio frequency (Hz)"
	gain.Y.Label.Text = "Q/I gain (dB)"
	gain.Add(plotter.NewGrid())
	var pe, ge plotter.XYs
	for k := range n {
		f := low + (high-low)*float64(k)/(n-1)
		i, q := splitterPaths(sp, f)
		pe = append(pe, plotter.XY{X: f, Y: cmplx.Phase(q/i)*180/math.Pi + 90})
		ge = append(ge, plotter.XY{X: f, Y: 20 * math.Log10(cmplx.Abs(q)/cmplx.Abs(i))})
	}
	pl, err := plotter.NewLine(pe)
	if err != nil {
		return err
	}
	pl.Color = designColours["allpass"]
	pl.Width = vg.Points(1.2)
	phase.Add(pl)
	gl, err := plotter.NewLine(ge)
	if err != nil {
		return err
	}
	gl.Color = designColours["hamming"]
	gl.Width = vg.Points(1.2)
	gain.Add(gl)
	// Exactly equal gains (all-pass) or an exact 90° (FIR) would otherwise
	// get an axis spanning rounding noise.
	minSpan(gain, 1e-3)
	minSpan(phase, 1e-3)

	img := vgimg.New(12*vg.Inch, 11*vg.Inch)
	dc := draw.New(img)
	tiles := draw.Tiles{Rows: 3, Cols: 1, PadY: vg.Points(16), PadTop: vg.Points(8), PadBottom: vg.Points(8), PadLeft: vg.Points(8), PadRight: vg.Points(12)}
	cs := plot.Align([][]*plot.Plot{{resp}, {phase}, {gain}}, tiles, dc)
	resp.Draw(cs[0][0])
	phase.Draw(cs[1][0])
	gain.Draw(cs[2][0])
	_, err = vgimg.PngCanvas{Canvas: img}.WriteTo(w)
	return err
}

// minSpan widens p's y axis to at least span around its middle.
func minSpan(p *plot.Plot, span float64) {
	if mid := (p.Y.Min + p.Y.Max) / 2; p.Y.Max-p.Y.Min < span {
		p.Y.Min, p.Y.Max = mid-span/2, mid+span/2
	}
}
