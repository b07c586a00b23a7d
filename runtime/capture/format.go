package capture

import (
	"encoding/binary"
	"fmt"
	"io"
	"math/bits"
	"strings"
)

// Format is how the capture's bits are written in the file.
type Format int

const (
	Binary Format = iota // packed bytes, 8 bits a byte, first bit in the most significant place (LSB: least)
	ASCII                // the characters 0 and 1; white space ignored
	Hex                  // two hexadecimal digits a byte (white space ignored), then as Binary
)

// Formats are the names ParseFormat accepts.
var Formats = []string{"bin", "ascii", "hex"}

func (f Format) String() string { return Formats[f] }

// ParseFormat reads a format name: bin, ascii or hex.
func ParseFormat(s string) (Format, error) {
	for i, n := range Formats {
		if strings.EqualFold(strings.TrimSpace(s), n) {
			return Format(i), nil
		}
	}
	return 0, fmt.Errorf("unknown format %q (want %s)", s, strings.Join(Formats, ", "))
}

// FormatError says where a capture stops being in its declared format.
type FormatError struct {
	Offset int64 // byte offset in the file
	Msg    string
}

func (e *FormatError) Error() string { return fmt.Sprintf("byte %d: %s", e.Offset, e.Msg) }

// bitReader turns a capture into 64-bit words: bit i of word w is the capture's bit 64w+i,
// whatever the format and bit order.
type bitReader struct {
	in     io.Reader
	format Format
	lsb    bool
	offset int64 // bytes consumed
	buf    []byte
	first  bool // no chunk read yet (for the look of a binary file)

	// text formats: bits gathered into the word under construction
	acc   uint64
	nacc  uint
	digit int // hex: the first digit of a byte, −1 when none is pending
	dpos  int64
	i, n  int   // unread bytes buf[i:n]
	eof   bool  // the input is exhausted
	bits  int64 // bits delivered
}

func newBitReader(in io.Reader, f Format, lsb bool) *bitReader {
	return &bitReader{in: in, format: f, lsb: lsb, buf: make([]byte, 1<<16), first: true, digit: -1}
}

// read fills dst with words and returns the number of bits written: 64 a word except in the
// last call before io.EOF, whose last word may be partial. It returns 0, io.EOF at the end.
func (r *bitReader) read(dst []uint64) (int64, error) {
	if r.format == Binary {
		return r.readBinary(dst)
	}
	return r.readText(dst)
}

func (r *bitReader) readBinary(dst []uint64) (int64, error) {
	want := len(dst) * 8
	if len(r.buf) < want {
		r.buf = make([]byte, want)
	}
	b := r.buf[:want]
	n, err := io.ReadFull(r.in, b)
	if err != nil && err != io.ErrUnexpectedEOF && err != io.EOF {
		return 0, err
	}
	if r.first && n > 0 {
		r.first = false
		if e := looksLikeText(b[:n]); e != nil {
			return 0, e
		}
	}
	r.offset += int64(n)
	if n == 0 {
		return 0, io.EOF
	}
	full := n / 8
	for i := range full {
		dst[i] = r.word(b[8*i:])
	}
	nb := int64(full) * 64
	if rest := n % 8; rest > 0 {
		var pad [8]byte
		copy(pad[:], b[8*full:n])
		dst[full] = r.word(pad[:])
		nb += int64(rest) * 8
	}
	r.bits += nb
	return nb, nil
}

func (r *bitReader) word(b []byte) uint64 {
	if r.lsb {
		return binary.LittleEndian.Uint64(b)
	}
	return bits.Reverse64(binary.BigEndian.Uint64(b))
}

// looksLikeText refuses a binary capture whose first bytes are all 0/1 characters or hex
// digits with white space: it was almost certainly written as text. A packed capture of a
// PRBS has every byte value; 64 bytes of text by chance have probability below 2^-200.
func looksLikeText(b []byte) error {
	if len(b) < 64 {
		return nil
	}
	b = b[:min(len(b), 4096)]
	zeroOne, hex := true, true
	for _, c := range b {
		switch {
		case c == '0' || c == '1' || isSpace(c):
		case hexValue(c) >= 0:
			zeroOne = false
		default:
			return nil
		}
	}
	switch {
	case zeroOne:
		return &FormatError{0, "the capture is text of 0 and 1 characters, not packed binary: use -format ascii"}
	case hex:
		return &FormatError{0, "the capture is text of hexadecimal digits, not packed binary: use -format hex"}
	}
	return nil
}

func (r *bitReader) readText(dst []uint64) (int64, error) {
	nw := 0
	var nb int64
	for nw < len(dst) {
		if r.i == r.n {
			if r.eof {
				break
			}
			n, err := r.in.Read(r.buf)
			r.i, r.n = 0, n
			switch {
			case err == io.EOF:
				r.eof = true
			case err != nil:
				return 0, err
			}
			continue
		}
		c, pos := r.buf[r.i], r.offset
		r.i++
		r.offset++
		var v, width int
		switch {
		case isSpace(c):
			continue
		case r.format == ASCII && (c == '0' || c == '1'):
			v, width = int(c-'0'), 1
		case r.format == Hex && hexValue(c) >= 0:
			if r.digit < 0 {
				r.digit, r.dpos = hexValue(c), pos
				continue
			}
			v, width = r.digit<<4|hexValue(c), 8
			r.digit = -1
		default:
			return 0, &FormatError{pos, fmt.Sprintf("%s is not %s", describeByte(c), r.expected())}
		}
		r.push(v, width)
		if r.nacc == 64 {
			dst[nw] = r.acc
			nw++
			nb += 64
			r.acc, r.nacc = 0, 0
		}
	}
	if nw < len(dst) { // the end of the input
		if r.digit >= 0 {
			return 0, &FormatError{r.dpos, "an odd number of hexadecimal digits: the last byte has one digit"}
		}
		if r.nacc > 0 {
			dst[nw] = r.acc
			nb += int64(r.nacc)
			r.acc, r.nacc = 0, 0
		}
	}
	r.bits += nb
	if nb == 0 {
		return 0, io.EOF
	}
	return nb, nil
}

func (r *bitReader) push(v, width int) {
	if width == 1 {
		r.acc |= uint64(v) << r.nacc
		r.nacc++
		return
	}
	b := uint64(v)
	if !r.lsb {
		b = uint64(bits.Reverse8(uint8(v)))
	}
	r.acc |= b << r.nacc
	r.nacc += 8
}

func (r *bitReader) expected() string {
	if r.format == ASCII {
		return "0, 1 or white space (is the file ascii?)"
	}
	return "a hexadecimal digit or white space (is the file hex?)"
}

func describeByte(c byte) string {
	if c >= 0x20 && c < 0x7f {
		return fmt.Sprintf("%q (0x%02x)", rune(c), c)
	}
	return fmt.Sprintf("the byte 0x%02x", c)
}

func isSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' || c == '\v'
}

func hexValue(c byte) int {
	switch {
	case c >= '0' && c <= '9':
		return int(c - '0')
	case c >= 'a' && c <= 'f':
		return int(c-'a') + 10
	case c >= 'A' && c <= 'F':
		return int(c-'A') + 10
	}
	return -1
}
