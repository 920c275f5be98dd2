package train

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"hash/crc32"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"github.com/spade-detect/spade/features"
)

// sameModel fails unless a and b predict the same to the bit, screen
// included, on every dig of log and on a reading with a NaN, and hold the
// same training digs.
func sameModel(t *testing.T, name string, a, b *Bundle, log *features.Log) {
	t.Helper()
	if !sameTraining(&a.Training, &b.Training) {
		t.Errorf("%s: training digs differ", name)
	}
	var pa, pb []float64
	for i := range log.Digs {
		d := &log.Digs[i]
		x, _, _ := a.Spec.Extract(d, nil)
		if i == 0 {
			x[0] = math.NaN()
		}
		pa, pb = a.Predict(x, pa), b.Predict(x, pb)
		for k := range pa {
			if math.Float64bits(pa[k]) != math.Float64bits(pb[k]) {
				t.Fatalf("%s: dig %s class %d: %v against %v", name, d.ID, k, pa[k], pb[k])
			}
		}
		if a.Screen != nil {
			amp, size := ScreenExtras(d)
			ra, _ := a.Screen.Score(x, amp, size, nil)
			rb, _ := b.Screen.Score(x, amp, size, nil)
			if ra != rb {
				t.Fatalf("%s: dig %s: screen %+v against %+v", name, d.ID, ra, rb)
			}
		}
	}
}

// encodeV4 writes a bundle as spade wrote format 4: one stream, a CRC-32C
// at its end.
func encodeV4(b *Bundle) []byte {
	lean := *b
	lean.Training = Training{}
	meta, err := json.Marshal(metadata{Format: format4, Bundle: &lean})
	if err != nil {
		panic(err)
	}
	var rest bytes.Buffer
	encode4(&rest, b)
	out := []byte(magic)
	out = binary.LittleEndian.AppendUint16(out, format4)
	out = binary.LittleEndian.AppendUint16(out, 0)
	out = binary.LittleEndian.AppendUint64(out, uint64(4+len(meta)+rest.Len()))
	out = binary.LittleEndian.AppendUint32(out, uint32(len(meta)))
	out = append(append(out, meta...), rest.Bytes()...)
	return binary.LittleEndian.AppendUint32(out, crc32.Checksum(out, castagnoli))
}

// TestFormatsLoadAlike: a bundle written as format 2, 3, 4 and 5 loads to
// the same training digs, probabilities and screen scores, and saved again
// gives format 5's bytes; format 4 is read the same from a file (streamed)
// as from bytes, and format 5 the same read, mapped, or copied as a
// big-endian machine copies it; a mixed-leaf forest (minimum leaf 4)
// round-trips too.
func TestFormatsLoadAlike(t *testing.T) {
	b, log := smallScreenModel(t, features.LabelBoth)
	five, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	four := encodeV4(b)
	for name, data := range map[string][]byte{"format 4": four, "format 5": five} {
		if bytes.Contains(data, []byte(`"SR-`)) || bytes.Contains(data, []byte(`"vectors"`)) {
			t.Errorf("%s writes the training digs as JSON", name)
		}
	}
	dir := t.TempDir()
	for name, data := range map[string][]byte{"format 4": four, "format 5": five} {
		path := filepath.Join(dir, strings.ReplaceAll(name, " ", ""))
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		for _, o := range []LoadOptions{{}, {Mapped: true}} {
			got, err := LoadWith(path, o)
			if err != nil {
				t.Fatalf("%s %+v: %v", name, o, err)
			}
			sameModel(t, fmt.Sprintf("%s from a file %+v", name, o), b, got, log)
		}
	}
	for name, data := range map[string][]byte{"format 2": encodeV2(b), "format 3": encodeV3(b), "format 4": four, "format 5": five} {
		got, err := Unmarshal(data)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		sameModel(t, name, b, got, log)
		if again, _ := got.Marshal(); !bytes.Equal(again, five) {
			t.Errorf("%s: loaded and saved again, the bytes differ", name)
		}
	}
	zeroCopy = false
	copied, err := Unmarshal(five)
	zeroCopy = hostLittleEndian
	if err != nil {
		t.Fatal(err)
	}
	sameModel(t, "format 5 copied", b, copied, log)

	ds, spec := demo(t)
	mixed, err := TrainDataset(context.Background(), ds, spec, TrainOptions{Label: features.LabelBoth, Forest: Options{Trees: 6, Seed: 3, MinLeaf: 4}})
	if err != nil {
		t.Fatal(err)
	}
	if len(mixed.Forest.flat.leafCls) == 0 {
		t.Fatal("no mixed leaves")
	}
	data, _ := mixed.Marshal()
	got, err := Unmarshal(data)
	if err != nil {
		t.Fatal(err)
	}
	sameModel(t, "mixed leaves", mixed, got, log)
}

