package plots

import (
	"fmt"
	"image/color"
	"io"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Spectra draws, per class, the phase against frequency: the median and the
// inter-quartile band over that class's digs, in small multiples, each in
// its class's colour (ClassColours; hazards red). phases[i] holds dig i's
// phase at each of freqs; y its class index.
func Spectra(w io.Writer, format string, freqs []int, classes []string, phases [][]float64, y []int32, roles Roles) error {
	counts := map[string]int{}
	for _, c := range y {
		counts[classes[c]]++
	}
	colours := ClassColours(counts, roles)
	cols := 4
	rows := (len(classes) + cols - 1) / cols
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
	}
	for k, class := range classes {
		p := newPlot(fmt.Sprintf("%s (%d digs)", class, counts[class]), "frequency (Hz)", "phase (°)")
		col, ok := colours[class]
		if !ok {
			col = color.Gray{Y: 0x55}
		}
		p.Title.TextStyle.Font.Size = 10
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = freqTicks(freqs)
		var med, q1, q3 plotter.XYs
		for j, hz := range freqs {
			var v []float64
			for i, c := range y {
				if int(c) == k {
					v = append(v, phases[i][j])
				}
			}
			if len(v) == 0 {
				continue
			}
			slices.Sort(v)
			x := float64(hz)
			med = append(med, plotter.XY{X: x, Y: quantile(v, 0.5)})
			q1 = append(q1, plotter.XY{X: x, Y: quantile(v, 0.25)})
			q3 = append(q3, plotter.XY{X: x, Y: quantile(v, 0.75)})
		}
		if len(med) > 0 {
			band := append(plotter.XYs{}, q1...)
			for i := len(q3) - 1; i >= 0; i-- {
				band = append(band, q3[i])
			}
			poly, err := plotter.NewPolygon(band)
			if err != nil {
				return err
			}
			cr, cg, cb, _ := col.RGBA()
			// Not premultiplied: the class's colour at about a third.
			poly.Color = color.NRGBA{uint8(cr >> 8), uint8(cg >> 8), uint8(cb >> 8), 0x55}
			poly.LineStyle.Width = 0
			l, err := plotter.NewLine(med)
			if err != nil {
				return err
			}
			l.LineStyle.Width = vg.Points(1.5)
			l.LineStyle.Color = col
			p.Add(poly, l)
		}
		p.Y.Min, p.Y.Max = -10, 190
		grid[k/cols][k%cols] = p
	}
	for r := range grid {
		for c := range grid[r] {
			if grid[r][c] == nil {
				grid[r][c] = blank()
			}
		}
	}
	return render(w, format, 12*vg.Inch, vg.Length(rows)*2.6*vg.Inch+0.6*vg.Inch, func(dc draw.Canvas) {
		dc = pictureTitle(dc, "What does each class read across frequency? Phase of your digs: median (line) and middle half (band)")
		tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(10), PadY: vg.Points(10), PadLeft: vg.Points(4), PadRight: vg.Points(8), PadBottom: vg.Points(4)}
		canvases := plot.Align(grid, tiles, dc)
		for r := range grid {
			for c := range grid[r] {
				grid[r][c].Draw(canvases[r][c])
			}
		}
	})
}
