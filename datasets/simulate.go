package datasets

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"slices"
	"time"

	"github.com/spade-detect/spade/features"
)

// DefaultFreqs are the demo instrument's frequencies, our own choice: four
// spread over a decade, deliberately uneven (not a doubling series), so that
// the demo recalls no particular instrument.
var DefaultFreqs = []int{4300, 9700, 21700, 36300}

// Scenario is a mix of sites.
type Scenario struct {
	Name  string
	About string
	Sites []string
	Share []float64
}

// Scenarios that simulate knows.
var Scenarios = []Scenario{
	{Name: "demo", About: "two seasons on an iron-rich inland field and a tidal beach", Sites: []string{"Harrowmere Farm", "Sandle Reach"}, Share: []float64{0.65, 0.35}},
	{Name: "field", About: "an iron-rich inland plough field only", Sites: []string{"Harrowmere Farm"}, Share: []float64{1}},
	{Name: "beach", About: "a tidal beach only", Sites: []string{"Sandle Reach"}, Share: []float64{1}},
}

// ScenarioNamed finds a scenario; nil if none.
func ScenarioNamed(name string) *Scenario {
	for i := range Scenarios {
		if Scenarios[i].Name == name {
			return &Scenarios[i]
		}
	}
	return nil
}

// Measurement is the demo instrument and its user.
type Measurement struct {
	Gain         float64    // amplitude per (m³ of moment / m⁶ of distance)
	NoiseFloor   float64    // additive complex noise, amplitude units (rms)
	NoiseRel     float64    // noise proportional to the target's amplitude
	Threshold    float64    // least amplitude at the display frequency that is heard
	CoilHeightCM [2]float64 // coil height above the soil
	// GroundShare is the range of the residual share of the ground signal
	// left by the instrument's own ground balance.
	GroundShare [2]float64
	SoilGain    float64 // ground coupling: amplitude per unit susceptibility at 1 m³
}

// DefaultMeasurement is the demo instrument.
var DefaultMeasurement = Measurement{
	Gain: 1, NoiseFloor: 0.002, NoiseRel: 0.01, Threshold: 0.012,
	CoilHeightCM: [2]float64{2, 6}, GroundShare: [2]float64{0, 0.15}, SoilGain: 0.003,
}

// Options for Simulate.
type Options struct {
	Scenario    string // a name from Scenarios; default "demo"
	N           int
	Seed        uint64
	Freqs       []int // default DefaultFreqs
	Unlabelled  bool  // leave material and shape empty
	Measurement *Measurement
	// ExcludeHazards leaves the hazard kinds out of every site's mix: a
	// history as almost everyone's is, with no ordnance in it.
	ExcludeHazards bool
	// Kinds, when set, keeps only these classes of the sites' mixes.
	Kinds []string
}

// Truth is what a simulated dig really was.
type Truth struct {
	Kind     *Kind
	DepthCM  float64
	Site     *Site
	Response Response
}

// Simulate draws N dug targets: for each, a site by the scenario's shares,
// a kind by the site's mix, an object from the kind's ranges, a depth, a
// coil height and a ground-balance residual; it keeps only what the
// instrument would have heard. The same options give the same digs.
func Simulate(opts Options) ([]features.Dig, []Truth, error) {
	sc, freqs, meas, err := opts.resolve()
	if err != nil {
		return nil, nil, err
	}
	rng := rand.New(rand.NewPCG(opts.Seed, 0x5eed_d16))
	sites := make([]*Site, len(sc.Sites))
	for i, n := range sc.Sites {
		sites[i] = SiteNamed(n)
	}
	digs := make([]features.Dig, 0, opts.N)
	truth := make([]Truth, 0, opts.N)
	count := map[string]int{}
	for len(digs) < opts.N {
		site := sites[pick(rng, sc.Share)]
		shares := make([]float64, len(Catalogue))
		for i := range Catalogue {
			k := &Catalogue[i]
			if (opts.ExcludeHazards && k.Hazard) || (opts.Kinds != nil && !slices.Contains(opts.Kinds, k.Class())) {
				continue
			}
			shares[i] = site.Mix[k.Class()]
		}
		if slices.Max(shares) == 0 {
			continue // none of the kinds asked for lies at this site
		}
		kind := &Catalogue[pick(rng, shares)]
		resp := kind.draw(rng)
		depth := math.Round(uniform(rng, kind.DepthCM))
		d, ok := meas.read(rng, freqs, site, resp, depth)
		if !ok {
			continue
		}
		count[site.Prefix]++
		d.ID = fmt.Sprintf("%s-%04d", site.Prefix, count[site.Prefix])
		d.Site = site.Name
		d.Date = seasonDate(rng)
		d.DepthCM = depth
		if !opts.Unlabelled {
			d.Material, d.Shape = kind.Material, kind.Shape
		}
		digs = append(digs, d)
		truth = append(truth, Truth{Kind: kind, DepthCM: depth, Site: site, Response: resp})
	}
	return digs, truth, nil
}

