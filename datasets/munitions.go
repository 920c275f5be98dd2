package datasets

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"

	"github.com/spade-detect/spade/features"
)

// LibraryVersion names the munitions library below; a model records it, and
// any change to the library's kinds or ranges changes it.
const LibraryVersion = "munitions-1"

// Cast iron, typical values, approximate and from memory: grey cast iron's
// resistivity is about 0.7-1 µΩ·m, and its bulk permeability is lower than
// mild steel's.
var (
	castIronSigma = [2]float64{1.0e6, 1.5e6}
	castIronMur   = [2]float64{40, 150}
	steelSigma    = [2]float64{4e6, 7e6}
	steelMur      = [2]float64{50, 200}
	// Gilding metal (copper with 5-10 % zinc), typical, from memory.
	gildingSigma = [2]float64{20e6, 30e6}
	fuzeBrass    = [2]float64{12e6, 18e6}
	fuzeAlloy    = [2]float64{17e6, 30e6}
)

// Munition is one kind of the munitions library: a family of bodies with the
// ranges its examples are drawn from. The ranges are plausible for the
// family (approximate, from memory, and chosen by us); no particular store
// is modelled. Group is what the library's held-out figures leave out at a
// time: a family within a calibre range.
type Munition struct {
	Name    string
	Group   string
	Calibre [2]float64 // body diameter, mm
	Aspect  [2]float64 // length over diameter
	DepthCM [2]float64
	Body    func(rng *rand.Rand) (sigma, mur float64)
	// Band, when set, draws a driving band's conductivity; nil for none.
	Band func(rng *rand.Rand) float64
	// Weight is the kind's share of the library relative to the others
	// (0 means 1).
	Weight float64
}

func steelBody(rng *rand.Rand) (float64, float64) {
	return uniform(rng, steelSigma), uniform(rng, steelMur)
}

func castIronBody(rng *rand.Rand) (float64, float64) {
	return uniform(rng, castIronSigma), uniform(rng, castIronMur)
}

func ironOrSteelBody(rng *rand.Rand) (float64, float64) {
	if rng.IntN(2) == 0 {
		return castIronBody(rng)
	}
	return steelBody(rng)
}

func copperOrGildingBand(rng *rand.Rand) float64 {
	if rng.IntN(2) == 0 {
		return Conductivity["copper"]
	}
	return uniform(rng, gildingSigma)
}

// Munitions is the library: projectiles with steel bodies, with and without
// a copper or gilding-metal driving band, in three calibre ranges from 20 to
// 155 mm; mortar bombs and grenades with cast-iron or steel bodies, and
// cast-iron round shot; fuze bodies of brass and of aluminium alloy. Every
// one is modelled by the same physics: a prolate spheroid's two principal
// polarizabilities (SpheroidPolarizabilities), tilted at random, plus for a
// band a thin ring (RingPole, Grover 1946) around the axis.
var Munitions = []Munition{
	{Name: "projectile, steel body, driving band", Group: "banded projectile 20-40 mm", Calibre: [2]float64{20, 40}, Aspect: [2]float64{3, 4.5}, DepthCM: [2]float64{5, 60}, Body: steelBody, Band: copperOrGildingBand},
	{Name: "projectile, steel body, driving band", Group: "banded projectile 40-90 mm", Calibre: [2]float64{40, 90}, Aspect: [2]float64{3, 4.5}, DepthCM: [2]float64{10, 100}, Body: steelBody, Band: copperOrGildingBand},
	{Name: "projectile, steel body, driving band", Group: "banded projectile 90-155 mm", Calibre: [2]float64{90, 155}, Aspect: [2]float64{3, 4.5}, DepthCM: [2]float64{15, 150}, Body: steelBody, Band: copperOrGildingBand},
	// A shell's base with its band is a common find on old ranges and
	// battlefields (common practice, no source); whether it is only a
	// fragment cannot be told from a signal.
	{Name: "projectile base, steel, driving band", Group: "banded base 40-155 mm", Calibre: [2]float64{40, 155}, Aspect: [2]float64{1, 1.5}, DepthCM: [2]float64{5, 100}, Body: steelBody, Band: copperOrGildingBand},
	{Name: "projectile, steel body, no band", Group: "plain projectile 20-40 mm", Calibre: [2]float64{20, 40}, Aspect: [2]float64{3, 4.5}, DepthCM: [2]float64{5, 60}, Body: steelBody},
	{Name: "projectile, steel body, no band", Group: "plain projectile 40-155 mm", Calibre: [2]float64{40, 155}, Aspect: [2]float64{3, 4.5}, DepthCM: [2]float64{10, 150}, Body: steelBody},
	{Name: "mortar bomb, cast-iron or steel body", Group: "mortar bomb 50-120 mm", Calibre: [2]float64{50, 120}, Aspect: [2]float64{2.5, 4}, DepthCM: [2]float64{10, 100}, Body: ironOrSteelBody},
	{Name: "grenade, cast-iron or steel body", Group: "grenade 40-65 mm", Calibre: [2]float64{40, 65}, Aspect: [2]float64{1, 1.6}, DepthCM: [2]float64{5, 60}, Body: ironOrSteelBody},
	{Name: "round shot, cast-iron sphere", Group: "cast-iron sphere 40-150 mm", Calibre: [2]float64{40, 150}, Aspect: [2]float64{1, 1}, DepthCM: [2]float64{10, 120}, Body: castIronBody},
	{Name: "fuze body, brass", Group: "fuze body", Calibre: [2]float64{25, 60}, Aspect: [2]float64{1, 2}, DepthCM: [2]float64{5, 60}, Body: func(rng *rand.Rand) (float64, float64) { return uniform(rng, fuzeBrass), 1 }, Weight: fuzeWeight},
	{Name: "fuze body, aluminium alloy", Group: "fuze body", Calibre: [2]float64{25, 60}, Aspect: [2]float64{1, 2}, DepthCM: [2]float64{5, 60}, Body: func(rng *rand.Rand) (float64, float64) { return uniform(rng, fuzeAlloy), 1 }, Weight: fuzeWeight},
}

