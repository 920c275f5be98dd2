package plots

import (
	"image/color"
	"io"
	"math"
	"slices"
	"sort"
	"strconv"

	"github.com/spade-detect/spade/classify/overlap"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Overlap draws class shares per bin as stacked bars over the single-number
// axis, with the ambiguous ranges shaded, and below it the entropy per bin
// in bits. unit names the axis, e.g. "display ID" or "phase at 10 kHz (°)".
// Colours go first to the classes in first (hazards, then keepers), then to
// the commonest others, up to ten; the rest are drawn as "other trash".
func Overlap(w io.Writer, format string, r *overlap.Result, unit string, first []string) error {
	total := map[string]int{}
	for _, b := range r.Bins {
		for _, c := range b.Classes {
			total[c.Class] += c.Digs
		}
	}
	names := make([]string, 0, len(total))
	for c := range total {
		names = append(names, c)
	}
	rank := func(c string) int {
		if i := slices.Index(first, c); i >= 0 {
			return i
		}
		return len(first)
	}
	sort.Slice(names, func(i, j int) bool {
		if ri, rj := rank(names[i]), rank(names[j]); ri != rj {
			return ri < rj
		}
		if total[names[i]] != total[names[j]] {
			return total[names[i]] > total[names[j]]
		}
		return names[i] < names[j]
	})
	colour := map[string]color.Color{}
	for i, c := range names {
		if i < len(tolMuted) {
			colour[c] = tolMuted[i]
		}
	}
	top := newPlot("Which "+unit+" values could be anything? Class shares per bin (dark strip: ambiguous range)", "", "share of digs")
	bottom := newPlot("How mixed is each bin? Entropy of the class shares", unit, "entropy (bits)")
	shade, shadeLow := &rects{}, &rects{}
	var maxH float64
	for _, b := range r.Bins {
		maxH = max(maxH, b.Entropy)
	}
	for _, rg := range r.Ranges {
		hi := rg.To
		if hi == rg.From || isWhole(r.Width) {
			hi = rg.To + 1
		}
		if !isWhole(r.Width) {
			hi = rg.To
		}
		shade.add(rg.From, hi, 1.03, 1.09, stripGrey)
		shadeLow.add(rg.From, hi, 0, max(maxH*1.05, 1), shadeGrey)
	}
	bars := &rects{}
	gap := r.Width * 0.08
	var line plotter.XYs
	for _, b := range r.Bins {
		y := 0.0
		var other float64
		for _, c := range b.Classes {
			if col, ok := colour[c.Class]; ok {
				bars.add(b.From+gap, b.From+r.Width-gap, y, y+c.Share, col)
				y += c.Share
			} else {
				other += c.Share
			}
		}
		if other > 0 {
			bars.add(b.From+gap, b.From+r.Width-gap, y, y+other, otherGrey)
		}
		line = append(line, plotter.XY{X: b.From + r.Width/2, Y: b.Entropy})
	}
	top.Add(shade, bars)
	// Headroom above the bars for the strip and the legend; ticks on 0-1.
	top.Y.Min, top.Y.Max = 0, 1.75
	top.Y.Tick.Marker = plot.ConstantTicks{{Value: 0, Label: "0"}, {Value: 0.25}, {Value: 0.5, Label: "0.5"}, {Value: 0.75}, {Value: 1, Label: "1"}}
	if len(r.Ranges) > 0 {
		top.Legend.Add("ambiguous range", swatch{stripGrey})
	}
	for _, c := range names {
		if col, ok := colour[c]; ok {
			top.Legend.Add(c, swatch{col})
		}
	}
	if len(names) > len(tolMuted) {
		top.Legend.Add("other trash", swatch{otherGrey})
	}
	top.Legend.Top = true
	top.Legend.Left = true
	top.Legend.TextStyle.Font.Size = 8
	l, err := plotter.NewLine(line)
	if err != nil {
		return err
	}
	l.LineStyle.Width = vg.Points(1.5)
	l.LineStyle.Color = color.Black
	bottom.Add(shadeLow, l)
	bottom.Y.Min = 0
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = r.Bins[0].From, r.Bins[len(r.Bins)-1].From+r.Width
		p.X.Tick.Marker = stepTicks(r.Width * 5)
	}
	return render(w, format, 10*vg.Inch, 7*vg.Inch, func(dc draw.Canvas) {
		tiles := draw.Tiles{Rows: 2, Cols: 1, PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8), PadY: vg.Points(12)}
		canvases := plot.Align([][]*plot.Plot{{top}, {bottom}}, tiles, dc)
		top.Draw(canvases[0][0])
		bottom.Draw(canvases[1][0])
	})
}

