package main

import (
	"context"
	"fmt"
	"io"
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

func newResponseCommand(g *globalOptions) *cobra.Command {
	var opts responseOptions
	return withFlags(&cobra.Command{
		Use:   "response",
		Short: "Show the modelled response of a described object at given frequencies",
		Long: `response answers "what would this object read at my frequencies?" with spade's
forward models: the exact conducting, permeable sphere (Wait 1951), a thin ring
as one pole with tau = L/R (Grover's inductance), or a thin disc as coupled rings.

x is the in-phase part and r the quadrature part (r >= 0 when lossy), phase =
atan2(r, x) in degrees (0 ferrite, 90 weak conductor, 180 perfect conductor),
amp = hypot(x, r). For a sphere x - ir is Wait's normalised X (moment 2πa³·X);
a ring's or disc's moment is divided by the same 2πa³, a = diameter/2.

Materials: ` + datasets.MaterialNames() + ` (CRC Handbook at 20 °C; the alloys typical).`,
		Example: "  spade response --shape disc --material copper --diameter-mm 20 --thickness-mm 1.5\n" +
			"  spade response --shape ring --material gold --diameter-mm 18 --wire-mm 2 --format json\n" +
			"  spade response --shape sphere --sigma 1e7 --mur 100 --diameter-mm 8 --freqs 1k,15k",
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error { return runResponse(cmd.Context(), g, opts) },
	}, &opts)
}

func runResponse(_ context.Context, g *globalOptions, o responseOptions) error {
	freqs, err := parseFreqList(o.freqs)
	if err != nil {
		return err
	}
	if len(freqs) == 0 {
		return usagef("--freqs: give at least one frequency")
	}
	obj := datasets.Object{Shape: o.shape, Material: o.material, Sigma: o.sigma, MuR: o.mur,
		Diameter: o.diameterMM / 1000, Wire: o.wireMM / 1000, Thickness: o.thickMM / 1000}
	rows, err := obj.Response(freqs)
	if err != nil {
		return usageError{Err: err}
	}
	return g.writeOutput("-", func(w io.Writer) error {
		switch o.format {
		case "json":
			return writeJSON(w, rows)
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
