package features

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"unicode/utf8"
)

// ErrEncoding is the cause for a file that is not text spade reads: another
// encoding, a workbook rather than its CSV export, or a record too long to
// be a dig.
var ErrEncoding = errors.New("not a text log spade reads")

// MaxRecordBytes caps one CSV record and one JSON Lines line: a dig's row is well under a kilobyte, so a record past this
// is a quote left open or a file that is no dig log, and it is refused
// before it is read whole into memory.
const MaxRecordBytes = 1 << 20

// fixUTF8 is the remedy every encoding message ends with.
const fixUTF8 = "save or export the file again as CSV (UTF-8)"

// sniffEncoding looks at the start of a file for what is not UTF-8 text (or
// UTF-16 with a byte-order mark, which NewReader decodes) and names it with
// the fix. It returns utf16LE or utf16BE for UTF-16 text without a
// byte-order mark, which NewReader decodes too.
func sniffEncoding(name string, head []byte) (utf16Order int, err error) {
	refuse := func(line int, format string, args ...any) error {
		return &ParseError{File: name, Line: line, Err: fmt.Errorf("%w: "+format, append([]any{ErrEncoding}, args...)...)}
	}
	switch {
	case bytes.HasPrefix(head, []byte{0x00, 0x00, 0xFE, 0xFF}), bytes.HasPrefix(head, []byte{0xFF, 0xFE, 0x00, 0x00}):
		return 0, refuse(0, "the file is UTF-32 text; %s", fixUTF8)
	case bytes.HasPrefix(head, []byte("PK\x03\x04")):
		return 0, refuse(0, "the file is a zipped spreadsheet workbook (.xlsx or .ods), not its CSV export; %s", fixUTF8)
	case bytes.HasPrefix(head, []byte{0xD0, 0xCF, 0x11, 0xE0, 0xA1, 0xB1, 0x1A, 0xE1}):
		return 0, refuse(0, "the file is an older binary spreadsheet workbook (.xls), not its CSV export; %s", fixUTF8)
	case bytes.HasPrefix(head, []byte("%PDF")):
		return 0, refuse(0, "the file is a PDF document, not a dig log; export the table as CSV (UTF-8)")
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}), bytes.HasPrefix(head, []byte{0xFE, 0xFF}), bytes.HasPrefix(head, []byte{0xEF, 0xBB, 0xBF}):
		return 0, nil // byte-order marks NewReader handles
	}
	if i := bytes.IndexByte(head, 0); i >= 0 {
		// Text with a NUL in every other byte is UTF-16 without its mark: a
		// dig log is mostly ASCII, so the zero half tells the byte order.
		if order := utf16Without(head); order != 0 {
			return order, nil
		}
		return 0, refuse(lineAt(head, i), "a NUL byte at offset %d: binary data, not text; %s", i, fixUTF8)
	}
	// The peek may end in the middle of a character; only what is whole
	// counts.
	if i := invalidUTF8(head); i >= 0 {
		return 0, refuse(lineAt(head, i), "byte 0x%02X at offset %d is not UTF-8 text (the file may be Latin-1 or Windows-1252); %s", head[i], i, fixUTF8)
	}
	return 0, nil
}

const (
	utf16LE = 1
	utf16BE = 2
)

// utf16Without tells UTF-16 text with no byte-order mark by its zero bytes:
// at least 90% of the odd bytes (little-endian) or even bytes (big-endian)
// of the head are zero, and almost none of the other half.
func utf16Without(head []byte) int {
	n := len(head) &^ 1
	if n < 8 {
		return 0
	}
	var zeroEven, zeroOdd int
	for i := 0; i < n; i += 2 {
		if head[i] == 0 {
			zeroEven++
		}
		if head[i+1] == 0 {
			zeroOdd++
		}
	}
	half := n / 2
	switch {
	case zeroOdd*10 >= half*9 && zeroEven*10 < half:
		return utf16LE
	case zeroEven*10 >= half*9 && zeroOdd*10 < half:
		return utf16BE
	}
	return 0
}

// invalidUTF8 is the offset of the first byte that is not UTF-8, or -1;
// a character cut off by the end of b is not counted as invalid.
func invalidUTF8(b []byte) int {
	for i := 0; i < len(b); {
		r, size := utf8.DecodeRune(b[i:])
		if r == utf8.RuneError && size == 1 {
			if len(b)-i < utf8.UTFMax && !utf8.FullRune(b[i:]) {
				return -1
			}
			return i
		}
		i += size
	}
	return -1
}

// lineAt is the 1-based line of offset i in b.
func lineAt(b []byte, i int) int { return bytes.Count(b[:i], []byte{'\n'}) + 1 }

// notUTF8 is the error for a field that is not UTF-8, found past the start
// of the file.
func notUTF8(s string) error {
	i := invalidUTF8([]byte(s))
	return fmt.Errorf("%w: byte 0x%02X is not UTF-8 text (the file may be Latin-1 or Windows-1252); %s", ErrEncoding, s[max(i, 0)], fixUTF8)
}

// recordCap stops a CSV reader from reading one record past MaxRecordBytes
// (plus the reader's own look-ahead): the CSV source resets n after each
// record it is given.
type recordCap struct {
	r io.Reader
	n int
}

var errRecordTooLong = errors.New("record too long")

func (c *recordCap) Read(p []byte) (int, error) {
	room := MaxRecordBytes + 64<<10 - c.n
	if room <= 0 {
		return 0, errRecordTooLong
	}
	if len(p) > room {
		p = p[:room]
	}
	k, err := c.r.Read(p)
	c.n += k
	return k, err
}
