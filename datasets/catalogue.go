package datasets

import (
	"math"
	"math/rand/v2"
)

// Response is a target's dipole moment per unit primary field at angular
// frequency w, in m³.
type Response func(w float64) complex128

// Kind is one material + shape class of the object catalogue, with the
// ranges its examples are drawn from. Sizes are plausible ranges for the
// objects, chosen by us (approximate, from memory); conductivities come from
// the Conductivity table.
type Kind struct {
	Material, Shape string
	Keeper          bool       // worth digging in the demo's values
	Hazard          bool       // possible ordnance
	DepthCM         [2]float64 // burial depth range
	draw            func(rng *rand.Rand) Response
}

// Class is the joint class name, "material/shape".
func (k *Kind) Class() string { return k.Material + "/" + k.Shape }

func uniform(rng *rand.Rand, r [2]float64) float64 { return r[0] + (r[1]-r[0])*rng.Float64() }

// logUniform draws a scale parameter evenly in its logarithm.
func logUniform(rng *rand.Rand, r [2]float64) float64 {
	return math.Exp(uniform(rng, [2]float64{math.Log(r[0]), math.Log(r[1])}))
}

func sphere(a, sigma, mur float64) Response {
	return func(w float64) complex128 { return SphereMoment(w, a, sigma, mur) }
}

func poles(ps ...Pole) Response {
	return func(w float64) complex128 { return PolesMoment(ps, w) }
}

func sum(rs ...Response) Response {
	return func(w float64) complex128 {
		var z complex128
		for _, r := range rs {
			z += r(w)
		}
		return z
	}
}

func mm(v float64) float64 { return v / 1000 }

// Catalogue is the demo's object catalogue: trash, keepers, and a
// possible-ordnance class.
var Catalogue = []Kind{
	{Material: "iron", Shape: "nail", DepthCM: [2]float64{2, 25}, draw: func(rng *rand.Rand) Response {
		// An elongated ferrous object as the sphere of its volume; its
		// shape raises the apparent permeability (approximation).
		return sphere(mm(uniform(rng, [2]float64{2, 5})), Conductivity["iron"], uniform(rng, [2]float64{40, 160}))
	}},
	{Material: "iron", Shape: "fragment", DepthCM: [2]float64{2, 30}, draw: func(rng *rand.Rand) Response {
		return sphere(mm(logUniform(rng, [2]float64{3, 12})), Conductivity["iron"], uniform(rng, [2]float64{20, 120}))
	}},
	{Material: "steel", Shape: "cap", DepthCM: [2]float64{1, 15}, draw: func(rng *rand.Rand) Response {
		// A crown cap: a thin steel disc whose magnetic part reads as a
		// weakly permeable sphere (composite approximation).
		sigma := uniform(rng, [2]float64{4e6, 7e6})
		return sum(poles(DiscPoles(mm(uniform(rng, [2]float64{12.5, 14})), mm(uniform(rng, [2]float64{0.2, 0.3})), sigma)...),
			sphere(mm(uniform(rng, [2]float64{6, 8})), sigma, uniform(rng, [2]float64{4, 15})))
	}},
	{Material: "aluminium", Shape: "foil", DepthCM: [2]float64{1, 12}, draw: func(rng *rand.Rand) Response {
		return poles(DiscPoles(mm(logUniform(rng, [2]float64{4, 15})), mm(logUniform(rng, [2]float64{0.015, 0.06})), uniform(rng, [2]float64{30e6, 37.7e6}))...)
	}},
	{Material: "aluminium", Shape: "ring-pull", DepthCM: [2]float64{1, 15}, draw: func(rng *rand.Rand) Response {
		// The loop and the tongue of a can-end pull, in can-end alloy.
		sigma := uniform(rng, [2]float64{17e6, 22e6})
		loop := RingPole(mm(uniform(rng, [2]float64{5, 6.5})), mm(uniform(rng, [2]float64{0.4, 0.8})), sigma)
		tongue := DiscPoles(mm(uniform(rng, [2]float64{4, 6})), mm(uniform(rng, [2]float64{0.25, 0.35})), sigma)
		return poles(append(tongue, loop)...)
	}},
	{Material: "copper", Shape: "coin", Keeper: true, DepthCM: [2]float64{2, 25}, draw: func(rng *rand.Rand) Response {
		return poles(DiscPoles(mm(uniform(rng, [2]float64{8, 15})), mm(uniform(rng, [2]float64{1, 2})), uniform(rng, [2]float64{40e6, 59.6e6}))...)
	}},
	{Material: "bronze", Shape: "coin", Keeper: true, DepthCM: [2]float64{3, 25}, draw: func(rng *rand.Rand) Response {
		return poles(DiscPoles(mm(uniform(rng, [2]float64{9, 16})), mm(uniform(rng, [2]float64{1, 2.2})), uniform(rng, [2]float64{5e6, 9e6}))...)
	}},
	{Material: "silver", Shape: "coin", Keeper: true, DepthCM: [2]float64{3, 25}, draw: func(rng *rand.Rand) Response {
		return poles(DiscPoles(mm(uniform(rng, [2]float64{7, 14})), mm(uniform(rng, [2]float64{0.5, 1.5})), uniform(rng, [2]float64{40e6, 63e6}))...)
	}},
	{Material: "gold", Shape: "ring", Keeper: true, DepthCM: [2]float64{2, 25}, draw: func(rng *rand.Rand) Response {
		return poles(RingPole(mm(uniform(rng, [2]float64{7.5, 10.5})), mm(uniform(rng, [2]float64{0.8, 1.6})), uniform(rng, [2]float64{5e6, 16e6})))
	}},
	{Material: "silver", Shape: "ring", Keeper: true, DepthCM: [2]float64{2, 25}, draw: func(rng *rand.Rand) Response {
		return poles(RingPole(mm(uniform(rng, [2]float64{7.5, 10.5})), mm(uniform(rng, [2]float64{0.8, 1.6})), uniform(rng, [2]float64{40e6, 55e6})))
	}},
	{Material: "brass", Shape: "button", Keeper: true, DepthCM: [2]float64{2, 20}, draw: func(rng *rand.Rand) Response {
		return poles(DiscPoles(mm(uniform(rng, [2]float64{6, 12})), mm(uniform(rng, [2]float64{0.8, 2})), uniform(rng, [2]float64{12e6, 18e6}))...)
	}},
	{Material: "lead", Shape: "shot", Keeper: true, DepthCM: [2]float64{2, 30}, draw: func(rng *rand.Rand) Response {
		return sphere(mm(uniform(rng, [2]float64{4, 9})), Conductivity["lead"], 1)
	}},
	{Material: "steel", Shape: "ordnance", Hazard: true, DepthCM: [2]float64{15, 60}, draw: func(rng *rand.Rand) Response {
		// A steel-bodied projectile with a copper driving band: a permeable
		// conducting sphere of the body's volume plus a copper ring.
		a := mm(uniform(rng, [2]float64{20, 45}))
		band := RingPole(a, mm(uniform(rng, [2]float64{1.5, 3})), Conductivity["copper"])
		return sum(sphere(a, Conductivity["steel"], uniform(rng, [2]float64{60, 120})), poles(band))
	}},
}

// KindOf finds a catalogue kind by class name; nil if none.
func KindOf(class string) *Kind {
	for i := range Catalogue {
		if Catalogue[i].Class() == class {
			return &Catalogue[i]
		}
	}
	return nil
}