// fuzeWeight lowers the fuze bodies' share of the library. Without a depth
// a brass fuze body reads as a large copper coin does (both are big, good,
// non-magnetic conductors), so at full weight the screen flagged about one
// keeper in twenty of the demo's world for fuzes alone (measured; see
// train's screen tests). Found alone, fuze bodies are a small share of
// ordnance finds (our judgement, no source). With a depth the screen tells
// them apart by their size.
const fuzeWeight = 0.25

// MunitionGroups lists the library's groups in order, each once.
func MunitionGroups() []string {
	var g []string
	for _, m := range Munitions {
		if !slices.Contains(g, m.Group) {
			g = append(g, m.Group)
		}
	}
	return g
}

// munitionBody is one drawn example: its response at the coils and size.
type munitionBody struct {
	resp      Response
	calibreMM float64
}

// draw makes one example of the kind, at a random tilt (uniform in cos θ,
// every orientation equally likely).
func (m *Munition) draw(rng *rand.Rand) munitionBody {
	d := logUniform(rng, m.Calibre)
	aspect := uniform(rng, m.Aspect)
	a := mm(d / 2)
	c := a * math.Max(aspect, 1)
	sigma, mur := m.Body(rng)
	theta := math.Acos(rng.Float64())
	var band *Pole
	if m.Band != nil {
		// A band of width 8-20 % and thickness 2-4 % of the calibre, as the
		// ring of round wire of the same cross-section.
		width := uniform(rng, [2]float64{0.08, 0.2}) * 2 * a
		thick := uniform(rng, [2]float64{0.02, 0.04}) * 2 * a
		p := RingPole(a, math.Sqrt(width*thick/math.Pi), m.Band(rng))
		band = &p
	}
	resp := func(w float64) complex128 {
		ax, tr := SpheroidPolarizabilities(w, a, c, sigma, mur)
		if band != nil {
			// A thin ring answers only the field along its axis.
			ax += band.Eval(w)
		}
		return Tilted(ax, tr, theta)
	}
	return munitionBody{resp: resp, calibreMM: d}
}

// Calibration is the user's instrument as a history shows it: what the
// munitions library needs to read as the user's own detector would on the
// user's own ground.
type Calibration struct {
	Gain       float64 // amplitude per (m³ of moment / m⁶ of distance)
	NoiseFloor float64 // additive complex noise, amplitude units (rms)
	NoiseRel   float64 // noise proportional to the target's amplitude
	Threshold  float64 // least amplitude heard, at the frequency nearest 10 kHz
	// Grounds are bare-ground readings from the history, raw; the library
	// adds one of them to each target.
	Grounds      [][]features.Reading
	GroundLogged float64 // share of the history's digs with a ground reading
	FromDepth    bool    // the gain came from depths and amplitudes
	// IDPhase and IDValue map the phase at the frequency nearest 10 kHz to
	// the user's own display ID, from the history, sorted by phase; empty
	// when the log has no display IDs.
	IDPhase, IDValue []float64
}

// DisplayIDOf is the user's display ID for a phase at the frequency nearest
// 10 kHz: the median ID of the 11 history digs nearest in phase. Without a
// map it is spade's own invented DisplayID.
func (c *Calibration) DisplayIDOf(phase float64) float64 {
	if len(c.IDPhase) == 0 {
		return DisplayID(phase)
	}
	i, _ := slices.BinarySearch(c.IDPhase, phase)
	lo, hi := max(0, i-5), min(len(c.IDPhase), i+6)
	return quantile(c.IDValue[lo:hi], 0.5)
}