func (o Options) resolve() (*Scenario, []int, *Measurement, error) {
	name := o.Scenario
	if name == "" {
		name = "demo"
	}
	sc := ScenarioNamed(name)
	if sc == nil {
		var names []string
		for _, s := range Scenarios {
			names = append(names, s.Name)
		}
		return nil, nil, nil, fmt.Errorf("no scenario %q (have %s)", name, features.ListAnd(names))
	}
	freqs := o.Freqs
	if len(freqs) == 0 {
		freqs = DefaultFreqs
	}
	freqs = slices.Clone(freqs)
	slices.Sort(freqs)
	if len(slices.Compact(slices.Clone(freqs))) != len(freqs) {
		return nil, nil, nil, fmt.Errorf("a frequency is listed twice in %s", features.HzList(freqs))
	}
	if o.Kinds != nil {
		total := 0
		for _, k := range o.Kinds {
			if KindOf(k) == nil {
				return nil, nil, nil, fmt.Errorf("no kind %q in the catalogue", k)
			}
			for _, n := range sc.Sites {
				if SiteNamed(n).Mix[k] > 0 {
					total++
				}
			}
		}
		if total == 0 {
			return nil, nil, nil, fmt.Errorf("none of the kinds %s is found at the scenario's sites", features.ListAnd(o.Kinds))
		}
	}
	if o.N < 0 {
		return nil, nil, nil, fmt.Errorf("--n must be >= 0, got %d", o.N)
	}
	m := o.Measurement
	if m == nil {
		m = &DefaultMeasurement
	}
	return sc, freqs, m, nil
}

// displayHz is the frequency nearest 10 kHz: the display ID's.
func displayHz(freqs []int) int {
	best := freqs[0]
	for _, f := range freqs {
		if math.Abs(math.Log(float64(f)/1e4)) < math.Abs(math.Log(float64(best)/1e4)) {
			best = f
		}
	}
	return best
}

// read makes one dig-log row of a target at depthCM, or reports it unheard.
//
// The target's signal falls as a dipole's does far from the coil, as the
// sixth power of the distance (coil to target and back: Grant & West 1965);
// the residual ground adds a share of the soil's response at the coil's
// height, which falls as its cube (a half-space); then complex noise.
func (m *Measurement) read(rng *rand.Rand, freqs []int, site *Site, resp Response, depthCM float64) (features.Dig, bool) {
	h := uniform(rng, m.CoilHeightCM) / 100
	z := depthCM/100 + h
	share := uniform(rng, m.GroundShare)
	dHz := displayHz(freqs)
	d := features.Dig{Readings: make([]features.Reading, len(freqs)), DepthCM: depthCM}
	heard := false
	for i, hz := range freqs {
		w := 2 * math.Pi * float64(hz)
		target := complex(m.Gain/math.Pow(z, 6), 0) * resp(w)
		if hz == dHz && cmplx.Abs(target) >= m.Threshold {
			heard = true
		}
		ground := complex(share*m.SoilGain/(h*h*h), 0) * site.Soil(w)
		total := target + ground + m.noise(rng, cmplx.Abs(target))
		d.Readings[i] = features.Reading{Hz: hz, X: real(total), R: -imag(total)}
		if hz == dHz {
			d.DisplayID = DisplayID(d.Readings[i].Phase())
		}
	}
	if !heard {
		return d, false
	}
	if rng.Float64() < site.GroundLogged {
		hg := h * uniform(rng, [2]float64{0.8, 1.2})
		d.Ground = make([]features.Reading, len(freqs))
		for i, hz := range freqs {
			g := complex(share*m.SoilGain/(hg*hg*hg), 0)*site.Soil(2*math.Pi*float64(hz)) + m.noise(rng, 0)
			d.Ground[i] = features.Reading{Hz: hz, X: real(g), R: -imag(g)}
		}
	}
	return d, true
}

func (m *Measurement) noise(rng *rand.Rand, amp float64) complex128 {
	s := math.Hypot(m.NoiseFloor, m.NoiseRel*amp) / math.Sqrt2
	return complex(s*rng.NormFloat64(), s*rng.NormFloat64())
}

// seasonDate is a day in the demo's two seasons, 2025-03-01 to 2026-10-31.
func seasonDate(rng *rand.Rand) string {
	start := time.Date(2025, 3, 1, 0, 0, 0, 0, time.UTC)
	days := int(time.Date(2026, 10, 31, 0, 0, 0, 0, time.UTC).Sub(start).Hours() / 24)
	return start.AddDate(0, 0, rng.IntN(days+1)).Format(time.DateOnly)
}

// pick draws an index with probability proportional to weights.
func pick(rng *rand.Rand, weights []float64) int {
	var total float64
	for _, w := range weights {
		total += w
	}
	u := rng.Float64() * total
	for i, w := range weights {
		if u < w {
			return i
		}
		u -= w
	}
	return len(weights) - 1
}
