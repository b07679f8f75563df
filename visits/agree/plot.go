package agree

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"path/filepath"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Size of the Bland-Altman PNG.
const (
	plotWidth  = 7 * vg.Inch
	plotHeight = 5 * vg.Inch
	plotDPI    = 96
)

// BlandAltmanPlot returns the Bland-Altman plot of the matched landings'
// handling times: for each matched pair the mean (A + B)/2 on the x axis
// against the difference B - A on the y axis, both in seconds, with lines
// for the bias (solid) and the limits of agreement (dashed), and zero
// (thin grey) for reference (Bland & Altman 1986, Figure 2).
func BlandAltmanPlot(r *Report) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = fmt.Sprintf("Handling time: %s (B) vs %s (A), %d matched landings",
		filepath.Base(r.B.Name), filepath.Base(r.A.Name), len(r.Matches))
	p.X.Label.Text = "Mean handling time (A + B) / 2 (s)"
	p.Y.Label.Text = "Difference B - A (s)"
	p.Add(plotter.NewGrid())

	pts := make(plotter.XYs, len(r.Matches))
	xmin, xmax := math.Inf(1), math.Inf(-1)
	ymin, ymax := 0.0, 0.0
	for i, m := range r.Matches {
		pts[i].X = (m.DurationAS + m.DurationBS) / 2
		pts[i].Y = m.DurationBS - m.DurationAS
		xmin, xmax = math.Min(xmin, pts[i].X), math.Max(xmax, pts[i].X)
		ymin, ymax = math.Min(ymin, pts[i].Y), math.Max(ymax, pts[i].Y)
	}
	if len(pts) == 0 {
		xmin, xmax = 0, 1
		p.Title.Text += " (nothing to plot)"
	}
	if xmax-xmin < 1e-9 {
		xmin, xmax = xmin-0.5, xmax+0.5
	}
	pad := 0.05 * (xmax - xmin)
	x0, x1 := xmin-pad, xmax+pad

	ba := r.Durations
	hline := func(y float64, c color.Color, width vg.Length, dashes []vg.Length) (*plotter.Line, error) {
		l, err := plotter.NewLine(plotter.XYs{{X: x0, Y: y}, {X: x1, Y: y}})
		if err != nil {
			return nil, err
		}
		l.LineStyle.Color = c
		l.LineStyle.Width = width
		l.LineStyle.Dashes = dashes
		return l, nil
	}
	zero, err := hline(0, color.Gray{Y: 150}, vg.Points(0.75), nil)
	if err != nil {
		return nil, err
	}
	p.Add(zero)
	p.Legend.Add("no difference", zero)

	blue := color.RGBA{R: 31, G: 90, B: 180, A: 255}
	red := color.RGBA{R: 200, G: 50, B: 40, A: 255}
	var labels plotter.XYLabels
	if !math.IsNaN(ba.Bias) {
		bias, err := hline(ba.Bias, blue, vg.Points(1.5), nil)
		if err != nil {
			return nil, err
		}
		p.Add(bias)
		p.Legend.Add(fmt.Sprintf("bias %+.2f s", ba.Bias), bias)
		labels.XYs = append(labels.XYs, plotter.XY{X: x1, Y: ba.Bias})
		labels.Labels = append(labels.Labels, fmt.Sprintf("bias %+.2f", ba.Bias))
		ymin, ymax = math.Min(ymin, ba.Bias), math.Max(ymax, ba.Bias)
	}
	if !math.IsNaN(ba.SD) {
		dash := []vg.Length{vg.Points(6), vg.Points(4)}
		lo, err := hline(ba.Lower, red, vg.Points(1.25), dash)
		if err != nil {
			return nil, err
		}
		hi, err := hline(ba.Upper, red, vg.Points(1.25), dash)
		if err != nil {
			return nil, err
		}
		p.Add(lo, hi)
		p.Legend.Add(fmt.Sprintf("95%% limits of agreement %+.2f to %+.2f s (bias -/+ %.2f SD)", ba.Lower, ba.Upper, ba.Z), lo)
		labels.XYs = append(labels.XYs, plotter.XY{X: x1, Y: ba.Upper}, plotter.XY{X: x1, Y: ba.Lower})
		labels.Labels = append(labels.Labels, fmt.Sprintf("%+.2f", ba.Upper), fmt.Sprintf("%+.2f", ba.Lower))
		ymin, ymax = math.Min(ymin, ba.Lower), math.Max(ymax, ba.Upper)
	}
	if len(pts) > 0 {
		sc, err := plotter.NewScatter(pts)
		if err != nil {
			return nil, err
		}
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		sc.GlyphStyle.Radius = vg.Points(2.5)
		sc.GlyphStyle.Color = color.RGBA{R: 20, G: 20, B: 20, A: 200}
		p.Add(sc)
		p.Legend.Add("matched landing", sc)
	}
	if len(labels.XYs) > 0 {
		lb, err := plotter.NewLabels(labels)
		if err != nil {
			return nil, err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].XAlign = draw.XLeft
			lb.TextStyle[i].YAlign = draw.YCenter
			lb.TextStyle[i].Font.Size = vg.Points(9)
		}
		lb.Offset = vg.Point{X: vg.Points(3)}
		p.Add(lb)
	}
	// Room on the right for the line labels, and above for the legend.
	p.X.Min, p.X.Max = x0, x1+0.14*(x1-x0)
	yr := ymax - ymin
	if yr < 1e-9 {
		yr = 1
	}
	p.Y.Min, p.Y.Max = ymin-0.08*yr, ymax+0.35*yr
	p.Legend.Top = true
	p.Legend.Left = true
	p.Legend.Padding = vg.Points(3)
	p.Legend.TextStyle.Font.Size = vg.Points(9)
	p.Title.TextStyle.Font.Size = vg.Points(11)
	return p, nil
}

// WriteBlandAltmanPNG writes BlandAltmanPlot(r) as a 7 x 5 inch PNG at
// 96 dots per inch.
func (r *Report) WriteBlandAltmanPNG(w io.Writer) error {
	p, err := BlandAltmanPlot(r)
	if err != nil {
		return err
	}
	c := vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(plotWidth, plotHeight), vgimg.UseDPI(plotDPI))}
	p.Draw(draw.New(c))
	_, err = c.WriteTo(w)
	return err
}