// CoilHeightCM is the coil's assumed height over the soil, for apparent
// sizes and for the library: a sweep 2-6 cm above the ground (common
// practice, no source).
var CoilHeightCM = [2]float64{2, 6}

// ApparentSize is amplitude × (distance)⁶, with the distance the depth plus
// 4 cm of coil height: a dipole's response falls as the sixth power of the
// distance for coincident coils (Grant & West 1965), so this is the
// target's moment in the instrument's units, whatever its depth.
func ApparentSize(amp, depthCM float64) float64 {
	z := (depthCM + (CoilHeightCM[0]+CoilHeightCM[1])/2) / 100
	return amp * math.Pow(z, 6)
}

// snrAtThreshold is how far above the noise the weakest dug signal stands:
// the demo instrument's own ratio (threshold 0.012, noise 0.002), an
// assumption where a history cannot tell.
const snrAtThreshold = 6

// Calibrate estimates the user's instrument from a history.
//
// The threshold is the 2nd percentile of the amplitudes at the frequency
// nearest 10 kHz (the weakest signals the user dug). The gain matches the
// history to spade's catalogue of everyday finds, simulated at the log's
// frequencies: by the medians of the apparent sizes when the log has
// depths, else by the thresholds. The noise is the threshold over
// snrAtThreshold.
func Calibrate(log *features.Log) (Calibration, error) {
	if len(log.Digs) == 0 || len(log.Freqs) == 0 {
		return Calibration{}, errors.New("datasets: an empty history cannot be calibrated")
	}
	dHz := displayHz(log.Freqs)
	di := slices.Index(log.Freqs, dHz)
	var amps, sizes []float64
	cal := Calibration{NoiseRel: DefaultMeasurement.NoiseRel}
	grounded := 0
	for i := range log.Digs {
		d := &log.Digs[i]
		a := d.Readings[di].Amp()
		if !(a > 0) || math.IsInf(a, 0) {
			continue
		}
		amps = append(amps, a)
		if d.DepthCM >= 0 {
			sizes = append(sizes, ApparentSize(a, d.DepthCM))
		}
		if d.Ground != nil {
			grounded++
		}
	}
	if len(amps) == 0 {
		return Calibration{}, errors.New("datasets: no usable amplitude in the history")
	}
	// Up to 256 ground readings, evenly spaced through the log.
	step := max(1, grounded/256)
	k := 0
	for i := range log.Digs {
		if g := log.Digs[i].Ground; g != nil {
			if k%step == 0 {
				cal.Grounds = append(cal.Grounds, g)
			}
			k++
		}
	}
	cal.GroundLogged = float64(grounded) / float64(len(log.Digs))
	if log.HasDisplayID {
		type pair struct{ phase, id float64 }
		var ps []pair
		for i := range log.Digs {
			if id := log.Digs[i].DisplayID; !math.IsNaN(id) {
				ps = append(ps, pair{log.Digs[i].Readings[di].Phase(), id})
			}
		}
		slices.SortFunc(ps, func(a, b pair) int { return cmp.Compare(a.phase, b.phase) })
		for _, p := range ps {
			cal.IDPhase = append(cal.IDPhase, p.phase)
			cal.IDValue = append(cal.IDValue, p.id)
		}
	}
	cal.Threshold = quantile(amps, 0.02)

	ref, _, err := Simulate(Options{Scenario: "demo", N: 1000, Seed: 0xca11b, Freqs: log.Freqs, ExcludeHazards: true})
	if err != nil {
		return Calibration{}, err
	}
	var refAmps, refSizes []float64
	for i := range ref {
		a := ref[i].Readings[di].Amp()
		refAmps = append(refAmps, a)
		refSizes = append(refSizes, ApparentSize(a, ref[i].DepthCM))
	}
	if len(sizes) >= len(amps)/2 && len(sizes) >= 10 {
		cal.Gain = quantile(sizes, 0.5) / quantile(refSizes, 0.5)
		cal.FromDepth = true
	} else {
		cal.Gain = cal.Threshold / quantile(refAmps, 0.02)
	}
	cal.NoiseFloor = cal.Threshold / snrAtThreshold
	if !(cal.Gain > 0) || math.IsInf(cal.Gain, 0) || !(cal.NoiseFloor > 0) {
		return Calibration{}, fmt.Errorf("datasets: the history's amplitudes give no usable calibration (gain %g)", cal.Gain)
	}
	return cal, nil
}

