package segy

import (
	"bytes"
	"encoding/binary"
	"strings"

	"golang.org/x/text/encoding/charmap"
)

// Sizes and byte positions of the SEG-Y revision 1 (2002) layout, kept by
// revision 2.0 (2017). Positions in comments and error messages are 1-based
// file byte numbers as the standards print them.
const (
	TextHeaderSize   = 3200 // textual file header, 40 lines of 80 characters
	BinaryHeaderSize = 400  // binary file header, bytes 3201-3600
	TraceHeaderSize  = 240  // trace header
	headersEnd       = TextHeaderSize + BinaryHeaderSize

	// Binary header (file byte numbers, SEG-Y rev 1 section 5 table 2;
	// rev 2.0 table 2).
	binInterval       = 3217 // int16 sample interval, microseconds
	binSamples        = 3221 // int16 samples per data trace
	binFormat         = 3225 // int16 data sample format code
	binSorting        = 3229 // int16 trace sorting code
	binMeasurement    = 3255 // int16 measurement system: 1 metres, 2 feet
	binExtSamples     = 3269 // rev 2: int32 extended samples per trace
	binExtInterval    = 3273 // rev 2: IEEE double extended sample interval
	binByteOrder      = 3297 // rev 2: int32 0x01020304 in the file's byte order
	binRevision       = 3501 // rev 1/2: major (3501) and minor (3502) revision bytes
	binFixedLength    = 3503 // int16 fixed length trace flag
	binExtTextHeaders = 3505 // int16 number of extended textual headers (-1 = variable)
	binExtraHeaders   = 3507 // rev 2: uint16 number of additional 240-byte trace headers
	binFirstTrace     = 3521 // rev 2: uint64 byte offset of the first trace (0 = after the headers)
	binTrailers       = 3529 // rev 2: int32 number of 3200-byte data trailer stanzas

	// Trace header extension 1 (1-based byte within the second 240-byte
	// header, SEG-Y rev 2.0 table 4). Positions recalled from the standard
	// (from memory) and cross-checked against the field table of the open
	// TGSAI "segy" Python library (standards/rev2.py); the binary header's
	// 3507, 3521 and 3529 likewise (standards/fields/binary.py).
	ext1SeqLine  = 1   // uint64 extended trace sequence number within line
	ext1SeqFile  = 9   // uint64 extended trace sequence number within file
	ext1Samples  = 137 // uint32 extended number of samples in this trace
	ext1Interval = 145 // IEEE double extended sample interval, microseconds
	ext1Count    = 157 // uint16 number of additional headers of this trace
	ext1CDPX     = 161 // IEEE double extended CDP X
	ext1CDPY     = 169 // IEEE double extended CDP Y
	ext1Name     = 233 // 8 characters "SEG00001"

	// Trace header (1-based byte within the 240-byte header, SEG-Y rev 1
	// section 6 table 3; rev 2.0 table 3).
	thFieldRecord    = 9   // int32 original field record number
	thChannel        = 13  // int32 trace number within the field record
	thCDP            = 21  // int32 ensemble (CDP) number
	thOffset         = 37  // int32 source-receiver offset
	thCoordScalar    = 71  // int16 scalar for bytes 41-68 / 73-88 / 181-188
	thCoordUnits     = 89  // int16 coordinate units: 1 length, 2 arcsec, 3 degrees, 4 DMS
	thDelay          = 109 // int16 delay recording time, ms
	thSamples        = 115 // int16 samples in this trace
	thInterval       = 117 // int16 sample interval of this trace, microseconds
	thCDPX           = 181 // int32 CDP X
	thCDPY           = 185 // int32 CDP Y
	thInline         = 189 // int32 inline number (3D post-stack)
	thCrossline      = 193 // int32 crossline number (3D post-stack)
	thTimeScalar     = 215 // int16 scalar for times in bytes 95-114
	byteOrderMagic   = 0x01020304
	endTextStanza    = "((SEG: ENDTEXT))"
	maxExtTextBlocks = 1 << 20
)

// traceHeaderWords lists the 1-based start byte and width of every integer
// field of the 240-byte trace header, used to swap a little-endian header to
// big-endian. SEG-Y rev 1 (2002) table 3; the split of bytes 219-240 follows
// the field table of segyio 1.8.3 (python3-segyio, segyio.tracefield.keys),
// which the interoperability test checks field by field.
var traceHeaderWords = func() [][2]int {
	var w [][2]int
	add := func(from, to, width int) {
		for b := from; b <= to; b += width {
			w = append(w, [2]int{b, width})
		}
	}
	add(1, 25, 4)    // sequence numbers, field record, channel, source point, CDP, CDP trace
	add(29, 35, 2)   // trace id, summed, stacked, data use
	add(37, 65, 4)   // offset, elevations, depths, water depths
	add(69, 71, 2)   // elevation scalar, coordinate scalar
	add(73, 85, 4)   // source and group X/Y
	add(89, 179, 2)  // coordinate units ... overtravel
	add(181, 197, 4) // CDP X, CDP Y, inline, crossline, shot point
	add(201, 203, 2) // shot point scalar, trace value unit
	add(205, 205, 4) // transduction constant mantissa
	add(209, 217, 2) // transduction exponent, units, device id, time scalar, source type
	add(219, 219, 4) // source energy direction mantissa
	add(223, 223, 2) // source energy direction exponent
	add(225, 225, 4) // source measurement mantissa
	add(229, 231, 2) // source measurement exponent, unit
	add(233, 237, 4) // unassigned
	return w
}()

