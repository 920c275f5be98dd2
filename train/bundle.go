package train

import (
	"bufio"
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"os"
	"slices"

	"github.com/spade-detect/spade/features"
	"github.com/spade-detect/spade/internal/atomicfile"
	"github.com/spade-detect/spade/internal/kdtree"
)

// The model file:
//
//	magic "SPADEMDL" | version uint16 | reserved uint16 | payload length uint64
//	payload: metadata length uint32 | metadata (JSON) | forest (binary)
//	         | screen forest count (uvarint) | screen forests (binary)
//	SHA-256 of everything before it
//
// all integers little-endian. The forest is stored by us, not with golearn's
// forest Save/Load, whose load time is quadratic in the number of trees and
// which trusts the ForestSize it reads. Each tree is its nodes in preorder:
// a split is 0, the feature (uvarint) and the threshold (float64 bits); a
// leaf is 1 and its non-zero class counts as (class, count) uvarint pairs.
// Inner nodes' class counts are the sums of their children's, so golearn's
// ClassDist at every node is rebuilt on load.
//
// Format 2 added the ordnance screen (its metadata under "screen", its
// forests after the history's: the plain one, then the depth one when
// there is one). Format 1 files still load, without a screen.
//
// Format 3 moved the training vectors and their out-of-bag probabilities
// out of the JSON into a binary section after the forests: for each, rows
// and columns (uvarints), then rows×columns float64 bits, little-endian,
// read straight into one flat array. Decoding them from JSON took most of
// a large model's load. Formats 1 and 2 still load.
//
// Format 4 is described in format4.go, format 5 in format5.go. Formats 1 to
// 4 still load.
const (
	magic         = "SPADEMDL"
	FormatVersion = format5
	headerLen     = 8 + 2 + 2 + 8
	maxModelBytes = 2 << 30
	maxTreeDepth  = 4096
)

// Predict is the model's class probabilities for a feature vector: the
// forest's, shrunk toward the class shares. p is reused when long enough.
func (b *Bundle) Predict(x, p []float64) []float64 {
	return b.Shrinkage.Apply(b.Forest.Predict(x, p))
}

// Errors of Load; test with errors.Is.
var (
	ErrNotModel = errors.New("not a spade model file")
	ErrVersion  = errors.New("model format version not supported")
	ErrCorrupt  = errors.New("model file is corrupt")
)

// Summary is what a model was trained on and how well it did.
type Summary struct {
	SpadeVersion string `json:"spade_version"`
	// Created is the day a model of spade 0.1 before issue 14 was made;
	// read from such files, never written now (it broke "same seed, same
	// bytes" from one day to the next).
	Created string `json:"created,omitempty"`
	// LatestDig is the last date among the training digs, "" without dates.
	LatestDig string `json:"latest_dig,omitempty"`
	Seed      uint64 `json:"seed"`
	Trees     int    `json:"trees"`
	Mtry      int    `json:"mtry"`
	Digs      int    `json:"digs"`
	// MaxSamples is each tree's bootstrap size when it was fewer than the
	// digs (train --max-samples); 0 when it was all of them.
	MaxSamples  int                `json:"max_samples,omitempty"`
	ClassCounts map[string]int     `json:"class_counts"`
	OutOfBag    Metrics            `json:"out_of_bag"`
	Importance  map[string]float64 `json:"importance"`
	Skipped     int                `json:"skipped_rows"`
	// NoScreen says why the model has no ordnance screen; empty when it has.
	NoScreen string `json:"no_screen,omitempty"`
}

