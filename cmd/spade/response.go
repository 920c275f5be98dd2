package main

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/spade-detect/spade/datasets"
	"github.com/spf13/cobra"
	"github.com/spf13/pflag"
)

type responseOptions struct {
	shape      string
	material   string
	sigma      float64
	mur        float64
	diameterMM float64
	wireMM     float64
	thickMM    float64
	freqs      string
	format     string
}

func (o *responseOptions) AddFlags(fs *pflag.FlagSet) {
	fs.StringVar(&o.shape, "shape", "sphere", "sphere, ring or disc")
	fs.StringVar(&o.material, "material", "", "a metal from the conductivity table (see the help)")
	fs.Float64Var(&o.sigma, "sigma", 0, "conductivity in `S/m` (instead of --material)")
	fs.Float64Var(&o.mur, "mur", 0, "relative permeability (default: the material's, else 1)")
	fs.Float64Var(&o.diameterMM, "diameter-mm", 20, "outer diameter in millimetres (a ring: of the wire's centre line)")
	fs.Float64Var(&o.wireMM, "wire-mm", 1.5, "ring: wire diameter in millimetres")
	fs.Float64Var(&o.thickMM, "thickness-mm", 1.5, "disc: thickness in millimetres")
	fs.StringVar(&o.freqs, "freqs", "4300,9700,21700,36300", "frequencies in hertz, comma separated")
	fs.StringVar(&o.format, "format", "table", "table or json")
}

func materialNames() string {
	var names []string
	for m := range datasets.Conductivity {
		names = append(names, m)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

func newResponseCommand(g *globalOptions) *cobra.Command {
	var opts responseOptions
	cmd := &cobra.Command{
		Use:   "response",
		Short: "Show the modelled response of a described object at given frequencies",
		Long: `response answers "what would this object read at my frequencies?" with spade's
forward models: the exact conducting, permeable sphere (Wait 1951), a thin ring
as one pole with tau = L/R (Grover's inductance), or a thin disc as coupled rings.

x is the in-phase part and r the quadrature part (r >= 0 when lossy), phase =
atan2(r, x) in degrees (0 ferrite, 90 weak conductor, 180 perfect conductor),
amp = hypot(x, r). For a sphere x - ir is Wait's normalised X (moment 2πa³·X);
a ring's or disc's moment is divided by the same 2πa³, a = diameter/2.

Materials: ` + materialNames() + ` (CRC Handbook at 20 °C; the alloys typical).`,
		Example: "  spade response --shape disc --material copper --diameter-mm 20 --thickness-mm 1.5\n" +
			"  spade response --shape ring --material gold --diameter-mm 18 --wire-mm 2 --format json\n" +
			"  spade response --shape sphere --sigma 1e7 --mur 100 --diameter-mm 8 --freqs 1k,15k",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runResponse(cmd.Context(), g, opts) },
	}
	opts.AddFlags(cmd.Flags())
	return cmd
}

type responseRow struct {
	Hz    int     `json:"hz"`
	X     float64 `json:"x"`
	R     float64 `json:"r"`
	Phase float64 `json:"phase"`
	Amp   float64 `json:"amp"`
}

func runResponse(_ context.Context, g *globalOptions, o responseOptions) error {
	freqs, err := parseFreqList(o.freqs)
	if err != nil {
		return err
	}
	if len(freqs) == 0 {
		return usagef("--freqs: give at least one frequency")
	}
	sigma, mur := o.sigma, o.mur
	if o.material != "" {
		s, ok := datasets.Conductivity[strings.ToLower(o.material)]
		if !ok {
			return usagef("--material: unknown %q (have %s)", o.material, materialNames())
		}
		if sigma == 0 {
			sigma = s
		}
		if mur == 0 {
			mur = datasets.RelativePermeability[strings.ToLower(o.material)]
		}
	}
	if mur == 0 {
		mur = 1
	}
	if sigma < 0 || mur < 1 || o.diameterMM <= 0 || o.wireMM <= 0 || o.thickMM <= 0 {
		return usagef("need --sigma >= 0, --mur >= 1 and positive sizes")
	}
	if sigma == 0 && mur == 1 {
		return usagef("a non-conducting, non-magnetic object has no response: give --material, --sigma or --mur")
	}
	if sigma == 0 && o.shape != "sphere" {
		return usagef("a %s needs a conductivity: --material or --sigma", o.shape)
	}
	a := o.diameterMM / 2000
	var moment func(w float64) complex128
	switch o.shape {
	case "sphere":
		moment = func(w float64) complex128 { return datasets.SphereX(w, a, sigma, mur) }
	case "ring":
		if o.wireMM >= o.diameterMM {
			return usagef("--wire-mm must be smaller than --diameter-mm")
		}
		p := datasets.RingPole(a, o.wireMM/2000, sigma)
		moment = func(w float64) complex128 { return p.Eval(w) / complex(2*math.Pi*a*a*a, 0) }
	case "disc":
		ps := datasets.DiscPoles(a, o.thickMM/1000, sigma)
		moment = func(w float64) complex128 { return datasets.PolesMoment(ps, w) / complex(2*math.Pi*a*a*a, 0) }
	default:
		return usagef("--shape: want sphere, ring or disc, got %q", o.shape)
	}
	rows := make([]responseRow, len(freqs))
	for i, hz := range freqs {
		z := moment(2 * math.Pi * float64(hz))
		x, r := real(z), -imag(z)
		rows[i] = responseRow{Hz: hz, X: x, R: r, Phase: math.Atan2(r, x) * 180 / math.Pi, Amp: math.Hypot(x, r)}
	}
	return g.writeOutput("-", func(w io.Writer) error {
		switch o.format {
		case "json":
			enc := json.NewEncoder(w)
			enc.SetIndent("", "  ")
			return enc.Encode(rows)
		case "table":
			tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
			fmt.Fprintln(tw, "hz\tx\tr\tphase°\tamp\t")
			for _, r := range rows {
				fmt.Fprintf(tw, "%d\t%.5f\t%.5f\t%.2f\t%.5f\t\n", r.Hz, r.X, r.R, r.Phase, r.Amp)
			}
			return tw.Flush()
		default:
			return usagef("--format: want table or json, got %q", o.format)
		}
	})
}
