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
	"runtime"
	"strings"
	"sync"
	"sync/atomic"
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

// checkRoots checks that the trees start in order, the first at node 0.
func (ff *flatForest) checkRoots(nodes int) error {
	if ff.roots[0] != 0 {
		return errors.New("the first tree does not start at the first node")
	}
	for t := 1; t < len(ff.roots); t++ {
		if ff.roots[t] <= ff.roots[t-1] || int(ff.roots[t]) >= nodes {
			return fmt.Errorf("tree %d starts at node %d, out of order", t, ff.roots[t])
		}
	}
	return nil
}

// check makes sure a forest read from a file is one compile could have
// made: in each tree every node but the root the child of exactly one split
// before it (so the tree is a tree, and a walk ends at a leaf), features and
// classes in range, every count positive, and the mixed leaves' shares
// taken in order, each once. The trees are checked on every core (checking
// each piece of nodes as it was read, on one, took longer), then the mixed
// leaves' shares computed.
func (ff *flatForest) check(features int) error {
	used := make([]treeUse, len(ff.roots))
	errs := make([]error, len(ff.roots))
	onEveryCore(len(ff.roots), func(t int, scratch *[]uint8) {
		u := &used[t]
		*scratch, u.first, u.count, errs[t] = ff.checkTree(t, features, *scratch)
	})
	if err := errors.Join(errs...); err != nil {
		return err
	}
	return ff.leafShares(used)
}

// onEveryCore runs do(0) to do(n−1) on every core, each worker with
// scratch space of its own.
func onEveryCore(n int, do func(i int, scratch *[]uint8)) {
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), n) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var scratch []uint8
			for i := next.Add(1) - 1; i < int64(n); i = next.Add(1) - 1 {
				do(int(i), &scratch)
			}
		}()
	}
	wg.Wait()
}

// treeUse is the range of mixed leaf shares a tree uses.
type treeUse struct{ first, count uint32 }

// checkOne is format 5's check of tree t: checkWalk, and checkTree when
// that cannot tell (a mixed leaf) or to name what is wrong.
func (ff *flatForest) checkOne(t, features int, scratch *[]uint8) (u treeUse, err error) {
	if ff.checkWalk(t, features) {
		return treeUse{}, nil // no mixed leaves
	}
	*scratch, u.first, u.count, err = ff.checkTree(t, features, *scratch)
	return u, err
}

// leafShares checks that the trees take the mixed leaves' shares in order,
// each once, and computes them.
func (ff *flatForest) leafShares(used []treeUse) error {
	next := uint32(0)
	for t, u := range used {
		if u.count > 0 && u.first != next {
			return fmt.Errorf("tree %d: mixed leaves out of order", t)
		}
		next += u.count
	}
	if int(next) != len(ff.leafCls) {
		return fmt.Errorf("%d leaf shares, the leaves use %d", len(ff.leafCls), next)
	}
	ff.leafProb = make([]float64, len(ff.leafCls))
	for t, u := range used {
		if u.count == 0 {
			continue
		}
		lo, hi := ff.span(t)
		for _, n := range ff.nodes[lo:hi] {
			if n.kc == mixedKC {
				copy(ff.leafProb[n.lo:], shares(ff.leafCount[n.lo:n.lo+n.hi]))
			}
		}
	}
	return nil
}

