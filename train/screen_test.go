package train

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"math"
	"slices"
	"testing"

	"github.com/spade-detect/spade/datasets"
	"github.com/spade-detect/spade/features"
)

// smallScreenModel is a 300-dig demo model with a 20-tree screen.
func smallScreenModel(t testing.TB, label features.Label) (*Bundle, *features.Log) {
	log, err := features.ReadLog(bytes.NewReader(datasets.DemoHistory), datasets.DemoHistoryName, features.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	log.Digs = log.Digs[:300]
	spec := features.NewSpec(log.Freqs, log.HasDisplayID)
	b, err := TrainBundle(context.Background(), log, spec, TrainOptions{Label: label, Forest: Options{Trees: 10, Seed: 1},
		Screen: ScreenOptions{Trees: 20, Library: 300}})
	if err != nil {
		t.Fatal(err)
	}
	return b, log
}

func TestScreenSurvivesSaveAndLoad(t *testing.T) {
	b, log := smallScreenModel(t, features.LabelBoth)
	if b.Screen == nil || b.Screen.Depth == nil || b.Screen.Library != datasets.LibraryVersion {
		t.Fatalf("screen %+v", b.Screen)
	}
	data, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	got, err := Unmarshal(data)
	if err != nil {
		t.Fatal(err)
	}
	if got.Format != FormatVersion || got.Screen == nil || got.Screen.Depth == nil {
		t.Fatalf("loaded format %d, screen %+v", got.Format, got.Screen)
	}
	var buf []float64
	for i := range log.Digs[:100] {
		d := &log.Digs[i]
		x, _, _ := b.Spec.Extract(d, nil)
		amp, size := ScreenExtras(d)
		for _, sz := range []float64{size, math.NaN()} {
			var r0, r1 ScreenResult
			r0, buf = b.Screen.Score(x, amp, sz, buf)
			r1, buf = got.Screen.Score(x, amp, sz, buf)
			if r0 != r1 {
				t.Fatalf("dig %s: score %+v before saving, %+v after", d.ID, r0, r1)
			}
		}
	}
	again, _ := got.Marshal()
	if !bytes.Equal(again, data) {
		t.Error("save -> load -> save changes the bytes")
	}
	// The same seed and data give the same bytes (the screen included).
	b2, _ := smallScreenModel(t, features.LabelBoth)
	if d2, _ := b2.Marshal(); !bytes.Equal(d2, data) {
		t.Error("the same seed and log give another model file")
	}
}

func TestScreenKeepsTheHazardUnderEveryLabel(t *testing.T) {
	// With --label material the classes are materials ("steel"), so no
	// class is hazardous; the screen still learns the history's own
	// ordnance digs with the library, and still warns.
	for _, label := range []features.Label{features.LabelMaterial, features.LabelShape} {
		b, log := smallScreenModel(t, label)
		if b.Screen == nil {
			t.Fatalf("%s: no screen", label)
		}
		own := 0
		for i := range log.Digs {
			if IsHazard(&log.Digs[i], DefaultHazards) {
				own++
			}
		}
		if own == 0 || b.Screen.OwnHazardDigs != own {
			t.Errorf("%s: the screen learnt %d of the history's %d ordnance digs", label, b.Screen.OwnHazardDigs, own)
		}
	}
}

func TestIsHazard(t *testing.T) {
	cases := []struct {
		material, shape string
		want            bool
	}{
		{"steel", "ordnance", true}, {"ordnance", "", true}, {"iron", "nail", false}, {"", "", false},
	}
	for _, c := range cases {
		d := &features.Dig{Material: c.material, Shape: c.shape}
		if IsHazard(d, DefaultHazards) != c.want {
			t.Errorf("%s/%s: hazard %v", c.material, c.shape, !c.want)
		}
	}
	if !IsHazard(&features.Dig{Material: "brass", Shape: "fuze"}, []string{"brass/fuze"}) {
		t.Error("a joint class named as a hazard is not one")
	}
}

// encodeV1 writes a bundle as spade wrote format 1: no screen.
func encodeV1(b *Bundle) []byte {
	c := *b
	c.Screen = nil
	return encodeOld(&c, 1)
}

// encodeV2 writes a bundle as spade wrote format 2: the screen's forests
// after the history's.
func encodeV2(b *Bundle) []byte { return encodeOld(b, 2) }

// encodeV3 writes a bundle as spade wrote format 3: the training vectors
// and out-of-bag rows in a binary section after the forests.
func encodeV3(b *Bundle) []byte { return encodeOld(b, 3) }

// encodeOld writes format 1, 2 or 3: the training digs in the JSON (format
// 3: but for the vectors and out-of-bag rows, in a binary section), and
// from format 2 the screen's forests after the history's.
func encodeOld(b *Bundle, version uint16) []byte {
	lean := *b
	if version >= 3 {
		lean.Training.Vectors, lean.Training.OutOfBag = nil, nil
	}
	meta, _ := json.Marshal(metadata{Format: int(version), Bundle: &lean})
	var forest bytes.Buffer
	encodeForest(&forest, b.Forest)
	if version >= 2 {
		screens := b.Screen.forests()
		forest.WriteByte(byte(len(screens)))
		for _, f := range screens {
			encodeForest(&forest, f)
		}
	}
	if version >= 3 {
		encodeMatrix(&forest, b.Training.Vectors, b.Spec.Len())
		encodeMatrix(&forest, b.Training.OutOfBag, len(b.Classes))
	}
	var out bytes.Buffer
	out.WriteString(magic)
	binary.Write(&out, binary.LittleEndian, version)
	binary.Write(&out, binary.LittleEndian, uint16(0))
	binary.Write(&out, binary.LittleEndian, uint64(4+len(meta)+forest.Len()))
	binary.Write(&out, binary.LittleEndian, uint32(len(meta)))
	out.Write(meta)
	out.Write(forest.Bytes())
	sum := sha256Sum(out.Bytes())
	out.Write(sum[:])
	return out.Bytes()
}

func TestFormat1StillLoads(t *testing.T) {
	b := trainSmall(t, 3, 1)
	got, err := Unmarshal(encodeV1(b))
	if err != nil {
		t.Fatal(err)
	}
	if got.Format != 1 || got.Screen != nil {
		t.Errorf("format %d, screen %v", got.Format, got.Screen)
	}
	x := make([]float64, b.Spec.Len())
	if !slices.Equal(got.Forest.Predict(x, nil), b.Forest.Predict(x, nil)) {
		t.Error("a format 1 model predicts otherwise")
	}
}

func TestScreenTierMismatchIsCorrupt(t *testing.T) {
	// A header that says format 2 and metadata that says 1 is refused.
	b := trainSmall(t, 3, 1)
	v1 := encodeV1(b)
	v1[8] = 2
	sum := sha256Sum(v1[:len(v1)-32])
	copy(v1[len(v1)-32:], sum[:])
	if _, err := Unmarshal(v1); !errors.Is(err, ErrCorrupt) {
		t.Errorf("format mismatch: %v", err)
	}
}

func TestFormat2And3HoldTheSameTraining(t *testing.T) {
	// Issue 15: format 3 keeps the training vectors and out-of-bag rows in
	// a binary section. They come back bit for bit, and a format 2 file of
	// the same bundle (vectors in the JSON) still loads to the same.
	b := trainSmall(t, 5, 2)
	three, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	if bytes.Contains(three, []byte(`"vectors"`)) || bytes.Contains(three, []byte(`"out_of_bag":[[`)) {
		t.Error("format 3 still writes the vectors as JSON")
	}
	for name, data := range map[string][]byte{"format 3": three, "format 2": encodeV2(b)} {
		got, err := Unmarshal(data)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !sameTraining(&got.Training, &b.Training) {
			t.Errorf("%s: training differs", name)
		}
	}
	// A cut binary section is refused, never a panic.
	cut := slices.Clone(three[:len(three)-32-40])
	binary.LittleEndian.PutUint64(cut[12:], uint64(len(cut)-headerLen))
	sum := sha256Sum(cut)
	if _, err := Unmarshal(append(cut, sum[:]...)); !errors.Is(err, ErrCorrupt) {
		t.Errorf("cut binary section: %v", err)
	}
}
