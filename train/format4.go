package train

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash"
	"hash/crc32"
	"io"
	"math"
	"strings"
	"unicode/utf8"
)

// Format 4 (issue 15) is laid out so that loading is a straight read in one
// pass, streamed from the file through its checksum, with every array
// allocated once at its final size:
//
//	magic "SPADEMDL" | version uint16 = 4 | reserved uint16 | payload length uint64
//	payload: metadata length uint32 | metadata (JSON, without the training digs)
//	         | forest | screen forest count (uvarint) | screen forests
//	         | training digs: count (uvarint), ids, dates (strings), classes
//	           (uvarints) | training vectors | out-of-bag probabilities
//	CRC-32C (Castagnoli) of everything before it, uint32
//
// A forest is its tree, node and mixed-leaf-share counts (uvarints), each
// tree's first node (uint32), the mixed leaves' (class, count) pairs (two
// uint32s) and the nodes as they are kept in memory (three uint32s: see
// flatNode). A string list is each string's length (uvarints) and then all
// their bytes. A matrix is as in format 3. All integers are little-endian.
//
// The checksum is CRC-32C rather than format 3's SHA-256: it is there to
// catch a damaged file, not a forged one, and at 100,000 digs SHA-256 took
// 40 ms of a load that now takes about 100 in all. Decoding the trees node
// by node and the digs' ids from JSON took most of the rest.
const format4 = 4

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

// LoadOptions choose what Load may leave out.
type LoadOptions struct {
	// NoOutOfBag skips the training digs' out-of-bag probabilities, which
	// only the overlap analysis reads (10 MB at 100,000 digs). A bundle
	// loaded without them cannot be saved again.
	NoOutOfBag bool
	// Whitened whitens the training vectors as they are read, by the
	// model's Whitening, when it has one (see Bundle.VectorsWhitened): the
	// neighbour space then needs no copy of its own (10 MB at 100,000
	// digs). Such a bundle cannot be saved again either. From a format 5
	// file that holds its neighbour index (Training.Index), which is in
	// that space already, the vectors as they were are left out instead.
	Whitened bool
	// Mapped maps a format 5 file into memory rather than reading it, so
	// that the sections this load leaves out are never read at all and the
	// rest are read as they are first used; the mapping lasts as long as
	// the process. For a command that loads one model and exits.
	Mapped bool
}

// encode4 writes the payload after the metadata.
func encode4(w *bytes.Buffer, b *Bundle) {
	encodeFlat(w, b.Forest.flat)
	screens := b.Screen.forests()
	putUvarint(w, uint64(len(screens)))
	for _, f := range screens {
		encodeFlat(w, f.flat)
	}
	t := &b.Training
	putUvarint(w, uint64(len(t.Y)))
	encodeStrings(w, t.IDs)
	encodeStrings(w, t.Dates)
	for _, y := range t.Y {
		putUvarint(w, uint64(y))
	}
	encodeMatrix(w, t.Vectors, b.Spec.Len())
	encodeMatrix(w, t.OutOfBag, len(b.Classes))
}

func putUvarint(w *bytes.Buffer, v uint64) {
	var buf [binary.MaxVarintLen64]byte
	w.Write(buf[:binary.PutUvarint(buf[:], v)])
}

func encodeFlat(w *bytes.Buffer, ff *flatForest) {
	putUvarint(w, uint64(len(ff.roots)))
	putUvarint(w, uint64(len(ff.nodes)))
	putUvarint(w, uint64(len(ff.leafCls)))
	w.Grow(4*len(ff.roots) + 12*len(ff.nodes) + 8*len(ff.leafCls))
	var b [12]byte
	for _, r := range ff.roots {
		binary.LittleEndian.PutUint32(b[:], uint32(r))
		w.Write(b[:4])
	}
	for j := range ff.leafCls {
		binary.LittleEndian.PutUint32(b[0:], uint32(ff.leafCls[j]))
		binary.LittleEndian.PutUint32(b[4:], uint32(ff.leafCount[j]))
		w.Write(b[:8])
	}
	for _, n := range ff.nodes {
		binary.LittleEndian.PutUint32(b[0:], n.lo)
		binary.LittleEndian.PutUint32(b[4:], n.hi)
		binary.LittleEndian.PutUint32(b[8:], n.kc)
		w.Write(b[:])
	}
}