// Training holds the training digs' feature vectors for nearest-neighbour
// explanations: dig id, class, date and vector, and no site or coordinates.
type Training struct {
	IDs     []string    `json:"ids"`
	Dates   []string    `json:"dates"`
	Y       []int32     `json:"y"`
	Vectors [][]float64 `json:"vectors,omitempty"` // in the binary section from format 3
	// OutOfBag are the digs' out-of-bag class probabilities (NaN-free:
	// a dig no tree left out gets its in-bag prediction).
	OutOfBag [][]float64 `json:"out_of_bag,omitempty"` // in the binary section from format 3
	// Index is the neighbour index over the vectors whitened by the
	// model's Whitening, as a format 5 file holds it; nil otherwise.
	Index *kdtree.Tree `json:"-"`
	// flat is Vectors' one backing array, row after row, when they were
	// loaded from format 4 or 5.
	flat []float64
	// ids and dates are IDs and Dates as a format 5 file holds them, kept
	// so by classify's load (LoadOptions.Whitened), which reads five a
	// reading: making 200,000 strings took 3-8 ms of its start-up.
	ids, dates packed
}

// packed is strings as offsets into their bytes: string i is
// all[offsets[i]:offsets[i+1]].
type packed struct {
	offsets []uint32
	all     string
}

// ID is dig i's id, whether the ids are strings or packed.
func (t *Training) ID(i int) string {
	if t.IDs != nil {
		return t.IDs[i]
	}
	return t.ids.all[t.ids.offsets[i]:t.ids.offsets[i+1]]
}

// Date is dig i's date ("" when it has none), as ID.
func (t *Training) Date(i int) string {
	if t.Dates != nil {
		return t.Dates[i]
	}
	return t.dates.all[t.dates.offsets[i]:t.dates.offsets[i+1]]
}

// digs is how many ids the training holds, strings or packed.
func (t *Training) digs(ids []string, p packed) int {
	if ids != nil || p.offsets == nil {
		return len(ids)
	}
	return len(p.offsets) - 1
}

// Flat is the training vectors as one array, row after row, shared with
// Vectors; nil unless they were read from a format 4 or 5 file.
func (t *Training) Flat() []float64 { return t.flat }

// Bundle is everything a model file holds.
type Bundle struct {
	Spec     *features.FeatureSpec `json:"spec"`
	Label    features.Label        `json:"label"`
	Classes  []string              `json:"classes"`
	Summary  Summary               `json:"summary"`
	Baseline *Baseline             `json:"baseline"`
	Training Training              `json:"training"`
	// Shrinkage pulls the forest's probabilities toward the class shares
	// (see Shrinkage); nil in a model made before it, whose probabilities
	// are then the forest's own. Training.OutOfBag is already shrunk.
	Shrinkage *Shrinkage `json:"shrinkage,omitempty"`
	// Screen is the ordnance screen; nil in a format 1 model, or where the
	// history could not carry one.
	Screen *Screen `json:"screen,omitempty"`
	// NoveltyReference is the training digs' own novelty scores, sorted
	// (classify.ReferenceScores), computed once when the model is made so
	// that loading it need not; nil in an older model, which classify then
	// computes them for.
	NoveltyReference []float64 `json:"novelty_reference,omitempty"`
	// Whitening is the neighbour space's transform (classify's), computed
	// once when the model is made, as NoveltyReference is; nil in an older
	// model, which classify then computes it for.
	Whitening *Whitening `json:"whitening,omitempty"`
	Forest    *Forest    `json:"-"`
	// Format is the format version the bundle was read from.
	Format int `json:"-"`
	// partial: loaded without the out-of-bag probabilities.
	partial bool
	// whitened: the training vectors were loaded whitened.
	whitened bool
	// changed tells, for a mapped load, whether the file has been written
	// to since.
	changed func() bool
}

// Changed is whether the file of a model loaded mapped (LoadOptions.Mapped)
// has been written to since: its bytes, which the bundle's arrays are,
// would then be the new file's, unchecked. Always false for a model read
// into memory.
func (b *Bundle) Changed() bool { return b.changed != nil && b.changed() }

// VectorsWhitened is whether Training.Vectors hold the vectors whitened by
// Whitening (LoadOptions.Whitened) rather than as they were.
func (b *Bundle) VectorsWhitened() bool { return b.whitened }

