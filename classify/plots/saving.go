package plots

import (
	"fmt"
	"io"

	"github.com/spade-detect/spade/train"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// DigSaving draws the dig-saving curve: the share of trash digs that could
// have been left in the ground (y) against the share of keepers still dug
// (x), for spade and for the one number, on the same held-out digs
// (train.SavingCurves). The points at marks (0.95, 0.99, 1) are labelled
// with their figures. Higher is better: more trash skipped for the same
// keepers.
func DigSaving(w io.Writer, format string, model, oneNumber []train.SavingPoint, marks []float64) error {
	p := newPlot("How much digging would spade have saved you? Held-out digs", "share of your keepers still dug", "share of trash digs left in the ground")
	leg := newLegend()
	for _, c := range []struct {
		name   string
		points []train.SavingPoint
	}{{"spade", model}, {"your detector's one number", oneNumber}} {
		if len(c.points) == 0 {
			continue
		}
		var xy plotter.XYs
		labels := plotter.XYLabels{}
		for _, sp := range c.points {
			if sp.Keepers == 0 || sp.Trash == 0 {
				continue
			}
			xy = append(xy, plotter.XY{X: sp.Keep, Y: sp.TrashSkipped})
			for _, m := range marks {
				if sp.Keep == m {
					labels.XYs = append(labels.XYs, plotter.XY{X: sp.Keep, Y: sp.TrashSkipped})
					labels.Labels = append(labels.Labels, fmt.Sprintf(" %.0f%%", 100*sp.TrashSkipped))
				}
			}
		}
		if len(xy) == 0 {
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return err
		}
		col := spadeBlue
		if c.name != "spade" {
			col = oneNumberOrange
			l.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		}
		l.LineStyle.Color, l.LineStyle.Width = col, vg.Points(2)
		p.Add(l)
		leg.Add(c.name, l)
		if len(labels.XYs) > 0 {
			s, err := plotter.NewScatter(labels)
			if err != nil {
				return err
			}
			s.Color, s.Shape, s.Radius = col, draw.CircleGlyph{}, vg.Points(3.5)
			lb, err := plotter.NewLabels(labels)
			if err != nil {
				return err
			}
			for i := range lb.TextStyle {
				lb.TextStyle[i].Font.Size = 9
				lb.TextStyle[i].Color = col
			}
			p.Add(s, lb)
		}
	}
	leg.Add("(dots: keeping 95, 99 and 100%)")
	p.Add(plotter.NewGrid())
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0.5, 1.0, 0, 1
	p.X.Tick.Marker = plot.ConstantTicks{{Value: 0.5, Label: "50%"}, {Value: 0.6, Label: "60%"}, {Value: 0.7, Label: "70%"}, {Value: 0.8, Label: "80%"}, {Value: 0.9, Label: "90%"}, {Value: 1, Label: "100%"}}
	p.Y.Tick.Marker = plot.ConstantTicks{{Value: 0, Label: "0%"}, {Value: 0.25, Label: "25%"}, {Value: 0.5, Label: "50%"}, {Value: 0.75, Label: "75%"}, {Value: 1, Label: "100%"}}
	return render(w, format, 9*vg.Inch, 6*vg.Inch, func(dc draw.Canvas) { p.Draw(legendColumn(dc, leg)) })
}