func encodeStrings(w *bytes.Buffer, ss []string) {
	for _, s := range ss {
		putUvarint(w, uint64(len(s)))
	}
	for _, s := range ss {
		w.WriteString(s)
	}
}

// decoder reads a payload with every count checked against the bytes left,
// so a damaged or hostile file can neither make it allocate more than the
// file holds nor loop without bound.
type decoder struct {
	r    byteReader
	left uint64 // payload bytes not yet read
	buf  []byte
}

type byteReader interface {
	io.Reader
	io.ByteReader
}

var errShort = errors.New("the payload ends early")

func (d *decoder) uvarint(limit uint64, what string) (uint64, error) {
	var v uint64
	for s := uint(0); ; s += 7 {
		if d.left == 0 {
			return 0, fmt.Errorf("%s: %w", what, errShort)
		}
		c, err := d.r.ReadByte()
		if err != nil {
			return 0, fmt.Errorf("%s: %w", what, err)
		}
		d.left--
		if s == 63 && c > 1 || s > 63 {
			return 0, fmt.Errorf("%s: number too long", what)
		}
		v |= uint64(c&0x7f) << s
		if c < 0x80 {
			break
		}
	}
	if v > limit {
		return 0, fmt.Errorf("%s %d out of range (max %d)", what, v, limit)
	}
	return v, nil
}

// read reads n bytes, in pieces of at most 1 MB into one reused buffer, and
// hands each piece to f.
func (d *decoder) read(n uint64, f func([]byte)) error { return d.readUnits(n, 1, f) }

// readUnits is read in pieces that are whole multiples of unit bytes.
func (d *decoder) readUnits(n, unit uint64, f func([]byte)) error {
	if n > d.left {
		return errShort
	}
	for n > 0 {
		m := min(n, 1<<20/unit*unit)
		if uint64(cap(d.buf)) < m {
			d.buf = make([]byte, m)
		}
		p := d.buf[:m]
		if _, err := io.ReadFull(d.r, p); err != nil {
			return err
		}
		d.left -= m
		n -= m
		f(p)
	}
	return nil
}

// fits is whether count items of size bytes each can be in what is left.
func (d *decoder) fits(count, size uint64) bool { return count <= d.left/size }

func decodeFlat(d *decoder, features, K int) (*flatForest, error) {
	trees, err := d.uvarint(d.left/4, "tree count")
	if err != nil {
		return nil, err
	}
	nodes, err := d.uvarint(d.left/12, "node count")
	if err != nil {
		return nil, err
	}
	mixed, err := d.uvarint(d.left/8, "mixed leaf count")
	if err != nil {
		return nil, err
	}
	if trees == 0 || nodes < trees || !d.fits(4*trees+12*nodes+8*mixed, 1) || nodes > math.MaxInt32 {
		return nil, fmt.Errorf("%d trees of %d nodes do not fit in the %d bytes left", trees, nodes, d.left)
	}
	ff := &flatForest{K: K, roots: make([]int32, 0, trees), nodes: make([]flatNode, 0, nodes),
		leafCls: make([]int32, 0, mixed), leafCount: make([]int32, 0, mixed)}
	err = d.readUnits(4*trees, 4, func(p []byte) {
		for i := 0; i < len(p); i += 4 {
			ff.roots = append(ff.roots, int32(binary.LittleEndian.Uint32(p[i:])))
		}
	})
	if err != nil {
		return nil, err
	}
	if err := ff.checkRoots(int(nodes)); err != nil {
		return nil, err
	}
	err = d.readUnits(8*mixed, 8, func(p []byte) {
		for i := 0; i < len(p); i += 8 {
			ff.leafCls = append(ff.leafCls, int32(binary.LittleEndian.Uint32(p[i:])))
			ff.leafCount = append(ff.leafCount, int32(binary.LittleEndian.Uint32(p[i+4:])))
		}
	})
	if err != nil {
		return nil, err
	}
	ff.nodes = ff.nodes[:nodes]
	at := 0
	err = d.readUnits(12*nodes, 12, func(p []byte) {
		for i := 0; i+12 <= len(p); i += 12 {
			ff.nodes[at] = nodeAt(p[i : i+12])
			at++
		}
	})
	if err != nil {
		return nil, err
	}
	if err := ff.check(features); err != nil {
		return nil, err
	}
	return ff, nil
}

