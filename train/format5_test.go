package train

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/kdtree"
	"gonum.org/v1/gonum/stat"
)

// withWhitening is b with a whitening as classify.Prepare would store one
// (here each feature scaled by its standard deviation, gonum's stat.StdDev),
// so that its file holds a neighbour index.
func withWhitening(b *Bundle) *Bundle {
	p := b.Spec.Len()
	w := &Whitening{Mean: make([]float64, p), Matrix: make([]float64, p*p)}
	col := make([]float64, len(b.Training.Vectors))
	for j := range p {
		for i, v := range b.Training.Vectors {
			col[i] = v[j]
		}
		m, sd := stat.MeanStdDev(col, nil)
		w.Mean[j], w.Matrix[j*p+j] = m, 1/math.Max(sd, 1e-9)
	}
	c := *b
	c.Whitening = w
	return &c
}

// TestFormat5HoldsItsIndex: the neighbour index a format 5 file holds is
// the training vectors whitened as classify whitens them (to the bit),
// each once, and passes the index's check; classify's load (mapped, no
// out-of-bag rows) gives that index in place of the vectors, and such a
// bundle refuses to be saved. Format 4's own whitened load gives the same
// whitened vectors.
func TestFormat5HoldsItsIndex(t *testing.T) {
	plain, log := smallScreenModel(t, features.LabelBoth)
	b := withWhitening(plain)
	data, err := b.Marshal()
	if err != nil {
		t.Fatal(err)
	}
	again, _ := b.Marshal()
	if !bytes.Equal(data, again) {
		t.Fatal("the same bundle gave different bytes")
	}
	whole, err := Unmarshal(data)
	if err != nil {
		t.Fatal(err)
	}
	x := whole.Training.Index
	p, n := b.Spec.Len(), len(b.Training.Y)
	if x == nil || x.Check(n, p) != nil {
		t.Fatal("no index, or one that fails its check")
	}
	for pos, row := range x.Perm {
		want := b.Whitening.Apply(b.Training.Vectors[row], nil)
		for j := range p {
			if math.Float64bits(x.Points[pos*p+j]) != math.Float64bits(want[j]) {
				t.Fatalf("index point %d (dig %d) column %d: %v, want %v", pos, row, j, x.Points[pos*p+j], want[j])
			}
		}
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "m.spade")
	os.WriteFile(path, data, 0o644)
	lean, err := LoadWith(path, LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true})
	if err != nil {
		t.Fatal(err)
	}
	if lean.Training.Vectors != nil || lean.Training.OutOfBag != nil || lean.Training.Index == nil {
		t.Error("classify's load holds the vectors or the out-of-bag rows, or no index")
	}
	if !slicesEqualBits(lean.Training.Index.Points, x.Points) {
		t.Error("the mapped index differs from the read one")
	}
	if _, err := lean.Marshal(); err == nil {
		t.Error("a bundle loaded in part was saved")
	}
	sameModel(t, "whole", b, whole, log)

	path4 := filepath.Join(dir, "m4.spade")
	os.WriteFile(path4, encodeV4(b), 0o644)
	four, err := LoadWith(path4, LoadOptions{NoOutOfBag: true, Whitened: true})
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range four.Training.Vectors {
		if !slicesEqualBits(v, b.Whitening.Apply(b.Training.Vectors[i], nil)) {
			t.Fatalf("format 4 whitened load, dig %d: %v", i, v)
		}
	}
}

func slicesEqualBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// sections5 are a format 5 file's sections' offsets and lengths.
func sections5(data []byte) (table int, offs, lens []uint64) {
	mlen := binary.LittleEndian.Uint32(data[headerLen:])
	nsec := int(binary.LittleEndian.Uint32(data[headerLen+4:]))
	table = int(align8(uint64(headerLen + 8 + mlen)))
	for i := range nsec {
		offs = append(offs, binary.LittleEndian.Uint64(data[table+16*i:]))
		lens = append(lens, binary.LittleEndian.Uint64(data[table+16*i+8:]))
	}
	return table, offs, lens
}