// TestLoadWithoutOutOfBag: classify's load leaves the out-of-bag rows out;
// all else is as a whole load, and such a bundle refuses to be saved (it
// would lose them). Formats 3, 4 and 5 alike.
func TestLoadWithoutOutOfBag(t *testing.T) {
	b, log := smallScreenModel(t, features.LabelBoth)
	dir := t.TempDir()
	five, _ := b.Marshal()
	for name, data := range map[string][]byte{"format 3": encodeV3(b), "format 4": encodeV4(b), "format 5": five} {
		path := filepath.Join(dir, strings.ReplaceAll(name, " ", ""))
		os.WriteFile(path, data, 0o644)
		got, err := LoadWith(path, LoadOptions{NoOutOfBag: true})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if got.Training.OutOfBag != nil {
			t.Errorf("%s: out-of-bag rows loaded", name)
		}
		whole := *got
		whole.Training.OutOfBag = b.Training.OutOfBag
		sameModel(t, name, b, &whole, log)
		if _, err := got.Marshal(); err == nil {
			t.Errorf("%s: a partial bundle was saved", name)
		}
	}
}

// TestStreamedLoadRejectsDamage: the streamed load refuses what Unmarshal
// refuses, and a damaged payload is named as such (checksum mismatch),
// not as whatever the decoder tripped on first.
func TestStreamedLoadRejectsDamage(t *testing.T) {
	good := encodeV4(trainSmall(t, 4, 1))
	flip := bytes.Clone(good)
	flip[len(flip)/3] ^= 0x40 // in the forest's nodes
	meta := bytes.Clone(good)
	meta[headerLen+10] ^= 0x01 // in the JSON
	dir := t.TempDir()
	for _, c := range []struct {
		name, want string
		data       []byte
	}{
		{"bit flipped in the forest", "checksum mismatch", flip},
		{"bit flipped in the metadata", "checksum mismatch", meta},
		{"truncated", "truncated", good[:len(good)-1000]},
		{"no checksum", "truncated", good[:len(good)-4]},
		{"trailing bytes", "after the checksum", append(bytes.Clone(good), 0)},
	} {
		path := filepath.Join(dir, "m")
		os.WriteFile(path, c.data, 0o644)
		_, err := Load(path)
		if !errors.Is(err, ErrCorrupt) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
		if _, err := Unmarshal(c.data); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s: Unmarshal: %v", c.name, err)
		}
	}
}

// TestMalformedForestRefused: a format 4 forest that is not one compile
// could make (a cycle, a node with two parents, a class or feature out of
// range, a zero count, a mixed leaf out of order) is refused as corrupt
// even with a valid checksum, never walked.
func TestMalformedForestRefused(t *testing.T) {
	ds, spec := demo(t)
	b, err := TrainDataset(context.Background(), ds, spec, TrainOptions{Label: features.LabelBoth, Forest: Options{Trees: 3, Seed: 5, MinLeaf: 3}})
	if err != nil {
		t.Fatal(err)
	}
	ff := b.Forest.flat
	split, pure, mixed := -1, -1, -1
	for i, n := range ff.nodes[:ff.roots[1]] {
		switch {
		case n.kind() < leafKind && split < 0 && n.rest() > 2:
			split = i
		case n.kc == pureKC && pure < 0:
			pure = i
		case n.kc == mixedKC && mixed < 0 && n.lo > 0:
			mixed = i
		}
	}
	if split < 0 || pure < 0 || mixed < 0 {
		t.Fatalf("no split, pure or mixed leaf found: %d %d %d", split, pure, mixed)
	}
	orig := ff.nodes[split]
	// Two splits, the later one's children after the earlier: pointing the
	// earlier at the later's children gives those two parents.
	first, second := -1, -1
	for i, n := range ff.nodes[:ff.roots[1]] {
		for j, m := range ff.nodes[i+1 : ff.roots[1]] {
			if n.kind() < leafKind && m.kind() < leafKind && m.rest() > int32(i) {
				first, second = i, i+1+j
				break
			}
		}
		if first >= 0 {
			break
		}
	}
	// Two mixed leaves of as many shares, their shares swapped.
	m1, m2 := -1, -1
	for i, n := range ff.nodes {
		for j := i + 1; j < len(ff.nodes) && m1 < 0 && n.kc == mixedKC; j++ {
			if m := ff.nodes[j]; m.kc == mixedKC && m.hi == n.hi {
				m1, m2 = i, j
			}
		}
	}
	if first < 0 || m1 < 0 {
		t.Fatalf("no pair of splits or of mixed leaves found: %d %d", first, m1)
	}
	cases := map[string]func(n []flatNode){
		"child before its parent": func(n []flatNode) { n[split].kc = orig.kc&^restMask | uint32(split) },
		"node with two parents":   func(n []flatNode) { n[first].kc = n[first].kc&^restMask | uint32(n[second].rest()) },
		"mixed leaves swapped":    func(n []flatNode) { n[m1].lo, n[m2].lo = n[m2].lo, n[m1].lo },
		"child past the tree":     func(n []flatNode) { n[split].kc = orig.kc&^restMask | uint32(ff.roots[1]) },
		"feature out of range":    func(n []flatNode) { n[split].kc = uint32(len(spec.Names))<<restBits | uint32(orig.rest()) },
		"class out of range":      func(n []flatNode) { n[pure].lo = uint32(ff.K) },
		"zero count":              func(n []flatNode) { n[pure].hi = 0 },
		"unknown kind":            func(n []flatNode) { n[pure].kc = pureKC | 7 },
		"mixed leaf out of order": func(n []flatNode) { n[mixed].lo-- },
	}
	for name, mutate := range cases {
		bad := *b
		badFF := *ff
		badFF.nodes = slices.Clone(ff.nodes)
		mutate(badFF.nodes)
		bad.Forest = &Forest{Names: b.Forest.Names, Classes: b.Forest.Classes, flat: &badFF}
		data, err := bad.Marshal()
		if err != nil {
			t.Fatal(err)
		}
		if _, err := Unmarshal(data); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s: %v", name, err)
		}
		if _, err := Unmarshal(encodeV4(&bad)); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s, format 4: %v", name, err)
		}
	}
	// The unmutated forest, through the same path, loads.
	data, _ := b.Marshal()
	if _, err := Unmarshal(data); err != nil {
		t.Fatal(err)
	}
}