func nodeAt(p []byte) flatNode {
	return flatNode{lo: binary.LittleEndian.Uint32(p), hi: binary.LittleEndian.Uint32(p[4:]), kc: binary.LittleEndian.Uint32(p[8:])}
}

// strings reads n strings as encodeStrings wrote them: one allocation for
// all their bytes, each string a part of it.
func (d *decoder) strings(n uint64, what string) ([]string, error) {
	lens := make([]uint32, n)
	var tot uint64
	label := what + " length"
	for i := range lens {
		l, err := d.uvarint(d.left, label)
		if err != nil {
			return nil, err
		}
		lens[i], tot = uint32(l), tot+l
		if tot > d.left {
			return nil, fmt.Errorf("%s: %w", what, errShort)
		}
	}
	// A strings.Builder hands its bytes over as the string, uncopied.
	var all strings.Builder
	all.Grow(int(tot))
	if err := d.read(tot, func(p []byte) { all.Write(p) }); err != nil {
		return nil, fmt.Errorf("%s: %w", what, err)
	}
	s := all.String()
	if !utf8.ValidString(s) {
		return nil, fmt.Errorf("%s: not UTF-8", what)
	}
	out := make([]string, n)
	at := 0
	for i, l := range lens {
		out[i] = s[at : at+int(l)]
		at += int(l)
	}
	return out, nil
}

// matrix reads what encodeMatrix wrote into one flat array, the rows being
// views of it, each row given to each (when not nil) as it is read; skip
// reads past it.
func (d *decoder) matrix(cols int, skip bool, each func(row []float64)) ([][]float64, []float64, error) {
	n, err := d.uvarint(d.left, "rows")
	if err != nil {
		return nil, nil, err
	}
	c, err := d.uvarint(d.left, "columns")
	if err != nil {
		return nil, nil, err
	}
	if int(c) != cols || c == 0 {
		return nil, nil, fmt.Errorf("%d columns, want %d", c, cols)
	}
	if !d.fits(n, 8*c) {
		return nil, nil, fmt.Errorf("%d rows of %d do not fit in the %d bytes left", n, c, d.left)
	}
	if skip {
		return nil, nil, d.read(8*n*c, func([]byte) {})
	}
	flat := make([]float64, 0, n*c)
	err = d.readUnits(8*n*c, 8, func(p []byte) {
		for i := 0; i < len(p); i += 8 {
			flat = append(flat, math.Float64frombits(binary.LittleEndian.Uint64(p[i:])))
			if each != nil && len(flat)%cols == 0 {
				each(flat[len(flat)-cols:])
			}
		}
	})
	if err != nil {
		return nil, nil, err
	}
	rows := make([][]float64, n)
	for i := range rows {
		rows[i] = flat[i*cols : (i+1)*cols : (i+1)*cols]
	}
	return rows, flat, nil
}

// decode4 reads a format 4 payload from d into a bundle.
func decode4(d *decoder, o LoadOptions) (*Bundle, error) {
	var ml [4]byte
	if err := d.read(4, func(p []byte) { copy(ml[:], p) }); err != nil {
		return nil, fmt.Errorf("%w: no metadata", ErrCorrupt)
	}
	mlen := uint64(binary.LittleEndian.Uint32(ml[:]))
	if mlen > d.left {
		return nil, fmt.Errorf("%w: metadata length %d past the end", ErrCorrupt, mlen)
	}
	var meta bytes.Buffer
	meta.Grow(int(mlen))
	if err := d.read(mlen, func(p []byte) { meta.Write(p) }); err != nil {
		return nil, fmt.Errorf("%w: metadata: %w", ErrCorrupt, err)
	}
	b, err := decodeMetadata(meta.Bytes(), format4)
	if err != nil {
		return nil, err
	}
	t := &b.Training
	if t.IDs != nil || t.Dates != nil || t.Y != nil {
		return nil, fmt.Errorf("%w: training digs in the metadata of a format 4 file", ErrCorrupt)
	}
	flat, err := decodeFlat(d, b.Spec.Len(), len(b.Classes))
	if err != nil {
		return nil, fmt.Errorf("%w: forest: %w", ErrCorrupt, err)
	}
	forest := &Forest{flat: flat}
	if err := b.decodeScreen4(d); err != nil {
		return nil, fmt.Errorf("%w: screen: %w", ErrCorrupt, err)
	}
	if err := decodeTraining4(d, b, o); err != nil {
		return nil, fmt.Errorf("%w: training digs: %w", ErrCorrupt, err)
	}
	if d.left != 0 {
		return nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, d.left)
	}
	b.partial = o.NoOutOfBag || b.whitened
	return b, b.finish(forest)
}

