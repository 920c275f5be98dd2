package classify

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"sort"
	"strings"
	"sync"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/train"
	"gonum.org/v1/gonum/spatial/kdtree"
)

var model struct {
	sync.Once
	b   *train.Bundle
	log *features.Log
}

// demoModel is a 100-tree model of the embedded demo history.
func demoModel(t testing.TB) (*train.Bundle, *features.Log) {
	model.Do(func() {
		log, err := features.ReadLog(bytes.NewReader(datasets.DemoHistory), datasets.DemoHistoryName, features.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		spec := features.NewSpec(log.Freqs, log.HasDisplayID)
		model.b, err = train.TrainBundle(context.Background(), log, spec, train.TrainOptions{Forest: train.Options{Trees: 100, Seed: 1}})
		if err != nil {
			t.Fatal(err)
		}
		model.log = log
	})
	return model.b, model.log
}

func demoReadings(t testing.TB) []features.Dig {
	log, err := features.ReadLog(bytes.NewReader(datasets.DemoReadings), datasets.DemoReadingsName, features.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	return log.Digs
}

func TestProbabilitiesSumToOne(t *testing.T) {
	b, _ := demoModel(t)
	c := New(b, nil)
	for _, d := range demoReadings(t) {
		r, err := c.Classify(&d)
		if err != nil {
			t.Fatal(err)
		}
		var s, ms, ss float64
		for _, p := range r.Probabilities {
			s += p
		}
		for _, m := range r.Materials {
			ms += m.Probability
		}
		for _, x := range r.Shapes {
			ss += x.Probability
		}
		for name, v := range map[string]float64{"classes": s, "materials": ms, "shapes": ss} {
			if math.Abs(v-1) > 1e-9 {
				t.Errorf("%s: %s sum to %v", d.ID, name, v)
			}
		}
		if !sort.SliceIsSorted(r.Ranked, func(i, j int) bool { return r.Ranked[i].Probability > r.Ranked[j].Probability }) || r.Top != r.Ranked[0] {
			t.Errorf("%s: ranking not sorted", d.ID)
		}
	}
}

// whitenedPoints are the training vectors in the classifier's space, as
// gonum kd-tree points.
func whitenedPoints(s *space) kdtree.Points {
	n := len(s.ref) / s.dims
	pts := make(kdtree.Points, n)
	for i := range n {
		pts[i] = kdtree.Point(s.ref[i*s.dims : (i+1)*s.dims])
	}
	return pts
}

func TestNearestAgainstReferences(t *testing.T) {
	// The early-abandoning scan must find what a full sort of all distances
	// finds, and what gonum's k-d tree (spatial/kdtree) finds.
	b, _ := demoModel(t)
	c := New(b, nil)
	s := c.space
	tree := kdtree.New(whitenedPoints(s), false)
	n := len(s.ref) / s.dims
	var q []float64
	for _, d := range demoReadings(t) {
		v, _, _ := b.Spec.Extract(&d, nil)
		q = s.standardise(v, q)
		got := s.nearest(q, 5, -1, nil)
		// Brute force: every distance, sorted.
		all := make([]Neighbour, n)
		for i := range n {
			var sum float64
			for j := range s.dims {
				e := s.ref[i*s.dims+j] - q[j]
				sum += e * e
			}
			all[i] = Neighbour{Distance: math.Sqrt(sum), index: i}
		}
		sort.SliceStable(all, func(i, j int) bool { return all[i].Distance < all[j].Distance })
		keep := kdtree.NewNKeeper(5)
		tree.NearestSet(keep, kdtree.Point(q))
		var kd []float64
		for _, h := range keep.Heap {
			kd = append(kd, math.Sqrt(h.Dist))
		}
		slices.Sort(kd)
		for k := range 5 {
			if got[k].index != all[k].index || math.Abs(got[k].Distance-all[k].Distance) > 1e-12 {
				t.Errorf("%s #%d: scan row %d at %v, brute force row %d at %v", d.ID, k, got[k].index, got[k].Distance, all[k].index, all[k].Distance)
			}
			if math.Abs(got[k].Distance-kd[k]) > 1e-9 {
				t.Errorf("%s #%d: scan %v, gonum k-d tree %v", d.ID, k, got[k].Distance, kd[k])
			}
		}
	}
}

func TestWhitenedDistanceIsMahalanobis(t *testing.T) {
	// Mahalanobis (1936): d² = (x-μ)ᵀ Σ⁻¹ (x-μ). With Σ = [[4, 3], [3, 4]],
	// Σ⁻¹ = [[4, -3], [-3, 4]]/7, so (1, -1) from the mean has
	// d² = (4 + 3 + 3 + 4)/7 = 2, where a per-feature z-score gives 0.5.
	// The sample: x = u + v, y = u - v over the four sign choices of
	// u = ±a, v = ±b; with gonum's n-1 divisor var(u) = 4a²/3 = 3.5 and
	// var(v) = 4b²/3 = 0.5 give var x = var y = 4 and cov = 3.
	a, b := math.Sqrt(3.5*3/4), math.Sqrt(0.5*3/4)
	var vectors [][]float64
	for _, p := range [][2]float64{{1, 1}, {-1, -1}, {1, -1}, {-1, 1}} {
		u, v := p[0]*a, p[1]*b
		vectors = append(vectors, []float64{u + v, u - v})
	}
	s := newSpace(vectors, nil)
	w := s.standardise([]float64{1, -1}, nil)
	if d2 := w[0]*w[0] + w[1]*w[1]; math.Abs(d2-2) > 1e-12 {
		t.Errorf("d² = %v, want 2", d2)
	}
}

func TestCautionWhenAndOnlyWhen(t *testing.T) {
	full, _ := demoModel(t)
	// The history's own hazard class alone: the model without its screen.
	noScreen := *full
	noScreen.Screen = nil
	b := &noScreen
	hazard := slices.Index(b.Classes, "steel/ordnance")
	for _, threshold := range []float64{0.01, 0.2, 0.5} {
		v := DefaultValues()
		v.HazardThreshold = threshold
		c := New(b, v)
		for _, d := range demoReadings(t) {
			r, _ := c.Classify(&d)
			p := r.Probabilities[b.Classes[hazard]]
			top := r.Top.Class == b.Classes[hazard]
			want := TierNone
			switch {
			case p >= 0.5:
				want = TierLikely
			case p >= threshold || top:
				want = TierPossible
			}
			if r.Hazard.Tier != want || (r.Caution != nil) != (want != TierNone) {
				t.Errorf("threshold %v, %s: hazard p %v, tier %q, want %q", threshold, d.ID, p, r.Hazard.Tier, want)
			}
			if r.Caution != nil && (r.Decision.Verdict != VerdictDoNotDig || r.Caution.Tier != r.Hazard.Tier) {
				t.Errorf("%s: caution %q but verdict %q", d.ID, r.Caution.Tier, r.Decision.Verdict)
			}
			if r.Caution == nil && r.Decision.Verdict == VerdictDoNotDig {
				t.Errorf("%s: do not dig without a caution", d.ID)
			}
			if !r.Hazard.Available || r.Hazard.Probability != p {
				t.Errorf("%s: hazard check %+v, want available with probability %v", d.ID, r.Hazard, p)
			}
		}
	}
	// The simulated projectile (R05) is likely ordnance at the default 1 %,
	// by the history and by the screen.
	for _, m := range []*train.Bundle{b, full} {
		c := New(m, nil)
		for _, d := range demoReadings(t) {
			if d.ID == "R05" {
				if r, _ := c.Classify(&d); r.Caution == nil || r.Caution.Tier != TierLikely || r.Caution.Message != CautionLikely {
					t.Errorf("R05, a simulated projectile, gets caution %+v", r.Caution)
				}
			}
		}
	}
}

func TestHazardCheckAvailability(t *testing.T) {
	full, _ := demoModel(t)
	v := DefaultValues()
	v.Hazards = []string{"landmine"}
	// The screen warns whatever the classes are called.
	if w := New(full, v).Warnings(); len(w) != 0 {
		t.Errorf("with a screen: warnings %q", w)
	}
	noScreen := *full
	noScreen.Screen = nil
	c := New(&noScreen, v)
	if w := c.Warnings(); len(w) != 1 || !strings.HasPrefix(w[0], "HAZARD CHECK UNAVAILABLE") {
		t.Errorf("no screen, no hazard class: warnings %q", w)
	}
	d := demoReadings(t)[0]
	r, _ := c.Classify(&d)
	if r.Hazard.Available || r.Hazard.Note == "" {
		t.Errorf("no screen, no hazard class: hazard check %+v", r.Hazard)
	}
	if w := New(&noScreen, nil).Warnings(); len(w) != 0 {
		t.Errorf("hazard class, no screen: warnings %q", w)
	}
}

func TestUnfamiliarFarOutsideButNotTrainingDigs(t *testing.T) {
	b, log := demoModel(t)
	c := New(b, nil)
	// A reading no passive target gives: phase falling 150° across the band.
	far, err := ParseInline("4.3k=170/1, 9.7k=120/1, 21.7k=70/1, 36.3k=20/1, id=50")
	if err != nil {
		t.Fatal(err)
	}
	if r, _ := c.Classify(far); !r.Novelty.Unfamiliar || (r.Caution == nil && r.Decision.Verdict != "unsure") {
		t.Errorf("far reading: percentile %v, unfamiliar %v, verdict %q", r.Novelty.Percentile, r.Novelty.Unfamiliar, r.Decision.Verdict)
	}
	// Training digs: by construction about 1 % of them score above the
	// 99th percentile of their own leave-one-out scores; as queries they
	// also find themselves at distance 0, so fewer still.
	unfamiliar := 0
	for i := range log.Digs {
		r, _ := c.Classify(&log.Digs[i])
		if r.Novelty.Unfamiliar {
			unfamiliar++
		}
		if i == 0 && (r.Neighbours[0].Dig != log.Digs[0].ID || r.Neighbours[0].Distance > 1e-9) {
			t.Errorf("training dig %s: nearest %+v", log.Digs[0].ID, r.Neighbours[0])
		}
	}
	if unfamiliar > len(log.Digs)/100 {
		t.Errorf("%d of %d training digs unfamiliar", unfamiliar, len(log.Digs))
	}
}

func TestFrequencyMismatchRefused(t *testing.T) {
	b, _ := demoModel(t)
	d, _ := ParseInline("4.3k=120/1, 9.7k=130/1, 15k=140/1, id=50")
	_, err := New(b, nil).Classify(d)
	var fm *features.FreqMismatchError
	if err == nil || !errorsAs(err, &fm) || !slices.Equal(fm.Missing, []int{21700, 36300}) || !slices.Equal(fm.Unexpected, []int{15000}) {
		t.Errorf("error %v", err)
	}
}

func TestDecisionByValues(t *testing.T) {
	// Expected value Σ p·value - cost, by hand on the gold ring reading.
	b, _ := demoModel(t)
	v, err := ParseValues("v.toml", "cost_per_dig = 5\n[value]\n\"gold/ring\" = 100\nring-pull = -1\n")
	if err != nil {
		t.Fatal(err)
	}
	c := New(b, v)
	d := demoReadings(t)[0] // R01, a simulated gold ring
	r, _ := c.Classify(&d)
	want := 100*r.Probabilities["gold/ring"] - r.Probabilities["aluminium/ring-pull"] - 5
	if math.Abs(r.Decision.ExpectedValue-want) > 1e-9 {
		t.Errorf("expected value %v, want %v", r.Decision.ExpectedValue, want)
	}
	if (want > 0) != (r.Decision.Verdict == "dig") {
		t.Errorf("verdict %q at expected value %v", r.Decision.Verdict, want)
	}
}

func BenchmarkClassifyReading(b *testing.B) {
	// Issue 5 target: 50 µs or less a reading with a 200-tree forest,
	// feature extraction, neighbours and novelty included. The cost grows
	// with the history (deeper trees, more past digs to search), so both
	// the demo history and a longer simulated one are measured.
	demoLog, err := features.ReadLog(bytes.NewReader(datasets.DemoHistory), datasets.DemoHistoryName, features.ReadOptions{})
	if err != nil {
		b.Fatal(err)
	}
	digs5k, _, err := datasets.Simulate(datasets.Options{N: 5000, Seed: 42})
	if err != nil {
		b.Fatal(err)
	}
	for _, h := range []struct {
		name string
		log  *features.Log
	}{
		{"history=demo-1500", demoLog},
		{"history=5000", &features.Log{Name: "sim", Freqs: datasets.DefaultFreqs, Digs: digs5k, HasDisplayID: true}},
	} {
		bundle, err := train.TrainBundle(context.Background(), h.log, features.NewSpec(h.log.Freqs, true), train.TrainOptions{Forest: train.Options{Trees: 200, Seed: 1}})
		if err != nil {
			b.Fatal(err)
		}
		c := New(bundle, nil)
		digs := demoReadings(b)
		b.Run(h.name, func(b *testing.B) {
			b.ReportAllocs()
			for i := range b.N {
				if _, err := c.Classify(&digs[i%len(digs)]); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func errorsAs(err error, target any) bool { return errors.As(err, target) }

func TestOneDigHistoryNeverNaN(t *testing.T) {
	// A one-dig history cannot be trained (one class); the smallest
	// history, two digs of two classes, has one neighbour each to compare
	// with, and an empty novelty reference must still give no NaN: every
	// reading unfamiliar (fail safe).
	_, log := demoModel(t)
	var two []features.Dig
	for _, d := range log.Digs {
		if len(two) == 0 || (len(two) == 1 && d.Class(features.LabelBoth) != two[0].Class(features.LabelBoth)) {
			two = append(two, d)
		}
	}
	one := &features.Log{Name: "two", Freqs: log.Freqs, Digs: two[:1], HasDisplayID: true}
	spec0 := features.NewSpec(one.Freqs, true)
	if _, err := train.TrainBundle(context.Background(), one, spec0, train.TrainOptions{NoScreen: true}); !errors.Is(err, train.ErrTooFewClasses) {
		t.Errorf("one-class history: %v", err)
	}
	one.Digs = two
	spec := features.NewSpec(one.Freqs, true)
	b, err := train.TrainBundle(context.Background(), one, spec, train.TrainOptions{Forest: train.Options{Trees: 3, Seed: 1}, NoScreen: true})
	if err != nil {
		t.Fatal(err)
	}
	c := New(b, nil)
	if w := strings.Join(c.Warnings(), " "); !strings.Contains(w, "small history: 2 digs") {
		t.Errorf("warnings %q", w)
	}
	c.reference = nil
	for _, d := range demoReadings(t) {
		r, err := c.Classify(&d)
		if err != nil {
			t.Fatal(err)
		}
		if len(r.Warnings) == 0 {
			t.Errorf("%s: the result does not carry the small-history warning", d.ID)
		}
		n := r.Novelty
		if math.IsNaN(n.Score) || math.IsNaN(n.Percentile) || !n.Unfamiliar || r.Decision.Verdict == VerdictDig {
			t.Errorf("%s: novelty %+v, verdict %q", d.ID, n, r.Decision.Verdict)
		}
		if math.IsNaN(r.Hazard.Probability) {
			t.Errorf("%s: hazard NaN", d.ID)
		}
	}
}

func TestNoProbabilityIsExactlyZeroOrOne(t *testing.T) {
	// Issue 12: a probability is never a guarantee, so the model's
	// probabilities, shrunk toward the class shares, lie strictly inside
	// (0, 1), also for a reading as plain as foil.
	b, _ := demoModel(t)
	if b.Shrinkage == nil || !(b.Shrinkage.Lambda >= train.MinShrink) {
		t.Fatalf("shrinkage %+v", b.Shrinkage)
	}
	c := New(b, nil)
	for _, d := range demoReadings(t) {
		r, _ := c.Classify(&d)
		for cl, p := range r.Probabilities {
			if !(p > 0 && p < 1) {
				t.Errorf("%s: p(%s) = %v", d.ID, cl, p)
			}
		}
	}
}

func TestNoValuesNoVerdictButTheHazardCheck(t *testing.T) {
	b, _ := demoModel(t)
	c := New(b, nil)
	seen := map[Verdict]bool{}
	for _, d := range demoReadings(t) {
		r, _ := c.Classify(&d)
		seen[r.Decision.Verdict] = true
		if r.Decision.Verdict == VerdictDig || r.Decision.Verdict == VerdictSkip {
			t.Errorf("%s: verdict %q without a values file", d.ID, r.Decision.Verdict)
		}
		if r.Decision.Verdict == VerdictNone && r.Decision.Note != NoValuesNote {
			t.Errorf("%s: no verdict, note %q", d.ID, r.Decision.Note)
		}
	}
	// The default hazards still stop the demo's projectile.
	if !seen[VerdictNone] || !seen[VerdictDoNotDig] {
		t.Errorf("verdicts %v", seen)
	}
}

// TestPreparedModelClassifiesAlike: a model that stores its whitening and
// novelty reference (Prepare, as train does) gives, through a save and a
// load, the same results to the bit as one that computes them when loaded.
func TestPreparedModelClassifiesAlike(t *testing.T) {
	b, _ := demoModel(t)
	plain := *b
	plain.Whitening, plain.NoveltyReference = nil, nil
	prepared := plain
	Prepare(&prepared)
	if prepared.Whitening == nil || len(prepared.Whitening.Matrix) != b.Spec.Len()*b.Spec.Len() {
		t.Fatalf("whitening %+v", prepared.Whitening)
	}
	data, err := prepared.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	loaded, err := train.Unmarshal(data)
	if err != nil {
		t.Fatal(err)
	}
	// And as classify loads it: mapped, no out-of-bag rows, and the
	// neighbour index the file holds in place of the vectors.
	path := filepath.Join(t.TempDir(), "m.spade")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	lean, err := train.LoadWith(path, train.LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true})
	if err != nil {
		t.Fatal(err)
	}
	if lean.Training.Index == nil || lean.Training.Vectors != nil {
		t.Fatal("classify's load did not search the stored index")
	}
	a := New(&plain, nil)
	for name, other := range map[string]*train.Bundle{"loaded": loaded, "as classify loads it": lean} {
		c := New(other, nil)
		for _, d := range demoReadings(t) {
			ra, errA := a.Classify(&d)
			rc, errC := c.Classify(&d)
			if errA != nil || errC != nil || !reflect.DeepEqual(ra, rc) {
				t.Fatalf("%s: reading %s: %+v against %+v", name, d.ID, ra, rc)
			}
		}
	}
}