// Whitening maps a feature vector x into the neighbour space: Matrix·(x −
// Mean), Matrix row-major, features × features.
type Whitening struct {
	Mean   []float64 `json:"mean"`
	Matrix []float64 `json:"matrix"`
}

// Apply writes the whitened x into dst (grown if short): classify's
// neighbour space, and the loader's when it whitens the training vectors
// (LoadOptions.Whitened), by the same sums in the same order.
func (w Whitening) Apply(x, dst []float64) []float64 {
	dims := len(w.Mean)
	dst = slices.Grow(dst[:0], dims)[:dims]
	for r := range dims {
		row := w.Matrix[r*dims : (r+1)*dims]
		var v float64
		for c, m := range row {
			v += m * (x[c] - w.Mean[c])
		}
		dst[r] = v
	}
	return dst
}

// metadata is the JSON part, with the format version repeated for readers
// who only look at that.
type metadata struct {
	Format int `json:"format"`
	*Bundle
}

// Marshal encodes the bundle. The same bundle gives the same bytes.
func (b *Bundle) Marshal() ([]byte, error) {
	var out bytes.Buffer
	if err := b.Encode(&out); err != nil {
		return nil, err
	}
	return out.Bytes(), nil
}

// Encode writes the model file (format 5) to w. A bundle loaded in part
// (for classify) is refused.
func (b *Bundle) Encode(w io.Writer) error {
	if b.partial {
		return errors.New("this model was loaded in part (for classify) and cannot be saved; load it whole")
	}
	lean := *b
	lean.Training = Training{}
	meta, err := json.Marshal(metadata{Format: FormatVersion, Bundle: &lean})
	if err != nil {
		return fmt.Errorf("encoding model: %w", err)
	}
	return encode5(w, b, meta)
}

// Save writes the bundle atomically: a temporary file in the same folder,
// then a rename, so an interrupted save never destroys the previous model.
func (b *Bundle) Save(path string) error { return b.SaveContext(context.Background(), path) }

// SaveContext is Save that stops, writing nothing, when ctx is done.
func (b *Bundle) SaveContext(ctx context.Context, path string) error {
	return atomicfile.WriteContext(ctx, path, func(w io.Writer) error {
		bw := bufio.NewWriterSize(w, 1<<20)
		if err := b.Encode(bw); err != nil {
			return err
		}
		return bw.Flush()
	})
}

// Load reads and checks a model file.
func Load(path string) (*Bundle, error) { return LoadWith(path, LoadOptions{}) }

// LoadWith is Load that may leave parts out. A format 4 file is streamed
// through its checksum in one pass, never held whole in memory.
func LoadWith(path string, o LoadOptions) (*Bundle, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("cannot read model %s: %w", path, features.PathCause(err))
	}
	defer f.Close()
	// The magic first, and then no more than the header says: a file that
	// is no model (or /dev/zero) is refused after 20 bytes.
	var head [headerLen]byte
	if _, err := io.ReadFull(f, head[:]); err != nil || string(head[:len(magic)]) != magic {
		return nil, fmt.Errorf("%s: %w", path, ErrNotModel)
	}
	if err := checkVersion(head[:]); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	plen := binary.LittleEndian.Uint64(head[12:])
	if plen > maxModelBytes {
		return nil, fmt.Errorf("%s: %w: payload of %d bytes is larger than any model", path, ErrCorrupt, plen)
	}
	var b *Bundle
	switch binary.LittleEndian.Uint16(head[8:]) {
	case format5:
		b, err = load5(head[:], f, plen, o)
	case format4:
		b, err = load4(head[:], f, plen, o)
	default:
		var rest []byte
		rest, err = io.ReadAll(io.LimitReader(f, int64(plen)+sha256.Size+1))
		if err != nil {
			return nil, fmt.Errorf("cannot read model %s: %w", path, features.PathCause(err))
		}
		b, err = unmarshal(append(head[:], rest...), o)
	}
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return b, nil
}