func decodeTraining4(d *decoder, b *Bundle, o LoadOptions) error {
	t := &b.Training
	// A dig takes at least three bytes (two lengths and a class).
	n, err := d.uvarint(d.left/3, "count")
	if err != nil {
		return err
	}
	if t.IDs, err = d.strings(n, "ids"); err != nil {
		return err
	}
	if t.Dates, err = d.strings(n, "dates"); err != nil {
		return err
	}
	t.Y = make([]int32, n)
	for i := range t.Y {
		y, err := d.uvarint(uint64(len(b.Classes)-1), "class")
		if err != nil {
			return err
		}
		t.Y[i] = int32(y)
	}
	var each func([]float64)
	if w := b.Whitening; o.Whitened && w != nil {
		if err := b.validateWhitening(); err != nil {
			return err
		}
		white := make([]float64, b.Spec.Len())
		each = func(row []float64) {
			w.Apply(row, white)
			copy(row, white)
		}
		b.whitened = true
	}
	if t.Vectors, t.flat, err = d.matrix(b.Spec.Len(), false, each); err != nil {
		return fmt.Errorf("vectors: %w", err)
	}
	if t.OutOfBag, _, err = d.matrix(len(b.Classes), o.NoOutOfBag, nil); err != nil {
		return fmt.Errorf("out-of-bag probabilities: %w", err)
	}
	return nil
}

// decodeScreen4 reads the screen's forests, checked against its metadata.
func (b *Bundle) decodeScreen4(d *decoder) error {
	n, err := d.uvarint(2, "screen forest count")
	if err != nil {
		return err
	}
	parts, err := b.screenParts(n)
	if err != nil {
		return err
	}
	for _, sf := range parts {
		flat, err := decodeFlat(d, len(sf.Names), screenClasses)
		if err != nil {
			return err
		}
		sf.forest = &Forest{Names: sf.Names, Classes: screenClassNames, flat: flat}
	}
	return nil
}

// checksum4 is format 4's trailer: a CRC-32C.
const checksum4Len = 4

func newChecksum4() hash.Hash32 { return crc32.New(castagnoli) }

// load4 streams a format 4 file (its header already read into head) from r
// through the checksum. When decoding fails, the rest of the file is still
// read, and a checksum that does not match is reported first: the file was
// damaged, whatever the decoder tripped on.
func load4(head []byte, r io.Reader, plen uint64, o LoadOptions) (*Bundle, error) {
	sum := newChecksum4()
	sum.Write(head)
	br := bufio.NewReaderSize(io.TeeReader(io.LimitReader(r, int64(plen)), sum), 1<<16)
	d := &decoder{r: br, left: plen}
	b, err := decode4(d, o)
	// Whatever is left of the payload (after an error), then the trailer,
	// and nothing after it.
	rest, cerr := io.Copy(io.Discard, br)
	if cerr != nil {
		return nil, cerr
	}
	var trailer [checksum4Len + 1]byte
	got, _ := io.ReadFull(r, trailer[:])
	switch {
	case uint64(rest) != d.left || got < checksum4Len:
		return nil, fmt.Errorf("%w: truncated (the header says %d bytes of payload)", ErrCorrupt, plen)
	case got > checksum4Len:
		return nil, fmt.Errorf("%w: bytes after the checksum", ErrCorrupt)
	case binary.LittleEndian.Uint32(trailer[:]) != sum.Sum32():
		return nil, fmt.Errorf("%w: checksum mismatch", ErrCorrupt)
	}
	return b, err
}