// sameTraining compares what a Training holds, not how it is stored.
func sameTraining(a, b *Training) bool {
	return reflect.DeepEqual(a.IDs, b.IDs) && reflect.DeepEqual(a.Dates, b.Dates) && reflect.DeepEqual(a.Y, b.Y) &&
		reflect.DeepEqual(a.Vectors, b.Vectors) && reflect.DeepEqual(a.OutOfBag, b.OutOfBag)
}

// TestFullyGrownForestChecked: a fully grown forest (pure leaves only) is
// checked at a format 5 load by checkWalk, the fast way, and refused when
// a walk could leave its tree or its arrays. Two splits sharing children
// leave every walk safe, so that load takes them; the tree is then not
// rebuilt (Forest.Tree and golearn's tree are nil), and format 4's load,
// which checks the shape in full, refuses it.
func TestFullyGrownForestChecked(t *testing.T) {
	b := trainSmall(t, 3, 5)
	ff := b.Forest.flat
	if len(ff.leafCls) != 0 {
		t.Fatal("mixed leaves in a fully grown forest")
	}
	split := slices.IndexFunc(ff.nodes[:ff.roots[1]], func(n flatNode) bool { return n.kind() < leafKind && n.rest() > 2 })
	pure := slices.IndexFunc(ff.nodes[:ff.roots[1]], func(n flatNode) bool { return n.kc == pureKC })
	second := slices.IndexFunc(ff.nodes[split+1:ff.roots[1]], func(n flatNode) bool { return n.kind() < leafKind }) + split + 1
	orig := ff.nodes[split]
	mutated := func(mutate func(n []flatNode)) *Bundle {
		bad := *b
		badFF := *ff
		badFF.nodes = slices.Clone(ff.nodes)
		mutate(badFF.nodes)
		bad.Forest = &Forest{Names: b.Forest.Names, Classes: b.Forest.Classes, flat: &badFF}
		return &bad
	}
	for name, mutate := range map[string]func(n []flatNode){
		"child before its parent": func(n []flatNode) { n[split].kc = orig.kc&^restMask | uint32(split) },
		"child past the tree":     func(n []flatNode) { n[split].kc = orig.kc&^restMask | uint32(ff.roots[1]) },
		"feature out of range":    func(n []flatNode) { n[split].kc = uint32(len(b.Spec.Names))<<restBits | uint32(orig.rest()) },
		"class out of range":      func(n []flatNode) { n[pure].lo = uint32(ff.K) },
		"zero count":              func(n []flatNode) { n[pure].hi = 0 },
		"unknown kind":            func(n []flatNode) { n[pure].kc = pureKC | 7 },
	} {
		data, _ := mutated(mutate).Marshal()
		if _, err := Unmarshal(data); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s: %v", name, err)
		}
	}
	shared := mutated(func(n []flatNode) { n[split].kc = orig.kc&^restMask | uint32(n[second].rest()) })
	data, _ := shared.Marshal()
	got, err := Unmarshal(data)
	if err != nil {
		t.Fatalf("shared children, walk-safe: %v", err)
	}
	if got.Forest.Tree(0) != nil || got.Forest.Tree(1) == nil {
		t.Error("tree 0 rebuilt though not a tree, or tree 1 not rebuilt")
	}
	if _, err := Unmarshal(encodeV4(shared)); !errors.Is(err, ErrCorrupt) {
		t.Errorf("format 4 took shared children: %v", err)
	}
}