// checkVersion refuses a format this spade does not read.
func checkVersion(head []byte) error {
	version := binary.LittleEndian.Uint16(head[8:])
	if version < 1 || version > FormatVersion {
		return fmt.Errorf("%w: the file has format %d, this spade reads formats 1 to %d; train the model again with this spade", ErrVersion, version, FormatVersion)
	}
	return nil
}

// Unmarshal decodes and checks a model file's bytes. Any malformed input is
// an error wrapping ErrNotModel, ErrVersion or ErrCorrupt, never a panic.
func Unmarshal(data []byte) (*Bundle, error) { return unmarshal(data, LoadOptions{}) }

func unmarshal(data []byte, o LoadOptions) (b *Bundle, err error) {
	defer func() {
		if r := recover(); r != nil {
			b, err = nil, fmt.Errorf("%w: %v", ErrCorrupt, r)
		}
	}()
	if len(data) < len(magic) || string(data[:len(magic)]) != magic {
		return nil, ErrNotModel
	}
	if len(data) < headerLen {
		return nil, fmt.Errorf("%w: truncated (%d bytes)", ErrCorrupt, len(data))
	}
	if err := checkVersion(data); err != nil {
		return nil, err
	}
	version := binary.LittleEndian.Uint16(data[8:])
	if version == format5 {
		// Its arrays will be views of the bytes: a copy of them, at a
		// multiple of 8, so that they are neither the caller's nor moved.
		own := aligned(uint64(len(data)))
		copy(own, data)
		return decode5(own, o)
	}
	sumLen := sha256.Size
	if version == format4 {
		sumLen = checksum4Len
	}
	if len(data) < headerLen+sumLen {
		return nil, fmt.Errorf("%w: truncated (%d bytes)", ErrCorrupt, len(data))
	}
	plen := binary.LittleEndian.Uint64(data[12:])
	if plen != uint64(len(data)-headerLen-sumLen) {
		return nil, fmt.Errorf("%w: truncated or padded (payload %d bytes, file has room for %d)", ErrCorrupt, plen, len(data)-headerLen-sumLen)
	}
	body := data[:len(data)-sumLen]
	payload := body[headerLen:]
	if version == format4 {
		if crc32.Checksum(body, castagnoli) != binary.LittleEndian.Uint32(data[len(body):]) {
			return nil, fmt.Errorf("%w: checksum mismatch", ErrCorrupt)
		}
		return decode4(&decoder{r: bytes.NewReader(payload), left: uint64(len(payload))}, o)
	}
	if sum := sha256.Sum256(body); !bytes.Equal(sum[:], data[len(body):]) {
		return nil, fmt.Errorf("%w: checksum mismatch", ErrCorrupt)
	}
	if len(payload) < 4 {
		return nil, fmt.Errorf("%w: no metadata", ErrCorrupt)
	}
	mlen := binary.LittleEndian.Uint32(payload)
	if uint64(mlen) > uint64(len(payload)-4) {
		return nil, fmt.Errorf("%w: metadata length %d past the end", ErrCorrupt, mlen)
	}
	if b, err = decodeMetadata(payload[4:4+mlen], int(version)); err != nil {
		return nil, err
	}
	rest := bytes.NewReader(payload[4+mlen:])
	forest, err := decodeForest(rest, b.Spec.Len(), len(b.Classes))
	if err != nil {
		return nil, fmt.Errorf("%w: forest: %w", ErrCorrupt, err)
	}
	if version >= 2 {
		if err := b.decodeScreen(rest); err != nil {
			return nil, fmt.Errorf("%w: screen: %w", ErrCorrupt, err)
		}
	}
	if version >= 3 {
		t := &b.Training
		if t.Vectors != nil || t.OutOfBag != nil {
			return nil, fmt.Errorf("%w: training vectors in the metadata of a format %d file", ErrCorrupt, version)
		}
		if t.Vectors, err = decodeMatrix(rest, b.Spec.Len()); err != nil {
			return nil, fmt.Errorf("%w: training vectors: %w", ErrCorrupt, err)
		}
		if t.OutOfBag, err = decodeMatrix(rest, len(b.Classes)); err != nil {
			return nil, fmt.Errorf("%w: out-of-bag probabilities: %w", ErrCorrupt, err)
		}
	}
	if rest.Len() != 0 {
		return nil, fmt.Errorf("%w: %d bytes after the last section", ErrCorrupt, rest.Len())
	}
	if err := b.finish(forest); err != nil {
		return nil, err
	}
	if o.NoOutOfBag {
		b.Training.OutOfBag, b.partial = nil, true
	}
	return b, nil
}

