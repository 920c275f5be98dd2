package datasets

import (
	"bytes"
	"math"
	"math/cmplx"
	"slices"
	"testing"

	"github.com/spade-detect/spade/features"
	"gonum.org/v1/gonum/floats/scalar"
)

func TestDemagnetisingFactors(t *testing.T) {
	// Osborn (1945): a sphere has N = 1/3 on every axis, and the three
	// factors of any ellipsoid sum to 1.
	for _, m := range []float64{1, 1.001, 1.0099, 1.0101, 1.5, 2, 5, 20, 100} {
		na, nt := DemagnetisingFactors(m)
		if !scalar.EqualWithinAbs(na+2*nt, 1, 1e-14) {
			t.Errorf("m=%v: N_a + 2N_t = %v", m, na+2*nt)
		}
		if m > 1 && !(na < 1.0/3 && nt > 1.0/3) {
			t.Errorf("m=%v: N_a = %v, N_t = %v; a prolate body has N_a < 1/3 < N_t", m, na, nt)
		}
	}
	if na, _ := DemagnetisingFactors(1); !scalar.EqualWithinAbs(na, 1.0/3, 1e-15) {
		t.Errorf("sphere: N = %v", na)
	}
	// The series below m = 1.01 and the closed form above agree there.
	lo, _ := DemagnetisingFactors(math.Nextafter(1.01, 0))
	hi, _ := DemagnetisingFactors(1.01)
	if !scalar.EqualWithinRel(lo, hi, 1e-9) {
		t.Errorf("series %v and closed form %v differ at m = 1.01", lo, hi)
	}
	// Osborn (1945), Table I, aspect 2: N_a = 0.1736 (value from memory).
	if na, _ := DemagnetisingFactors(2); !scalar.EqualWithinAbs(na, 0.1736, 1e-4) {
		t.Errorf("m=2: N_a = %v, want 0.1736", na)
	}
	// Osborn (1945): for a long prolate body N_a → (ln 2m - 1)/m².
	if na, _ := DemagnetisingFactors(100); !scalar.EqualWithinRel(na, (math.Log(200)-1)/1e4, 1e-3) {
		t.Errorf("m=100: N_a = %v, want %v", na, (math.Log(200)-1)/1e4)
	}
}

func TestSpheroidIsWaitsSphereAtAspectOne(t *testing.T) {
	// At c = a both polarizabilities must be Wait's sphere, 2πa³·X.
	for _, mur := range []float64{1, 60, 150} {
		for _, hz := range []float64{100, 5e3, 4e4, 1e6} {
			w := 2 * math.Pi * hz
			ax, tr := SpheroidPolarizabilities(w, 0.03, 0.03, 5e6, mur)
			want := SphereMoment(w, 0.03, 5e6, mur)
			if cmplx.Abs(ax-want) > 1e-12*cmplx.Abs(want) || cmplx.Abs(tr-want) > 1e-12*cmplx.Abs(want) {
				t.Errorf("μr=%v, %v Hz: spheroid %v / %v, sphere %v", mur, hz, ax, tr, want)
			}
		}
	}
}

func TestSpheroidLimits(t *testing.T) {
	a, c, sigma := 0.02, 0.08, 5e6
	na, nt := DemagnetisingFactors(c / a)
	v := 4 * math.Pi / 3 * a * a * c
	// DC: the magnetised ellipsoid, V(μr-1)/(1+(μr-1)N) (Osborn 1945).
	for _, mur := range []float64{1, 100} {
		ax, tr := SpheroidPolarizabilities(1e-9, a, c, sigma, mur)
		for _, k := range []struct {
			got complex128
			n   float64
		}{{ax, na}, {tr, nt}} {
			want := v * (mur - 1) / (1 + (mur-1)*k.n)
			if math.Abs(real(k.got)-want) > 1e-9*math.Max(v, math.Abs(want)) || math.Abs(imag(k.got)) > 1e-9*v {
				t.Errorf("μr=%v, DC: %v, want %v", mur, k.got, want)
			}
		}
	}
	// High frequency: the field excluded, -V/(1-N), reached as Wait's
	// sphere reaches -1 (to about 3/|α| for μr = 1).
	ax, tr := SpheroidPolarizabilities(1e12, a, c, sigma, 1)
	if cmplx.Abs(ax-complex(-v/(1-na), 0)) > 1e-3*v || cmplx.Abs(tr-complex(-v/(1-nt), 0)) > 1e-3*v {
		t.Errorf("high frequency: %v / %v, want %v / %v", ax, tr, -v/(1-na), -v/(1-nt))
	}
	// A long perfect conductor across the field has a polarizability of
	// twice its volume (the cylinder's 2πa² per length: Landau & Lifshitz,
	// Electrodynamics of Continuous Media, §3, from memory).
	_, ntLong := DemagnetisingFactors(200)
	if got := 1 / (1 - ntLong); !scalar.EqualWithinRel(got, 2, 1e-3) {
		t.Errorf("long body across the field: %v V, want 2 V", got)
	}
}

func TestTilted(t *testing.T) {
	ax, tr := complex(3, -1), complex(-2, 0.5)
	if Tilted(ax, tr, 0) != ax || cmplx.Abs(Tilted(ax, tr, math.Pi/2)-tr) > 1e-15 {
		t.Error("tilt 0 must give the axial, tilt 90° the transverse polarizability")
	}
	// Averaged over all orientations a tensor gives a third of its trace
	// (cos²θ averages 1/3 for cos θ uniform).
	theta := math.Acos(math.Sqrt(1.0 / 3))
	if got, want := Tilted(ax, tr, theta), (ax+2*tr)/3; cmplx.Abs(got-want) > 1e-14 {
		t.Errorf("mean orientation: %v, want %v", got, want)
	}
}