func isWhole(v float64) bool { return v == float64(int64(v)) }

// stepTicks labels the axis every step units, rounded up to a nice step
// (overlap.NiceStep).
type stepTicks float64

func (s stepTicks) Ticks(lo, hi float64) []plot.Tick {
	step := overlap.NiceStep(float64(s))
	var ticks []plot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi; v += step {
		ticks = append(ticks, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', -1, 64)})
	}
	return ticks
}

// Spectra draws, per class, the phase against frequency: the median and the
// inter-quartile band over that class's digs, in small multiples.
// phases[i] holds dig i's phase at each of freqs; y its class index.
func Spectra(w io.Writer, format string, freqs []int, classes []string, phases [][]float64, y []int32) error {
	cols := 4
	rows := (len(classes) + cols - 1) / cols
	grid := make([][]*plot.Plot, rows)
	for r := range grid {
		grid[r] = make([]*plot.Plot, cols)
	}
	for k, class := range classes {
		p := newPlot(class, "frequency (Hz)", "phase (°)")
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
			poly.Color = color.NRGBA{0x56, 0xB4, 0xE9, 0x90} // not premultiplied: sky blue at about half opacity
			poly.LineStyle.Width = 0
			l, err := plotter.NewLine(med)
			if err != nil {
				return err
			}
			l.LineStyle.Width = vg.Points(1.5)
			l.LineStyle.Color = okabeIto[4]
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
		title := "What does each class read across frequency? Phase: median (line) and middle half (band) of your digs"
		titleFont := plot.DefaultFont
		titleFont.Size = vg.Points(12)
		dc.FillText(draw.TextStyle{Color: color.Black, Font: titleFont, Handler: plot.DefaultTextHandler, XAlign: draw.XCenter},
			vg.Point{X: (dc.Min.X + dc.Max.X) / 2, Y: dc.Max.Y - vg.Points(16)}, title)
		dc.Max.Y -= vg.Points(24)
		tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Points(10), PadY: vg.Points(10), PadLeft: vg.Points(4), PadRight: vg.Points(8), PadBottom: vg.Points(4)}
		canvases := plot.Align(grid, tiles, dc)
		for r := range grid {
			for c := range grid[r] {
				grid[r][c].Draw(canvases[r][c])
			}
		}
	})
}

// blank is an empty tile for the grid's last row.
func blank() *plot.Plot {
	p := plot.New()
	p.HideAxes()
	return p
}

// freqTicks labels the log axis at the log's own frequencies.
func freqTicks(freqs []int) plot.ConstantTicks {
	var t plot.ConstantTicks
	for _, hz := range freqs {
		label := itoa(hz)
		if hz%1000 == 0 {
			label = itoa(hz/1000) + "k"
		}
		t = append(t, plot.Tick{Value: float64(hz), Label: label})
	}
	return t
}

func itoa(v int) string {
	if v == 0 {
		return "0"
	}
	var b []byte
	for ; v > 0; v /= 10 {
		b = append([]byte{byte('0' + v%10)}, b...)
	}
	return string(b)
}

// quantile of sorted values, linear between order statistics.
func quantile(sorted []float64, q float64) float64 {
	pos := q * float64(len(sorted)-1)
	lo := int(pos)
	if lo+1 >= len(sorted) {
		return sorted[len(sorted)-1]
	}
	f := pos - float64(lo)
	return sorted[lo]*(1-f) + sorted[lo+1]*f
}