// decodeMetadata reads the JSON part and checks what decoding the forests
// needs.
func decodeMetadata(data []byte, version int) (*Bundle, error) {
	b := &Bundle{Format: version}
	meta := metadata{Bundle: b}
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&meta); err != nil {
		return nil, fmt.Errorf("%w: metadata: %w", ErrCorrupt, err)
	}
	if meta.Format != version {
		return nil, fmt.Errorf("%w: the metadata says format %d, the header %d", ErrCorrupt, meta.Format, version)
	}
	if err := b.validateHead(); err != nil {
		return nil, fmt.Errorf("%w: %w", ErrCorrupt, err)
	}
	return b, nil
}

// finish checks the whole bundle and gives the forest its names.
func (b *Bundle) finish(forest *Forest) error {
	if err := b.validate(); err != nil {
		return fmt.Errorf("%w: %w", ErrCorrupt, err)
	}
	forest.Names, forest.Classes, forest.Mtry = b.Spec.Names, b.Classes, b.Summary.Mtry
	forest.Importance = make([]float64, len(b.Spec.Names))
	for i, n := range b.Spec.Names {
		forest.Importance[i] = b.Summary.Importance[n]
	}
	b.Forest = forest
	return nil
}

// validateHead checks what decoding the forests needs: the spec, the label
// and the classes.
func (b *Bundle) validateHead() error {
	if b.Spec == nil {
		return errors.New("no feature spec")
	}
	if err := b.Spec.Validate(); err != nil {
		return err
	}
	if _, ok := features.ParseLabel(string(b.Label)); !ok {
		return fmt.Errorf("unknown label %q", b.Label)
	}
	if len(b.Classes) == 0 || !slices.IsSorted(b.Classes) || len(slices.Compact(slices.Clone(b.Classes))) != len(b.Classes) {
		return errors.New("class list empty or not sorted and distinct")
	}
	return nil
}

// validateWhitening checks the whitening, when there is one, against the
// spec.
func (b *Bundle) validateWhitening() error {
	w, p := b.Whitening, b.Spec.Len()
	if w == nil {
		return nil
	}
	if len(w.Mean) != p || len(w.Matrix) != p*p {
		return errors.New("whitening malformed")
	}
	for _, v := range append(slices.Clone(w.Mean), w.Matrix...) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return errors.New("whitening not finite")
		}
	}
	return nil
}

// validate checks the whole bundle.
func (b *Bundle) validate() error {
	if err := b.validateHead(); err != nil {
		return err
	}
	t := &b.Training
	n, p, K := len(t.Y), b.Spec.Len(), len(b.Classes)
	if n == 0 {
		return errors.New("no training digs")
	}
	if t.digs(t.IDs, t.ids) != n || t.digs(t.Dates, t.dates) != n || len(t.Vectors) != n && !(b.partial && t.Vectors == nil && t.Index != nil) ||
		len(t.OutOfBag) != n && !(b.partial && t.OutOfBag == nil) {
		return errors.New("training arrays differ in length")
	}
	for i := range n {
		if t.Y[i] < 0 || int(t.Y[i]) >= K || t.Vectors != nil && len(t.Vectors[i]) != p || t.OutOfBag != nil && len(t.OutOfBag[i]) != K {
			return fmt.Errorf("training row %d malformed", i)
		}
	}
	if sh := b.Shrinkage; sh != nil {
		if len(sh.Prior) != K || !(sh.Lambda >= 0 && sh.Lambda <= 1) {
			return errors.New("shrinkage malformed")
		}
		for _, p := range sh.Prior {
			if !(p > 0 && p <= 1) {
				return errors.New("shrinkage prior malformed")
			}
		}
	}
	if err := b.validateWhitening(); err != nil {
		return err
	}
	if b.Baseline != nil {
		if len(b.Baseline.Shares) != len(b.Baseline.Cuts)+1 {
			return errors.New("baseline bins malformed")
		}
		for _, s := range b.Baseline.Shares {
			if len(s) != K {
				return errors.New("baseline shares malformed")
			}
		}
	}
	return nil
}

