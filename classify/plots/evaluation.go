package plots

import (
	"fmt"
	"image/color"
	"io"

	"github.com/spade-detect/spade/train"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Reliability draws the reliability diagram: for predictions whose top
// probability fell in each bin, the mean probability against the share that
// were right. On the diagonal, "70 %" means right seven times in ten. The
// legend stands beside the square.
func Reliability(w io.Writer, format string, bins []train.ReliabilityBin) error {
	p := newPlot("When spade says p, how often is it right? Held-out digs", "spade's probability for its top class", "share of those digs it got right")
	diag, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 1}})
	if err != nil {
		return err
	}
	diag.LineStyle.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	diag.LineStyle.Color = color.Gray{Y: 0x80}
	var pts plotter.XYs
	labels := plotter.XYLabels{}
	for _, b := range bins {
		if b.Count == 0 {
			continue
		}
		pts = append(pts, plotter.XY{X: b.Confidence, Y: b.Accuracy})
		labels.XYs = append(labels.XYs, plotter.XY{X: b.Confidence, Y: b.Accuracy})
		labels.Labels = append(labels.Labels, fmt.Sprintf(" %d", b.Count))
	}
	p.Add(diag)
	leg := newLegend()
	if len(pts) > 0 {
		l, s, err := plotter.NewLinePoints(pts)
		if err != nil {
			return err
		}
		l.LineStyle.Color = spadeBlue
		s.Color = spadeBlue
		s.Shape = draw.CircleGlyph{}
		s.Radius = vg.Points(3.5)
		lb, err := plotter.NewLabels(labels)
		if err != nil {
			return err
		}
		for i := range lb.TextStyle {
			lb.TextStyle[i].Font.Size = 8
		}
		p.Add(l, s, lb)
		leg.Add("spade", l, s)
		leg.Add("(numbers: digs in the bin)")
	}
	leg.Add("right as often as it says", diag)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, 1, 0, 1
	return render(w, format, 8.5*vg.Inch, 6*vg.Inch, func(dc draw.Canvas) { p.Draw(legendColumn(dc, leg)) })
}

// confusionGrid is the confusion matrix row-normalised: each true class's
// digs split over the predicted classes.
type confusionGrid struct {
	classes []string
	share   [][]float64 // [true][predicted]
}

func (g confusionGrid) Dims() (c, r int)   { return len(g.classes), len(g.classes) }
func (g confusionGrid) Z(c, r int) float64 { return g.share[len(g.classes)-1-r][c] }
func (g confusionGrid) X(c int) float64    { return float64(c) }
func (g confusionGrid) Y(r int) float64    { return float64(r) }

// blues is a one-hue sequential palette, white to dark blue, readable by
// colour-blind readers and in grey print.
type blues struct{}

func (blues) Colors() []color.Color {
	var out []color.Color
	for i := range 64 {
		t := float64(i) / 63
		out = append(out, color.RGBA{uint8(247 - t*239), uint8(251 - t*203), uint8(255 - t*148), 0xFF})
	}
	return out
}

// Confusion draws the confusion matrix as a heat map: rows the true class,
// columns what spade called it, each row as shares of that class's digs.
func Confusion(w io.Writer, format string, classes []string, cm map[string]map[string]int) error {
	K := len(classes)
	g := confusionGrid{classes: classes, share: make([][]float64, K)}
	labels := plotter.XYLabels{}
	for i, t := range classes {
		g.share[i] = make([]float64, K)
		var n int
		for _, v := range cm[t] {
			n += v
		}
		for j, pc := range classes {
			if n > 0 {
				g.share[i][j] = float64(cm[t][pc]) / float64(n)
			}
			if cm[t][pc] > 0 {
				labels.XYs = append(labels.XYs, plotter.XY{X: float64(j), Y: float64(K - 1 - i)})
				labels.Labels = append(labels.Labels, fmt.Sprint(cm[t][pc]))
			}
		}
	}
	p := newPlot("What is each class taken for? Numbers: held-out digs; colour: share of the row", "what spade called it", "what came out of the ground")
	hm := plotter.NewHeatMap(g, blues{})
	hm.Min, hm.Max = 0, 1
	lb, err := plotter.NewLabels(labels)
	if err != nil {
		return err
	}
	for i := range lb.TextStyle {
		lb.TextStyle[i].Font.Size = 7
		lb.TextStyle[i].XAlign = draw.XCenter
		lb.TextStyle[i].YAlign = draw.YCenter
		if g.share[K-1-int(labels.XYs[i].Y)][int(labels.XYs[i].X)] > 0.5 {
			lb.TextStyle[i].Color = color.White
		}
	}
	p.Add(hm, lb)
	rev := make([]string, K)
	for i, c := range classes {
		rev[K-1-i] = c
	}
	p.NominalX(classes...)
	p.NominalY(rev...)
	p.X.Tick.Label.Rotation = 0.8
	p.X.Tick.Label.XAlign = draw.XRight
	p.X.Tick.Label.YAlign = draw.YCenter
	return render(w, format, 9*vg.Inch, 8*vg.Inch, func(dc draw.Canvas) { p.Draw(dc) })
}

var _ plot.Plotter = (*rects)(nil)
