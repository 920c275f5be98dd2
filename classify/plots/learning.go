package plots

import (
	"io"

	"github.com/spade-detect/spade/train"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Learning draws the learning curve: held-out accuracy and log-loss
// against the digs learnt from (train.LearningPoint), in two panels, each
// with the one number's figure on all the digs as a dashed line to beat.
// A curve still climbing (accuracy) or falling (log-loss) at its right end
// says more digs would help.
func Learning(w io.Writer, format string, points []train.LearningPoint, oneNumber train.Metrics) error {
	acc := newPlot("Accuracy (higher is better)", "digs learnt from", "share named right")
	loss := newPlot("Log-loss (lower is better)", "digs learnt from", "log-loss")
	var accXY, lossXY plotter.XYs
	for _, p := range points {
		accXY = append(accXY, plotter.XY{X: float64(p.Digs), Y: p.Accuracy})
		lossXY = append(lossXY, plotter.XY{X: float64(p.Digs), Y: p.LogLoss})
	}
	leg := newLegend()
	for i, panel := range []struct {
		p    *plot.Plot
		xy   plotter.XYs
		base float64
	}{{acc, accXY, oneNumber.Accuracy}, {loss, lossXY, oneNumber.LogLoss}} {
		if len(panel.xy) == 0 {
			continue
		}
		l, s, err := plotter.NewLinePoints(panel.xy)
		if err != nil {
			return err
		}
		l.LineStyle.Color, l.LineStyle.Width = spadeBlue, vg.Points(1.5)
		s.Color, s.Shape, s.Radius = spadeBlue, draw.CircleGlyph{}, vg.Points(3)
		lo, hi := panel.xy[0].X, panel.xy[len(panel.xy)-1].X
		b, err := plotter.NewLine(plotter.XYs{{X: lo, Y: panel.base}, {X: hi, Y: panel.base}})
		if err != nil {
			return err
		}
		b.LineStyle.Color, b.LineStyle.Width = oneNumberOrange, vg.Points(1.5)
		b.LineStyle.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
		panel.p.Add(plotter.NewGrid(), l, s, b)
		panel.p.Y.Min = 0
		if i == 0 {
			panel.p.Y.Max = 1
			leg.Add("spade, held out", l, s)
			leg.Add("your detector's one number,", b)
			leg.Add("  on all your digs")
		}
	}
	// Room above the higher of the two lines.
	loss.Y.Max = max(loss.Y.Max, 0.1) * 1.08
	return render(w, format, 12*vg.Inch, 4.5*vg.Inch, func(dc draw.Canvas) {
		dc = pictureTitle(dc, "Would more digs help? spade learning from more and more of your digs")
		dc = legendColumn(dc, leg)
		tiles := draw.Tiles{Rows: 1, Cols: 2, PadX: vg.Points(16), PadLeft: vg.Points(4), PadRight: vg.Points(4), PadBottom: vg.Points(4)}
		canvases := plot.Align([][]*plot.Plot{{acc, loss}}, tiles, dc)
		acc.Draw(canvases[0][0])
		loss.Draw(canvases[0][1])
	})
}