// forestReader decodes with every count and index checked against what the
// file can hold, so a hostile file cannot make it allocate or loop without
// bound.
type forestReader struct {
	r   *bytes.Reader
	err error
}

func (fr *forestReader) uvarint(limit uint64, what string) uint64 {
	if fr.err != nil {
		return 0
	}
	v, err := binary.ReadUvarint(fr.r)
	if err != nil {
		fr.err = fmt.Errorf("%s: %w", what, err)
		return 0
	}
	if v > limit {
		fr.err = fmt.Errorf("%s %d out of range (max %d)", what, v, limit)
		return 0
	}
	return v
}

// decodeScreen reads a format 2 or 3 screen's forests, checked against its
// metadata.
func (b *Bundle) decodeScreen(r *bytes.Reader) error {
	n, err := binary.ReadUvarint(r)
	if err != nil {
		return err
	}
	parts, err := b.screenParts(n)
	if err != nil {
		return err
	}
	for _, sf := range parts {
		f, err := decodeForest(r, len(sf.Names), screenClasses)
		if err != nil {
			return err
		}
		f.Names, f.Classes = sf.Names, screenClassNames
		sf.forest = f
	}
	return nil
}

// screenParts checks that the file's n screen forests are what the screen's
// metadata describes, and gives the parts they belong to.
func (b *Bundle) screenParts(n uint64) ([]*ScreenForest, error) {
	s := b.Screen
	want := 0
	if s != nil {
		want = 1
		if s.Depth != nil {
			want = 2
		}
	}
	if n != uint64(want) {
		return nil, fmt.Errorf("%d screen forests, the metadata describes %d", n, want)
	}
	if s == nil {
		return nil, nil
	}
	for _, sf := range s.parts() {
		if len(sf.Names) < b.Spec.Len() || !slices.Equal(sf.Names[:b.Spec.Len()], b.Spec.Names) {
			return nil, errors.New("screen features do not match the model's")
		}
		if !(sf.Low > 0 && sf.Low <= sf.High && sf.High <= 1) || sf.Likely != (sf != &s.Plain) {
			return nil, fmt.Errorf("screen tiers %v and %v out of order", sf.Low, sf.High)
		}
	}
	return s.parts(), nil
}