// reseal gives a format 5 file whose sections were changed the checksums
// of what it now holds, so that the decoders, not the checksums, meet the
// change (a hostile file rather than a damaged one). Anything it cannot
// make sense of comes back as it was.
func reseal(data []byte) []byte {
	if len(data) < headerLen+8 || string(data[:len(magic)]) != magic || binary.LittleEndian.Uint16(data[8:]) != format5 {
		return data
	}
	mlen := binary.LittleEndian.Uint32(data[headerLen:])
	nsec := int(binary.LittleEndian.Uint32(data[headerLen+4:]))
	if nsec > maxSections || nsec < trainingSections || uint64(align8(uint64(headerLen+8+mlen)))+16*uint64(nsec) > uint64(len(data)) {
		return data
	}
	out := bytes.Clone(data)
	table, offs, lens := sections5(out)
	at := table + 16*nsec
	for i := range offs {
		if offs[i] > uint64(len(out)) || lens[i] > uint64(len(out))-offs[i] {
			return data
		}
	}
	for i := range offs {
		sec := out[offs[i] : offs[i]+lens[i]]
		// Every MiB, but a forest's nodes by tree.
		var spans []uint64
		if i < nsec-trainingSections && i%forestSections == secNodes {
			roots := out[offs[i-secNodes+secRoots] : offs[i-secNodes+secRoots]+lens[i-secNodes+secRoots]]
			for j := 0; j+4 <= len(roots); j += 4 {
				spans = append(spans, 12*uint64(binary.LittleEndian.Uint32(roots[j:])))
			}
		} else {
			for lo := uint64(0); lo < lens[i]; lo += blockSize {
				spans = append(spans, lo)
			}
		}
		spans = append(spans, lens[i])
		for j := range len(spans) - 1 {
			lo, hi := spans[j], spans[j+1]
			if at+4 > len(out) || lo > hi || hi > lens[i] {
				return data
			}
			binary.LittleEndian.PutUint32(out[at:], crc32.Checksum(sec[lo:hi], castagnoli))
			at += 4
		}
	}
	if at+4 > len(out) {
		return data
	}
	binary.LittleEndian.PutUint32(out[at:], crc32.Checksum(out[:at], castagnoli))
	return out
}

// TestFormat5RejectsDamage: a damaged file is refused and named as such,
// read or mapped: a bit flipped in any section or in the metadata, a file
// cut short or grown, padding that is not zero. A flip in a section a
// load leaves out (classify's, the out-of-bag rows) goes unseen by that
// load, as it never reads those bytes; a whole load refuses it.
func TestFormat5RejectsDamage(t *testing.T) {
	b, _ := smallScreenModel(t, features.LabelBoth)
	good, _ := withWhitening(b).Marshal()
	table, offs, lens := sections5(good)
	dir := t.TempDir()
	type damage struct {
		name, want string
		data       []byte
	}
	var cases []damage
	for i := range offs {
		if lens[i] == 0 {
			continue
		}
		d := bytes.Clone(good)
		d[offs[i]+lens[i]/2] ^= 0x10
		cases = append(cases, damage{"bit flipped in section " + string(rune('0'+i%10)), "checksum mismatch in section", d})
	}
	meta := bytes.Clone(good)
	meta[headerLen+20] ^= 0x01
	tab := bytes.Clone(good)
	tab[table+8] ^= 0x08 // the first section's length
	pad := bytes.Clone(good)
	last := len(offs) - 1
	for i := range offs {
		if lens[i]%8 != 0 {
			last = i
			break
		}
	}
	pad[offs[last]+lens[last]] = 1
	cases = append(cases,
		damage{"bit flipped in the metadata", "checksum mismatch", meta},
		damage{"section length changed", "", tab},
		damage{"padding not zero", "padding", reseal(pad)},
		damage{"truncated", "truncated", good[:len(good)-100]},
		damage{"grown", "after the last section", append(bytes.Clone(good), make([]byte, 8)...)},
	)
	for _, c := range cases {
		path := filepath.Join(dir, "m")
		os.WriteFile(path, c.data, 0o644)
		for _, o := range []LoadOptions{{}, {Mapped: true}} {
			_, err := LoadWith(path, o)
			if !errors.Is(err, ErrCorrupt) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("%s %+v: %v, want %q", c.name, o, err, c.want)
			}
		}
		if _, err := Unmarshal(c.data); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s: Unmarshal: %v", c.name, err)
		}
	}
	oob := bytes.Clone(good)
	i := len(offs) - trainingSections + secOutOfBag
	oob[offs[i]+lens[i]/2] ^= 0x10
	path := filepath.Join(dir, "oob")
	os.WriteFile(path, oob, 0o644)
	if _, err := LoadWith(path, LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true}); err != nil {
		t.Errorf("classify's load read the out-of-bag rows: %v", err)
	}
	if _, err := Load(path); !errors.Is(err, ErrCorrupt) {
		t.Errorf("a whole load took damaged out-of-bag rows: %v", err)
	}
}

// TestFormat5RefusesHostileSections: sections that are wrong with the
// checksums right (resealed) are refused as corrupt, never used: strings'
// offsets out of order or not UTF-8, a class out of range, an index node
// pointing back to the root, an index naming one dig twice, a forest node
// whose child is past its tree.
func TestFormat5RefusesHostileSections(t *testing.T) {
	b, _ := smallScreenModel(t, features.LabelBoth)
	good, _ := withWhitening(b).Marshal()
	_, offs, _ := sections5(good)
	tr := len(offs) - trainingSections
	at := func(sec int) uint64 { return offs[tr+sec] }
	cases := map[string]func(d []byte){
		"id offsets out of order": func(d []byte) { binary.LittleEndian.PutUint32(d[at(secIDOffsets)+8:], 0) },
		"date not UTF-8":          func(d []byte) { d[at(secDates)+3] = 0xff },
		"class out of range":      func(d []byte) { binary.LittleEndian.PutUint32(d[at(secY)+4:], 99) },
		"index node to the root":  func(d []byte) { binary.LittleEndian.PutUint32(d[at(secIndexNodes)+16:], 0) },
		"index dig twice":         func(d []byte) { copy(d[at(secPerm)+4:at(secPerm)+8], d[at(secPerm):]) },
		"forest node out of tree": func(d []byte) { binary.LittleEndian.PutUint32(d[offs[secNodes]+8:], 5<<restBits|1<<20) },
	}
	for name, mutate := range cases {
		d := bytes.Clone(good)
		mutate(d)
		if _, err := Unmarshal(reseal(d)); !errors.Is(err, ErrCorrupt) || strings.Contains(err.Error(), "checksum") {
			t.Errorf("%s: %v", name, err)
		}
	}
	if _, err := Unmarshal(reseal(good)); err != nil {
		t.Fatalf("resealed unchanged: %v", err)
	}
}