// checkWalk is whether tree t holds only what a walk can take: splits on
// a feature there is, whose children come after them and inside the tree,
// and pure leaves of a class there is and a positive count. A walk then
// ends at a leaf of the tree, within its arrays, whatever the nodes are.
// That every node but the root is one split's child, which checkTree also
// makes sure of, a walk does not need; Forest.Tree checks it where a tree
// is rebuilt. Each node's checks are differences whose sign says whether
// one failed, with no branch on the data: splits and leaves come in no
// order a processor can learn. Measured on the 100,000-dig model's 4.3
// million nodes, each tree's checksum and then this, on two cores, in one
// run: 7.7 ms, against 12 with a branch between split and leaf, 12 when
// also showing the nodes a tree (seen-store counting), and 15 with
// checkTree.
func (ff *flatForest) checkWalk(t, features int) bool {
	lo, hi := ff.span(t)
	size := int64(hi - lo)
	K, nf := int64(ff.K), int64(features)
	var bad int64
	nodes := ff.nodes[lo:hi]
	for i := range nodes {
		n := &nodes[i]
		kc := int64(n.kc)
		k, r := kc>>restBits, kc&restMask
		split := (k - leafKind) >> 63 // −1 for a split, 0 for a leaf
		// Each negative when its check fails: k < nf, i < r, r+1 < size;
		// the pure leaf's kind and rest, class < K, count ≥ 1.
		splitBad := (nf - 1 - k) | (r - int64(i) - 1) | (size - 2 - r)
		leafBad := -(kc ^ pureKC) | (K - 1 - int64(n.lo)) | (int64(n.hi) - 1)
		bad |= split&splitBad | ^split&leafBad
	}
	return bad >= 0
}

// checkTree checks tree t, child being scratch space, and gives the range of
// mixed leaf shares it uses. Splits and pure leaves are checked without a
// branch: they come in no order a predictor can learn, and with branches
// the loop took twice as long. Only a node that fails both checks (a mixed
// leaf, or an error) goes the slow way.
func (ff *flatForest) checkTree(t, features int, child []uint8) (_ []uint8, first, count uint32, err error) {
	lo, hi := ff.span(t)
	size := hi - lo
	if size > maxTreeNodes {
		return child, 0, 0, fmt.Errorf("tree %d has %d nodes, more than %d", t, size, maxTreeNodes)
	}
	// child[i] is 1 once node i is some split's child; the two entries
	// past the tree take the writes of leaves, which have no children.
	child = append(child[:0], make([]uint8, size+2)...)
	K, nf := uint32(ff.K), uint32(features)
	splits := int32(0)
	for i, n := range ff.nodes[lo:hi] {
		i := int32(i)
		k, r := n.kc>>restBits, int32(n.kc&restMask)
		split := b2u(k < leafKind)
		inTree := split & b2u(r > i) & b2u(r+1 < size)
		at := int32(inTree)*r + int32(1-inTree)*size
		okSplit := inTree & b2u(k < nf) & b2u(child[at]|child[at+1] == 0)
		child[at], child[at+1] = 1, 1
		okLeaf := b2u(n.kc == pureKC) & b2u(n.lo < K) & b2u(n.hi-1 < math.MaxInt32)
		splits += int32(split)
		if split&okSplit|(1-split)&okLeaf != 0 {
			continue
		}
		if split == 1 || n.kc != mixedKC {
			return child, 0, 0, fmt.Errorf("tree %d node %d: malformed (kind %#x, children %d, class %d, count %d)", t, i, n.kc, r, n.lo, n.hi)
		}
		if count == 0 {
			first = n.lo
		}
		if n.lo != first+count || n.hi < 2 || uint64(n.lo)+uint64(n.hi) > uint64(len(ff.leafCls)) {
			return child, 0, 0, fmt.Errorf("tree %d node %d: mixed leaf malformed", t, i)
		}
		prev := int32(-1)
		for j := n.lo; j < n.lo+n.hi; j++ {
			if ff.leafCls[j] <= prev || uint32(ff.leafCls[j]) >= K || ff.leafCount[j] <= 0 {
				return child, 0, 0, fmt.Errorf("tree %d node %d: leaf share %d malformed", t, i, j)
			}
			prev = ff.leafCls[j]
		}
		count += n.hi
	}
	// With no node a child twice, 2·splits+1 nodes make every node but the
	// root a child once.
	if 2*splits+1 != size {
		return child, 0, 0, fmt.Errorf("tree %d: %d splits and %d nodes is no tree", t, splits, size)
	}
	return child, first, count, nil
}

// b2u is 1 for true, 0 for false (compiled without a branch).
func b2u(b bool) uint32 {
	if b {
		return 1
	}
	return 0
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