// quantile is the q-quantile of v by linear interpolation between order
// statistics (Hyndman & Fan 1996, definition 7); v is not changed.
func quantile(v []float64, q float64) float64 {
	s := slices.Clone(v)
	slices.Sort(s)
	h := q * float64(len(s)-1)
	lo := int(math.Floor(h))
	if lo+1 >= len(s) {
		return s[len(s)-1]
	}
	return s[lo] + (h-float64(lo))*(s[lo+1]-s[lo])
}

// LibraryOptions for Library.
type LibraryOptions struct {
	Freqs []int
	N     int
	Seed  uint64
	Cal   Calibration
	// Groups, when set, keeps only these groups; Exclude leaves one out.
	Groups  []string
	Exclude string
}

// LibraryTruth is what a library reading really was.
type LibraryTruth struct {
	Munition  *Munition
	CalibreMM float64
	DepthCM   float64
}

// Library simulates N munitions as the user's instrument would read them
// on the user's ground: the kinds in turn, each at a random depth in its
// range and a random tilt (the kinds drawn by their weights), heard only when above the user's threshold, with
// one of the history's bare-ground readings added (and logged beside the
// target as often as the history logs one) and the user's noise. Digs carry
// the depth; their ids are "LIB-nnnn" and they have no site or date. The
// same options give the same readings.
func Library(o LibraryOptions) ([]features.Dig, []LibraryTruth, error) {
	if len(o.Freqs) == 0 || !slices.IsSorted(o.Freqs) {
		return nil, nil, errors.New("datasets: the library needs the log's frequencies, ascending")
	}
	var kinds []*Munition
	var weights []float64
	for i := range Munitions {
		m := &Munitions[i]
		if (o.Groups == nil || slices.Contains(o.Groups, m.Group)) && m.Group != o.Exclude {
			kinds = append(kinds, m)
			weights = append(weights, cmp.Or(m.Weight, 1))
		}
	}
	if len(kinds) == 0 {
		return nil, nil, errors.New("datasets: no munitions group left to simulate")
	}
	cal := o.Cal
	rng := rand.New(rand.NewPCG(o.Seed, 0x11b4a7))
	dHz := displayHz(o.Freqs)
	digs := make([]features.Dig, 0, o.N)
	truth := make([]LibraryTruth, 0, o.N)
	for attempt := 0; len(digs) < o.N; attempt++ {
		if attempt > 200*o.N+1000 {
			return nil, nil, fmt.Errorf("datasets: the munitions library is never heard above the history's threshold %g", cal.Threshold)
		}
		kind := kinds[pick(rng, weights)]
		body := kind.draw(rng)
		depth := math.Round(uniform(rng, kind.DepthCM))
		h := uniform(rng, CoilHeightCM) / 100
		z := depth/100 + h
		var ground []features.Reading
		if len(cal.Grounds) > 0 {
			ground = cal.Grounds[rng.IntN(len(cal.Grounds))]
		}
		gs := uniform(rng, [2]float64{0.8, 1.2})
		d := features.Dig{Readings: make([]features.Reading, len(o.Freqs)), DepthCM: depth, DisplayID: math.NaN()}
		heard := false
		for i, hz := range o.Freqs {
			target := complex(cal.Gain/math.Pow(z, 6), 0) * body.resp(2*math.Pi*float64(hz))
			if hz == dHz && cmplx.Abs(target) >= cal.Threshold {
				heard = true
			}
			total := target + cal.noise(rng, cmplx.Abs(target))
			if ground != nil {
				total += complex(gs*ground[i].X, -gs*ground[i].R)
			}
			d.Readings[i] = features.Reading{Hz: hz, X: real(total), R: -imag(total)}
			if hz == dHz {
				d.DisplayID = cal.DisplayIDOf(d.Readings[i].Phase())
			}
		}
		if !heard {
			continue
		}
		if ground != nil && rng.Float64() < cal.GroundLogged {
			d.Ground = make([]features.Reading, len(o.Freqs))
			for i := range o.Freqs {
				g := complex(ground[i].X, -ground[i].R) + cal.noise(rng, 0)
				d.Ground[i] = features.Reading{Hz: o.Freqs[i], X: real(g), R: -imag(g)}
			}
		}
		d.ID = fmt.Sprintf("LIB-%04d", len(digs)+1)
		digs = append(digs, d)
		truth = append(truth, LibraryTruth{Munition: kind, CalibreMM: body.calibreMM, DepthCM: depth})
	}
	return digs, truth, nil
}

func (c *Calibration) noise(rng *rand.Rand, amp float64) complex128 {
	s := math.Hypot(c.NoiseFloor, c.NoiseRel*amp) / math.Sqrt2
	return complex(s*rng.NormFloat64(), s*rng.NormFloat64())
}