// binaryHeaderWords: the integer fields of bytes 3201-3260 (rev 1 table 2),
// the only part the writer copies from a source file.
var binaryHeaderWords = func() [][2]int {
	var w [][2]int
	for b := 3201; b <= 3209; b += 4 {
		w = append(w, [2]int{b, 4})
	}
	for b := 3213; b <= 3259; b += 2 {
		w = append(w, [2]int{b, 2})
	}
	return w
}()

// swapWords reverses the bytes of each listed field; base is the 1-based
// number of buf[0].
func swapWords(buf []byte, words [][2]int, base int) {
	for _, w := range words {
		s := buf[w[0]-base : w[0]-base+w[1]]
		for i, j := 0, len(s)-1; i < j; i, j = i+1, j-1 {
			s[i], s[j] = s[j], s[i]
		}
	}
}

// i16 and i32 read a signed field at 1-based position pos of a block whose
// first byte has number base.
func i16(b []byte, pos, base int, o binary.ByteOrder) int {
	return int(int16(o.Uint16(b[pos-base:])))
}

func i32(b []byte, pos, base int, o binary.ByteOrder) int {
	return int(int32(o.Uint32(b[pos-base:])))
}

// applyScalar applies a SEG-Y scalar (trace header bytes 69-72, 201, 215):
// positive multiplies, negative divides by its absolute value, zero means
// 1 (SEG-Y rev 1 table 3, bytes 71-72).
func applyScalar(v float64, scalar int) float64 {
	switch {
	case scalar > 0:
		return v * float64(scalar)
	case scalar < 0:
		return v / float64(-scalar)
	}
	return v
}

// decodeText decodes one 3200-byte textual header. It reports whether the
// block was EBCDIC. Detection: SEG-Y rev 1 prescribes EBCDIC and rev 2.0
// allows ASCII; the block is taken as EBCDIC when more of its bytes are
// printable under code page 037 than under ASCII (common practice: in EBCDIC
// the space is 0x40 and letters sit at 0x81-0xE9, so the two readings rarely
// tie). EBCDIC is read as code page 037 except for the five bytes of
// ebcdicVariant; ASCII blocks keep 7-bit characters only. Each 80-byte card becomes one line with
// control characters blanked and trailing blanks removed; lines are joined
// with '\n'.
func decodeText(block []byte) (string, bool) {
	ascii, ebc := 0, 0
	for _, c := range block {
		if c >= 0x20 && c < 0x7f && c != 0x40 { // 0x40 is the EBCDIC blank
			ascii++
		}
		if c == 0x40 || (c >= 0x4a && c <= 0x7f) || (c >= 0x81 && c <= 0xf9) {
			ebc++
		}
	}
	isEBCDIC := ebc > ascii
	runes := make([]rune, len(block))
	for i, c := range block {
		r := rune(c)
		if isEBCDIC {
			r = charmap.CodePage037.DecodeByte(c)
			if a, ok := ebcdicVariant[c]; ok {
				r = a
			}
		}
		if r < 0x20 || (r >= 0x7f && r < 0xa0) || (!isEBCDIC && r >= 0x7f) {
			r = ' '
		}
		runes[i] = r
	}
	var sb strings.Builder
	for i := 0; i < len(runes); i += 80 {
		end := min(i+80, len(runes))
		if i > 0 {
			sb.WriteByte('\n')
		}
		sb.WriteString(strings.TrimRight(string(runes[i:end]), " "))
	}
	return sb.String(), isEBCDIC
}

// ebcdicVariant holds the five bytes where the EBCDIC table used by much
// SEG-Y software (segyio 1.8.3 among them, checked by the interoperability
// test) differs from IBM code page 037 by giving an ASCII character: 0x4A
// '[', 0x4F '!', 0x5A ']', 0x5F '^', 0x6A '|' (code page 037: cent sign,
// '|', '!', not sign, broken bar). quadtrace reads and writes these bytes
// that way, so '[', ']', '!', '^' and '|' survive a round trip through
// segyio; code page 037's own '[' (0xBA), ']' (0xBB) and '^' (0xB0) are
// still read correctly.
var ebcdicVariant = map[byte]rune{0x4a: '[', 0x4f: '!', 0x5a: ']', 0x5f: '^', 0x6a: '|'}

var asciiToEBCDICVariant = map[rune]byte{'[': 0x4a, '!': 0x4f, ']': 0x5a, '^': 0x5f, '|': 0x6a}

// encodeText turns text into a 3200-byte EBCDIC textual header (code page
// 037 with the ebcdicVariant bytes): lines split at '\n', each cut or blank-padded to 80 characters,
// 40 lines. Characters outside code page 037 become blanks.
func encodeText(text string) []byte {
	out := bytes.Repeat([]byte{0x40}, TextHeaderSize)
	lines := strings.Split(strings.ReplaceAll(text, "\r\n", "\n"), "\n")
	enc := charmap.CodePage037
	for li, line := range lines {
		if li >= 40 {
			break
		}
		col := 0
		for _, r := range line {
			if col >= 80 {
				break
			}
			b, ok := enc.EncodeRune(r)
			if v, isVariant := asciiToEBCDICVariant[r]; isVariant {
				b, ok = v, true
			}
			if !ok || r < 0x20 {
				b = 0x40
			}
			out[li*80+col] = b
			col++
		}
	}
	return out
}