// TestShortHistoryHoldsNoIndex: below kdtree.MinRows digs a scan is as fast
// as an index, so the file holds none, and classify's load keeps the
// vectors (to whiten and scan) rather than leaving them out.
func TestShortHistoryHoldsNoIndex(t *testing.T) {
	ds, spec := demo(t)
	idx := make([]int, kdtree.MinRows-1)
	for i := range idx {
		idx[i] = i * 5
	}
	small, err := TrainDataset(context.Background(), ds.Subset(idx), spec, TrainOptions{Forest: Options{Trees: 3, Seed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	data, err := withWhitening(small).Marshal()
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "m.spade")
	os.WriteFile(path, data, 0o644)
	lean, err := LoadWith(path, LoadOptions{NoOutOfBag: true, Whitened: true, Mapped: true})
	if err != nil {
		t.Fatal(err)
	}
	if lean.Training.Index != nil || len(lean.Training.Vectors) != len(idx) {
		t.Errorf("a %d-dig history: index %v, %d vectors", len(idx), lean.Training.Index != nil, len(lean.Training.Vectors))
	}
}

// TestFormat5CutAfterTheHead: a file of metadata and empty sections that
// ends a few bytes after its head checksum, its header's length and that
// checksum made to match (a hostile file, not a damaged one), is refused
// as corrupt by a load from a file, which no recover guards: before,
// finding the padding after the head sliced past the end.
func TestFormat5CutAfterTheHead(t *testing.T) {
	b, _ := smallScreenModel(t, features.LabelBoth)
	good, _ := withWhitening(b).Marshal()
	table, offs, _ := sections5(good)
	head := bytes.Clone(good[:table+16*len(offs)])
	for i := range offs {
		binary.LittleEndian.PutUint64(head[table+16*i:], 0)
		binary.LittleEndian.PutUint64(head[table+16*i+8:], 0) // empty: no block checksums
	}
	for _, extra := range []int{0, 1, 2, 3} {
		cut := append(bytes.Clone(head), make([]byte, 4+extra)...)
		binary.LittleEndian.PutUint64(cut[12:], uint64(len(cut)-headerLen))
		binary.LittleEndian.PutUint32(cut[len(head):], crc32.Checksum(cut[:len(head)], castagnoli))
		path := filepath.Join(t.TempDir(), "m.spade")
		os.WriteFile(path, cut, 0o644)
		for _, o := range []LoadOptions{{}, {Mapped: true}} {
			if _, err := LoadWith(path, o); !errors.Is(err, ErrCorrupt) {
				t.Errorf("cut %d bytes after the head checksum, %+v: %v", extra, o, err)
			}
		}
	}
}

// TestFormat5LastSectionPastTheEnd: a hostile file whose last section
// starts past its end, where the one before it ends within the last 8
// bytes, is refused as corrupt, not sliced past the end.
func TestFormat5LastSectionPastTheEnd(t *testing.T) {
	b, _ := smallScreenModel(t, features.LabelBoth)
	good, _ := withWhitening(b).Marshal()
	table, offs, _ := sections5(good)
	nsec := len(offs)
	out := bytes.Clone(good[:table+16*nsec])
	body := []byte("abcde")
	at := len(out) + 4 // one block checksum, of section nsec-2
	next := int(align8(uint64(at + 4)))
	for i := range nsec {
		off, n := next, 0
		switch i {
		case nsec - 2:
			n = len(body)
		case nsec - 1:
			off = int(align8(uint64(next + len(body))))
		}
		binary.LittleEndian.PutUint64(out[table+16*i:], uint64(off))
		binary.LittleEndian.PutUint64(out[table+16*i+8:], uint64(n))
	}
	out = binary.LittleEndian.AppendUint32(out, crc32.Checksum(body, castagnoli))
	out = append(out, make([]byte, next-len(out))...)
	out = append(out, body...)
	binary.LittleEndian.PutUint64(out[12:], uint64(len(out)-headerLen))
	binary.LittleEndian.PutUint32(out[at:], crc32.Checksum(out[:at], castagnoli))
	path := filepath.Join(t.TempDir(), "m.spade")
	os.WriteFile(path, out, 0o644)
	for _, o := range []LoadOptions{{}, {Mapped: true}} {
		if _, err := LoadWith(path, o); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%+v: %v", o, err)
		}
	}
}
