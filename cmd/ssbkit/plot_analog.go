package main

import (
	"image/color"
	"io"
	"math"
	"slices"
	"strconv"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"ssbkit/hilbert"
)

// writeAnalogPNG draws the suppression of an analog network against
// frequency (log axis): the ideal design, the snapped parts, and the
// Monte Carlo spread as a shaded 5th–95th percentile band with the
// median, 5th and 1st percentile lines, and the target.
func writeAnalogPNG(w io.Writer, title string, mc hilbert.MCResult, ideal, snapped []float64, series string, target float64) error {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = "audio frequency (Hz)"
	p.Y.Label.Text = "opposite-sideband suppression (dB)"
	p.X.Scale = plot.LogScale{}
	p.X.Tick.Marker = hzTicks{}
	p.Add(plotter.NewGrid())

	nf := len(mc.Freq)
	qs := []float64{0.01, 0.05, 0.5, 0.95}
	lines := make([]plotter.XYs, len(qs))
	col := make([]float64, len(mc.Curves))
	for k, f := range mc.Freq {
		for t, c := range mc.Curves {
			col[t] = c[k]
		}
		slices.Sort(col)
		for i, q := range qs {
			lines[i] = append(lines[i], plotter.XY{X: f, Y: stat.Quantile(q, stat.Empirical, col, nil)})
		}
	}
	// The band: 5th percentile left to right, 95th back.
	band := make(plotter.XYs, 0, 2*nf)
	band = append(band, lines[1]...)
	for k := nf - 1; k >= 0; k-- {
		band = append(band, lines[3][k])
	}
	poly, err := plotter.NewPolygon(band)
	if err != nil {
		return err
	}
	poly.Color = color.RGBA{0xb8, 0xd4, 0xec, 0xff}
	poly.LineStyle.Width = 0
	p.Add(poly)
	p.Legend.Add("Monte Carlo, 5th to 95th percentile", poly)

	add := func(xy plotter.XYs, name string, c color.RGBA, width float64, dashes []vg.Length) error {
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		l.Color = c
		l.Width = vg.Points(width)
		l.Dashes = dashes
		p.Add(l)
		p.Legend.Add(name, l)
		return nil
	}
	curve := func(v []float64) plotter.XYs {
		xy := make(plotter.XYs, nf)
		for k, f := range mc.Freq {
			xy[k] = plotter.XY{X: f, Y: v[k]}
		}
		return xy
	}
	blue := designColours["kaiser"]
	steps := []struct {
		xy     plotter.XYs
		name   string
		c      color.RGBA
		width  float64
		dashes []vg.Length
	}{
		{curve(ideal), "ideal parts", designColours["allpass"], 1.5, nil},
		{curve(snapped), series + " values", designColours["equiripple"], 1.5, nil},
		{lines[2], "Monte Carlo median at each frequency", blue, 1.5, nil},
		{lines[1], "Monte Carlo 5th percentile", blue, 1.2, []vg.Length{vg.Points(5), vg.Points(3)}},
		{lines[0], "Monte Carlo 1st percentile", blue, 1.2, []vg.Length{vg.Points(1.5), vg.Points(2.5)}},
		{plotter.XYs{{X: mc.Freq[0], Y: target}, {X: mc.Freq[nf-1], Y: target}}, "target", designColours["rect"], 1, []vg.Length{vg.Points(6), vg.Points(4)}},
	}
	for _, s := range steps {
		if err := add(s.xy, s.name, s.c, s.width, s.dashes); err != nil {
			return err
		}
	}
	top := 0.0
	for _, v := range ideal {
		top = math.Max(top, v)
	}
	p.Y.Min = 0
	p.Y.Max = math.Min(top+35, 180) // room for the legend
	p.Y.Tick.Marker = dbTicks{step: 10}
	p.Legend.Top = true
	p.Legend.Left = false

	img := vgimg.New(12*vg.Inch, 6.5*vg.Inch)
	dc := draw.New(img)
	p.Draw(draw.Crop(dc, vg.Points(8), -vg.Points(12), vg.Points(8), -vg.Points(8)))
	_, err = vgimg.PngCanvas{Canvas: img}.WriteTo(w)
	return err
}

// hzTicks marks a logarithmic frequency axis at 1, 2 and 5 times powers
// of ten, labelled in Hz or kHz, and the axis ends.
type hzTicks struct{}

func (hzTicks) Ticks(lo, hi float64) []plot.Tick {
	label := func(v float64) string {
		if v >= 1000 {
			return strconv.FormatFloat(sig(v/1000, 3), 'f', -1, 64) + "k"
		}
		return strconv.FormatFloat(sig(v, 3), 'f', -1, 64)
	}
	ts := []plot.Tick{{Value: lo, Label: label(lo)}}
	for d := math.Pow(10, math.Floor(math.Log10(lo))); d <= hi; d *= 10 {
		for _, m := range []float64{1, 2, 5} {
			v := m * d
			if v > lo*1.15 && v < hi/1.15 {
				ts = append(ts, plot.Tick{Value: v, Label: label(v)})
			}
		}
	}
	return append(ts, plot.Tick{Value: hi, Label: label(hi)})
}