func demoLog(t *testing.T) *features.Log {
	log, err := features.ReadLog(bytes.NewReader(DemoHistory), DemoHistoryName, features.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return log
}

func TestCalibrateRecoversTheDemoInstrument(t *testing.T) {
	// The demo history was read with gain 1, threshold 0.012 and noise
	// 0.002 (DefaultMeasurement): the calibration must find about those.
	log := demoLog(t)
	cal, err := Calibrate(log)
	if err != nil {
		t.Fatal(err)
	}
	if !cal.FromDepth || cal.Gain < 0.7 || cal.Gain > 1.4 {
		t.Errorf("gain %v (from depth %v), want about 1", cal.Gain, cal.FromDepth)
	}
	if !scalar.EqualWithinRel(cal.Threshold, DefaultMeasurement.Threshold, 0.2) || !scalar.EqualWithinRel(cal.NoiseFloor, DefaultMeasurement.NoiseFloor, 0.2) {
		t.Errorf("threshold %v, noise %v", cal.Threshold, cal.NoiseFloor)
	}
	if len(cal.Grounds) == 0 || cal.GroundLogged < 0.5 || len(cal.IDPhase) != len(log.Digs) {
		t.Errorf("grounds %d, logged %v, id map %d", len(cal.Grounds), cal.GroundLogged, len(cal.IDPhase))
	}
	// The display-ID map is the history's: near spade's own invented map,
	// which made the history.
	for _, ph := range []float64{20, 100, 150} {
		if got, want := cal.DisplayIDOf(ph), DisplayID(ph); math.Abs(got-want) > 3 {
			t.Errorf("phase %v: id %v, want about %v", ph, got, want)
		}
	}
	// Without depths the gain comes from the thresholds, less exactly.
	for i := range log.Digs {
		log.Digs[i].DepthCM = math.NaN()
	}
	cal, err = Calibrate(log)
	if err != nil || cal.FromDepth || cal.Gain < 0.5 || cal.Gain > 2 {
		t.Errorf("without depths: gain %v, from depth %v, %v", cal.Gain, cal.FromDepth, err)
	}
}

func TestLibrary(t *testing.T) {
	log := demoLog(t)
	cal, err := Calibrate(log)
	if err != nil {
		t.Fatal(err)
	}
	o := LibraryOptions{Freqs: log.Freqs, N: 400, Seed: 5, Cal: cal}
	digs, truth, err := Library(o)
	if err != nil {
		t.Fatal(err)
	}
	again, _, _ := Library(o)
	if len(digs) != 400 || len(truth) != 400 {
		t.Fatalf("%d readings", len(digs))
	}
	fuzes, grounded := 0, 0
	for i, d := range digs {
		if d.ID != again[i].ID || !slices.Equal(d.Readings, again[i].Readings) {
			t.Fatal("the same options give other readings")
		}
		if len(d.Readings) != len(log.Freqs) || !(d.DepthCM >= truth[i].Munition.DepthCM[0]) || d.Site != "" || d.Material != "" {
			t.Errorf("reading %s: %+v", d.ID, d)
		}
		if c := truth[i].CalibreMM; c < truth[i].Munition.Calibre[0] || c > truth[i].Munition.Calibre[1] {
			t.Errorf("%s: calibre %v out of range", truth[i].Munition.Group, c)
		}
		if truth[i].Munition.Group == "fuze body" {
			fuzes++
		}
		if d.Ground != nil {
			grounded++
		}
	}
	// Ten kinds of weight 1 and two of fuzeWeight: fuzes are 0.5/9.5 of
	// the draws, less those never heard; binomial sd about 4.5 in 400.
	if want := 400 * 2 * fuzeWeight / (float64(len(Munitions)-2) + 2*fuzeWeight); math.Abs(float64(fuzes)-want) > 20 {
		t.Errorf("%d fuze bodies, want about %.0f", fuzes, want)
	}
	if share := float64(grounded) / 400; math.Abs(share-cal.GroundLogged) > 0.1 {
		t.Errorf("%.2f grounded, the history %.2f", share, cal.GroundLogged)
	}
	// One group only, and one left out.
	only, tr, err := Library(LibraryOptions{Freqs: log.Freqs, N: 50, Seed: 5, Cal: cal, Groups: []string{"grenade 40-65 mm"}})
	if err != nil || len(only) != 50 || tr[0].Munition.Group != "grenade 40-65 mm" {
		t.Errorf("groups: %v", err)
	}
	if _, _, err := Library(LibraryOptions{Freqs: log.Freqs, N: 5, Cal: cal, Groups: []string{"fuze body"}, Exclude: "fuze body"}); err == nil {
		t.Error("no group left, no error")
	}
	// A threshold nothing reaches is an error, not an endless loop.
	deaf := cal
	deaf.Threshold = 1e30
	if _, _, err := Library(LibraryOptions{Freqs: log.Freqs, N: 5, Cal: deaf}); err == nil {
		t.Error("an instrument that hears nothing gives a library")
	}
}

func TestSimulateKindsAndNoHazards(t *testing.T) {
	digs, _, err := Simulate(Options{N: 300, Seed: 1, ExcludeHazards: true})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range digs {
		if d.Shape == "ordnance" {
			t.Fatal("ExcludeHazards gave ordnance")
		}
	}
	only, _, err := Simulate(Options{N: 30, Seed: 1, Kinds: []string{"gold/ring"}})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range only {
		if d.Material+"/"+d.Shape != "gold/ring" {
			t.Fatalf("Kinds gave %s", d.Material+"/"+d.Shape)
		}
	}
	if _, _, err := Simulate(Options{N: 3, Kinds: []string{"tin/can"}}); err == nil {
		t.Error("an unknown kind is accepted")
	}
}
