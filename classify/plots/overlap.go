package plots

import (
	"fmt"
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
// axis, with the ambiguous ranges marked, and below it the entropy per bin
// in bits. unit names the axis, e.g. "display ID" or "phase at 9700 Hz
// (degrees)". Each class has its colour (ClassColours: hazards in the
// reserved red, the keepers and then the commonest trash named), stacked
// in one order in every bin, and the legend stands beside the panels.
func Overlap(w io.Writer, format string, r *overlap.Result, unit string, roles Roles) error {
	counts := map[string]int{}
	for _, b := range r.Bins {
		for _, c := range b.Classes {
			counts[c.Class] += c.Digs
		}
	}
	colours := ClassColours(counts, roles)
	order := stackOrder(counts, colours, roles)
	top := newPlot(fmt.Sprintf("What came out of the ground at each %s: share of digs by class, bins of %g", unit, r.Width), "", "share of digs")
	bottom := newPlot("How mixed is each bin? Entropy of its class shares, in bits (0: one class only)", unit, "entropy (bits)")
	bars, shade, shadeLow, line := overlapMarks(r, order, colours)
	top.Add(shade, bars)
	// Headroom above the bars for the ambiguous-range strip.
	top.Y.Min, top.Y.Max = 0, 1.1
	top.Y.Tick.Marker = plot.ConstantTicks{{Value: 0, Label: "0"}, {Value: 0.25}, {Value: 0.5, Label: "0.5"}, {Value: 0.75}, {Value: 1, Label: "1"}}
	l, err := plotter.NewLine(line)
	if err != nil {
		return err
	}
	l.LineStyle.Width = vg.Points(1.5)
	l.LineStyle.Color = color.Black
	bottom.Add(shadeLow, l)
	bottom.Y.Min = 0
	bottom.Y.Tick.Marker = stepTicks(0.5)
	for _, p := range []*plot.Plot{top, bottom} {
		p.X.Min, p.X.Max = r.Bins[0].From, r.Bins[len(r.Bins)-1].From+r.Width
		p.X.Tick.Marker = tensTicks{}
	}
	leg := newLegend()
	if len(r.Ranges) > 0 {
		leg.Add("ambiguous range (strip above)", swatch{stripGrey})
		leg.Add("ambiguous range (band below)", swatch{shadeGrey})
	}
	pooled, pooledKeeper := 0, false
	for _, c := range order {
		if _, ok := colours[c]; !ok {
			pooled++
			pooledKeeper = pooledKeeper || slices.Contains(roles.Keepers, c)
		}
	}
	// The legend reads down as the stack reads down: its top class first.
	switch {
	case pooled > 0 && pooledKeeper:
		leg.Add(fmt.Sprintf("%d more classes", pooled), swatch{otherGrey})
	case pooled > 0:
		leg.Add(fmt.Sprintf("other trash (%d least dug classes)", pooled), swatch{otherGrey})
	}
	for i := len(order) - 1; i >= 0; i-- {
		if col, ok := colours[order[i]]; ok {
			leg.Add(order[i], swatch{col})
		}
	}
	return render(w, format, 12*vg.Inch, 7*vg.Inch, func(dc draw.Canvas) {
		dc = legendColumn(dc, leg)
		tiles := draw.Tiles{Rows: 2, Cols: 1, PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(8), PadY: vg.Points(12)}
		canvases := plot.Align([][]*plot.Plot{{top}, {bottom}}, tiles, dc)
		top.Draw(canvases[0][0])
		bottom.Draw(canvases[1][0])
	})
}

// stackOrder is the order classes are stacked in, from the bottom:
// hazards, keepers, then the rest by count; classes without a colour
// (drawn as one grey "other") last.
func stackOrder(counts map[string]int, colours map[string]color.Color, roles Roles) []string {
	rank := func(c string) int {
		switch {
		case slices.Contains(roles.Hazards, c):
			return 0
		case slices.Contains(roles.Keepers, c):
			return 1
		}
		if _, ok := colours[c]; ok {
			return 2
		}
		return 3
	}
	names := make([]string, 0, len(counts))
	for c := range counts {
		names = append(names, c)
	}
	sort.Slice(names, func(i, j int) bool {
		if ri, rj := rank(names[i]), rank(names[j]); ri != rj {
			return ri < rj
		}
		if counts[names[i]] != counts[names[j]] {
			return counts[names[i]] > counts[names[j]]
		}
		return names[i] < names[j]
	})
	return names
}

// overlapMarks are the stacked bars, the ambiguous ranges' strip (top
// panel) and band (bottom panel), and the entropy line.
func overlapMarks(r *overlap.Result, order []string, colours map[string]color.Color) (bars, shade, shadeLow *rects, line plotter.XYs) {
	bars, shade, shadeLow = &rects{}, &rects{}, &rects{}
	var maxH float64
	for _, b := range r.Bins {
		maxH = max(maxH, b.Entropy)
	}
	// A whole-number axis's bins have inclusive upper bounds: "60 to 61"
	// covers [60, 62). A continuous axis's do not.
	whole := r.Bins[0].To-r.Bins[0].From < r.Width
	for _, rg := range r.Ranges {
		hi := rg.To
		if whole {
			hi = rg.To + 1
		}
		shade.add(rg.From, hi, 1.03, 1.09, stripGrey)
		shadeLow.add(rg.From, hi, 0, max(maxH*1.05, 1), shadeGrey)
	}
	gap := r.Width * 0.08
	for _, b := range r.Bins {
		share := map[string]float64{}
		for _, c := range b.Classes {
			share[c.Class] = c.Share
		}
		y, other := 0.0, 0.0
		for _, c := range order {
			if col, ok := colours[c]; ok {
				bars.add(b.From+gap, b.From+r.Width-gap, y, y+share[c], col)
				y += share[c]
			} else {
				other += share[c]
			}
		}
		if other > 0 {
			bars.add(b.From+gap, b.From+r.Width-gap, y, y+other, otherGrey)
		}
		line = append(line, plotter.XY{X: b.From + r.Width/2, Y: b.Entropy})
	}
	return bars, shade, shadeLow, line
}

// tensTicks marks the single-number axis every 10 units (a display ID or
// degrees of phase), labelled every 10, or every 50 with unlabelled
// marks between when the axis is long.
type tensTicks struct{}

func (tensTicks) Ticks(lo, hi float64) []plot.Tick {
	label := 10.0
	if (hi-lo)/10 > 24 {
		label = 50
	}
	if (hi-lo)/10 > 120 {
		// A wide axis in other units: nice steps, about ten of them.
		return stepTicks((hi-lo)/10).Ticks(lo, hi)
	}
	var ticks []plot.Tick
	for v := math.Ceil(lo/10) * 10; v <= hi; v += 10 {
		t := plot.Tick{Value: v}
		if math.Mod(v, label) == 0 {
			t.Label = strconv.FormatFloat(v, 'f', -1, 64)
		}
		ticks = append(ticks, t)
	}
	return ticks
}

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
