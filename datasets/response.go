package datasets

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"
)

// Object is a simple object described for Response: a sphere, a thin ring
// or a thin disc of a metal (Material, from Conductivity) or of a given
// conductivity and permeability.
type Object struct {
	Shape     string  // sphere, ring or disc
	Material  string  // a key of Conductivity, or "" with Sigma
	Sigma     float64 // S/m; 0 takes the material's
	MuR       float64 // relative permeability; 0 takes the material's, else 1
	Diameter  float64 // outer diameter in metres (a ring: of the wire's centre line)
	Wire      float64 // ring: wire diameter in metres
	Thickness float64 // disc: thickness in metres
}

// ResponseRow is an object's response at one frequency: x the in-phase
// and r the quadrature part (r >= 0 when lossy) of the moment over 2πa³
// (a the radius), phase = atan2(r, x) in degrees and amp = hypot(x, r).
type ResponseRow struct {
	Hz    int     `json:"hz"`
	X     float64 `json:"x"`
	R     float64 `json:"r"`
	Phase float64 `json:"phase"`
	Amp   float64 `json:"amp"`
}

// ErrObject is Response's refusal of an object it cannot model.
var ErrObject = errors.New("cannot model this object")

// MaterialNames lists Conductivity's metals, sorted.
func MaterialNames() string {
	var names []string
	for m := range Conductivity {
		names = append(names, m)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

// Response is the modelled response of o at each frequency (Hz): the exact
// conducting, permeable sphere (SphereX, after Wait 1951), a thin ring as
// one pole with tau = L/R (RingPole), or a thin disc as coupled rings
// (DiscPoles). A ring's or a disc's moment is divided by 2πa³ as Wait's
// normalised sphere moment is.
func (o Object) Response(freqs []int) ([]ResponseRow, error) {
	moment, err := o.moment()
	if err != nil {
		return nil, err
	}
	rows := make([]ResponseRow, len(freqs))
	for i, hz := range freqs {
		z := moment(2 * math.Pi * float64(hz))
		x, r := real(z), -imag(z)
		rows[i] = ResponseRow{Hz: hz, X: x, R: r, Phase: math.Atan2(r, x) * 180 / math.Pi, Amp: math.Hypot(x, r)}
	}
	return rows, nil
}

func (o Object) moment() (func(w float64) complex128, error) {
	sigma, mur := o.Sigma, o.MuR
	if o.Material != "" {
		s, ok := Conductivity[strings.ToLower(o.Material)]
		if !ok {
			return nil, fmt.Errorf("%w: unknown material %q (have %s)", ErrObject, o.Material, MaterialNames())
		}
		if sigma == 0 {
			sigma = s
		}
		if mur == 0 {
			mur = RelativePermeability[strings.ToLower(o.Material)]
		}
	}
	if mur == 0 {
		mur = 1
	}
	switch {
	case sigma < 0 || mur < 1 || o.Diameter <= 0 || o.Wire <= 0 || o.Thickness <= 0:
		return nil, fmt.Errorf("%w: need a conductivity >= 0, a relative permeability >= 1 and positive sizes", ErrObject)
	case sigma == 0 && mur == 1:
		return nil, fmt.Errorf("%w: a non-conducting, non-magnetic object has no response; give a material, a conductivity or a permeability", ErrObject)
	case sigma == 0 && o.Shape != "sphere":
		return nil, fmt.Errorf("%w: a %s needs a conductivity", ErrObject, o.Shape)
	}
	a := o.Diameter / 2
	norm := complex(2*math.Pi*a*a*a, 0)
	switch o.Shape {
	case "sphere":
		return func(w float64) complex128 { return SphereX(w, a, sigma, mur) }, nil
	case "ring":
		if o.Wire >= o.Diameter {
			return nil, fmt.Errorf("%w: the wire must be thinner than the ring's diameter", ErrObject)
		}
		p := RingPole(a, o.Wire/2, sigma)
		return func(w float64) complex128 { return p.Eval(w) / norm }, nil
	case "disc":
		ps := DiscPoles(a, o.Thickness, sigma)
		return func(w float64) complex128 { return PolesMoment(ps, w) / norm }, nil
	}
	return nil, fmt.Errorf("%w: shape: want sphere, ring or disc, got %q", ErrObject, o.Shape)
}