func decodeForest(r *bytes.Reader, features, classes int) (*Forest, error) {
	fr := &forestReader{r: r}
	// A node takes at least two bytes, which bounds every count.
	limit := uint64(r.Len())
	nTrees := fr.uvarint(limit, "tree count")
	if fr.err == nil && nTrees == 0 {
		return nil, errors.New("no trees")
	}
	var trees []*Tree
	for range nTrees {
		nodes := fr.uvarint(limit/2, "node count")
		if fr.err != nil {
			return nil, fr.err
		}
		t := &Tree{LeafStart: []int32{0}}
		var read func(node int32, depth int)
		read = func(node int32, depth int) {
			if fr.err != nil {
				return
			}
			if depth > maxTreeDepth || uint64(len(t.Feature)) > nodes {
				fr.err = errors.New("tree deeper or larger than it says")
				return
			}
			kind, err := fr.r.ReadByte()
			if err != nil {
				fr.err = err
				return
			}
			switch kind {
			case 1:
				m := fr.uvarint(uint64(classes), "leaf class count")
				leaf := int32(len(t.LeafStart) - 1)
				for range m {
					t.LeafClass = append(t.LeafClass, int32(fr.uvarint(uint64(classes-1), "class")))
					t.LeafCount = append(t.LeafCount, int32(fr.uvarint(math.MaxInt32, "count")))
				}
				t.LeafStart = append(t.LeafStart, int32(len(t.LeafClass)))
				t.Feature[node], t.Left[node] = -1, leaf
			case 0:
				feat := fr.uvarint(uint64(features-1), "feature")
				var bits uint64
				if err := binary.Read(fr.r, binary.LittleEndian, &bits); err != nil {
					fr.err = err
					return
				}
				left := int32(len(t.Feature))
				t.Feature[node], t.Threshold[node], t.Left[node] = int32(feat), math.Float64frombits(bits), left
				t.Feature = append(t.Feature, 0, 0)
				t.Threshold = append(t.Threshold, 0, 0)
				t.Left = append(t.Left, 0, 0)
				read(left, depth+1)
				read(left+1, depth+1)
			default:
				fr.err = fmt.Errorf("unknown node kind %d", kind)
			}
		}
		t.Feature, t.Threshold, t.Left = []int32{0}, []float64{0}, []int32{0}
		read(0, 0)
		if fr.err != nil {
			return nil, fr.err
		}
		if uint64(t.Nodes()) != nodes {
			return nil, fmt.Errorf("tree has %d nodes, header says %d", t.Nodes(), nodes)
		}
		for l := range len(t.LeafStart) - 1 {
			var tot int64
			for j := t.LeafStart[l]; j < t.LeafStart[l+1]; j++ {
				tot += int64(t.LeafCount[j])
			}
			if tot == 0 {
				return nil, errors.New("empty leaf")
			}
		}
		trees = append(trees, t)
	}
	flat, err := compile(trees, classes)
	if err != nil {
		return nil, err
	}
	return &Forest{flat: flat}, nil
}

func sha256Sum(b []byte) [32]byte { return sha256.Sum256(b) }

// encodeMatrix writes rows of cols float64s: the counts as uvarints, then
// the values' bits, little-endian.
func encodeMatrix(w *bytes.Buffer, rows [][]float64, cols int) {
	var buf [binary.MaxVarintLen64]byte
	w.Write(buf[:binary.PutUvarint(buf[:], uint64(len(rows)))])
	w.Write(buf[:binary.PutUvarint(buf[:], uint64(cols))])
	var b [8]byte
	for _, r := range rows {
		if len(r) != cols {
			panic("train: length mismatch")
		}
		for _, v := range r {
			binary.LittleEndian.PutUint64(b[:], math.Float64bits(v))
			w.Write(b[:])
		}
	}
}

// decodeMatrix reads what encodeMatrix wrote into one flat array, the rows
// being views of it: no allocation per row.
func decodeMatrix(r *bytes.Reader, cols int) ([][]float64, error) {
	n, err := binary.ReadUvarint(r)
	if err != nil {
		return nil, err
	}
	c, err := binary.ReadUvarint(r)
	if err != nil {
		return nil, err
	}
	if int(c) != cols || c == 0 {
		return nil, fmt.Errorf("%d columns, want %d", c, cols)
	}
	if n > uint64(r.Len())/8/c {
		return nil, fmt.Errorf("%d rows of %d do not fit in the %d bytes left", n, c, r.Len())
	}
	raw := make([]byte, n*c*8)
	if _, err := io.ReadFull(r, raw); err != nil {
		return nil, err
	}
	flat := make([]float64, n*c)
	for i := range flat {
		flat[i] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*i:]))
	}
	rows := make([][]float64, n)
	for i := range rows {
		rows[i] = flat[i*cols : (i+1)*cols : (i+1)*cols]
	}
	return rows, nil
}
