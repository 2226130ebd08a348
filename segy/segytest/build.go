// Package segytest builds SEG-Y files for tests, as net/http/httptest serves
// HTTP for them: File is a small builder of well-formed files and Malformed
// lists the bad-input suite, each case with the behaviour expected of any
// reader of quadtrace (an error naming what was read and where, or a usable
// file with a warning).
//
// Byte positions are written as literals at the places printed in SEG-Y
// revision 1 (SEG Technical Standards Committee, 2002) table 2 (binary
// header) and table 3 (trace header), and SEG-Y revision 2.0 (2017) table 2
// (byte-order word 3297-3300, extended sample count 3269-3272, extended
// textual header count 3505-3506, trace count 3513-3520). The package does
// not import quadtrace/segy, so the reader's constants are checked against
// the standard rather than against themselves, and segy's own tests can use
// it. It is meant to be imported from _test.go files only.
package segytest

import (
	"bytes"
	"encoding/binary"
	"math"
	"strings"

	"golang.org/x/text/encoding/charmap"
)

// SameAsBinary in File.TraceSamples or File.TraceInterval writes the binary
// header's value into every trace header.
const SameAsBinary = -1

// File describes a SEG-Y file to build. The zero value of Order is
// big-endian. Samples are encoded from Trace.Values for formats 1 (IBM
// float), 2 (int32), 3 (int16), 5 (IEEE float), 8 (int8) and 16 (uint8);
// other formats need SampleBytes (their samples are zero bytes otherwise).
type File struct {
	Order         binary.ByteOrder
	Format        int // binary 3225-3226
	Samples       int // binary 3221-3222; also the number of samples written per trace unless 0
	Interval      int // binary 3217-3218, microseconds
	TraceSamples  int // trace 115-116; SameAsBinary = Samples
	TraceInterval int // trace 117-118; SameAsBinary = Interval
	Revision      [2]byte
	ByteOrderWord bool     // write 16909060 at 3297-3300 in Order
	ExtTextCount  int      // binary 3505-3506
	ExtText       []string // extended textual headers written after the binary header
	ASCIIText     bool     // textual header in ASCII instead of EBCDIC
	Text          string   // textual header lines joined by '\n'; "" = a short default
	Traces        []Trace
	// SampleBytes returns the raw bytes of sample k of trace tr; nil
	// encodes Values in Format.
	SampleBytes func(tr, k int) []byte
	Tail        []byte // bytes appended after the last trace

	// SEG-Y revision 2.0 layout (table 2). ExtraHeaders is written at
	// 3507-3508 and that many additional 240-byte trace headers follow
	// each standard one, the first being trace header extension 1 (table
	// 4, filled from Trace.Ext1), the others Trace.MoreHeaders or zeros.
	// FirstTrace (3521-3528) and Trailers (3529-3532) are written as
	// given; Gap bytes of zeros are written between the headers and the
	// first trace, and Trailers stanzas of 3200 blanks after the last.
	ExtraHeaders int
	FirstTrace   uint64
	Gap          int
	Trailers     int
}

// Ext1 is trace header extension 1 of SEG-Y rev 2.0 (table 4): the fields
// quadtrace reads, at the byte positions of that table (recalled from the
// standard, cross-checked with the TGSAI "segy" library's transcription;
// the literals below are written independently of quadtrace/segy's
// constants).
type Ext1 struct {
	SeqLine, SeqFile uint64  // 1-8, 9-16
	FieldRecord      int64   // 17-24
	Ensemble         int64   // 25-32
	Samples          uint32  // 137-140
	IntervalUS       float64 // 145-152
	Count            uint16  // 157-158 additional headers of this trace
	CDPX, CDPY       float64 // 161-168, 169-176
	Name             string  // 233-240, e.g. "SEG00001" (ASCII)
}

// Trace is one trace of a File: the trace-header fields quadtrace reads and
// the sample values (missing values are zero).
type Trace struct {
	Inline, Crossline    int // 189 / 193
	Offset               int // 37
	CDP                  int // 21
	FieldRecord, Channel int // 9 / 13
	X, Y                 int // raw CDP X / Y, 181 / 185
	CoordScalar          int // 71
	Delay, TimeScalar    int // 109 / 215
	Values               []float64
	Ext1                 Ext1   // written when File.ExtraHeaders > 0
	MoreHeaders          []byte // additional headers after extension 1 (zeros when short)
}

// FormatSize is the bytes per sample of the SEG-Y format codes (rev 2.0
// table 2, bytes 3225-3226); 0 for codes the standard does not define.
func FormatSize(code int) int {
	return map[int]int{1: 4, 2: 4, 3: 2, 4: 4, 5: 4, 6: 8, 7: 3, 8: 1, 9: 8, 10: 4, 11: 2, 12: 8, 15: 3, 16: 1}[code]
}

// Bytes returns the file's bytes.
func (s File) Bytes() []byte {
	o := s.Order
	if o == nil {
		o = binary.BigEndian
	}
	var b bytes.Buffer
	text := s.Text
	if text == "" {
		text = "C 1 SYNTHETIC TEST FILE\nC 2 BUILT BY QUADTRACE SEGYTEST"
	}
	if s.ASCIIText {
		b.Write(ASCIIText(text))
	} else {
		b.Write(EBCDICText(text))
	}
	bin := make([]byte, 400)
	p16 := func(pos, v int) { o.PutUint16(bin[pos-3201:], uint16(int16(v))) }
	p16(3217, s.Interval)
	p16(3221, s.Samples)
	p16(3225, s.Format)
	bin[3501-3201], bin[3502-3201] = s.Revision[0], s.Revision[1]
	if s.ByteOrderWord {
		o.PutUint32(bin[3297-3201:], 0x01020304)
	}
	p16(3505, s.ExtTextCount)
	p16(3507, s.ExtraHeaders)
	o.PutUint64(bin[3521-3201:], s.FirstTrace)
	o.PutUint32(bin[3529-3201:], uint32(int32(s.Trailers)))
	b.Write(bin)
	for _, e := range s.ExtText {
		b.Write(EBCDICText(e))
	}
	b.Write(make([]byte, s.Gap))
	size := FormatSize(s.Format)
	for i, tr := range s.Traces {
		h := make([]byte, 240)
		q32 := func(pos, v int) { o.PutUint32(h[pos-1:], uint32(int32(v))) }
		q16 := func(pos, v int) { o.PutUint16(h[pos-1:], uint16(int16(v))) }
		q32(1, i+1)
		q32(9, tr.FieldRecord)
		q32(13, tr.Channel)
		q32(21, tr.CDP)
		q32(37, tr.Offset)
		q16(71, tr.CoordScalar)
		q16(109, tr.Delay)
		ns, dt := s.TraceSamples, s.TraceInterval
		if ns == SameAsBinary {
			ns = s.Samples
		}
		if dt == SameAsBinary {
			dt = s.Interval
		}
		q16(115, ns)
		q16(117, dt)
		q32(181, tr.X)
		q32(185, tr.Y)
		q32(189, tr.Inline)
		q32(193, tr.Crossline)
		q16(215, tr.TimeScalar)
		b.Write(h)
		if s.ExtraHeaders > 0 {
			x := make([]byte, 240*s.ExtraHeaders)
			e := tr.Ext1
			o.PutUint64(x[0:], e.SeqLine)
			o.PutUint64(x[8:], e.SeqFile)
			o.PutUint64(x[16:], uint64(e.FieldRecord))
			o.PutUint64(x[24:], uint64(e.Ensemble))
			o.PutUint32(x[136:], e.Samples)
			o.PutUint64(x[144:], math.Float64bits(e.IntervalUS))
			o.PutUint16(x[156:], e.Count)
			o.PutUint64(x[160:], math.Float64bits(e.CDPX))
			o.PutUint64(x[168:], math.Float64bits(e.CDPY))
			copy(x[232:240], e.Name)
			copy(x[240:], tr.MoreHeaders)
			b.Write(x)
		}
		n := s.Samples
		if n == 0 {
			n = ns
		}
		w := make([]byte, size)
		for k := 0; k < n; k++ {
			if s.SampleBytes != nil {
				b.Write(s.SampleBytes(i, k))
				continue
			}
			v := 0.0
			if k < len(tr.Values) {
				v = tr.Values[k]
			}
			clear(w)
			switch s.Format {
			case 1:
				o.PutUint32(w, IBM(v))
			case 2:
				o.PutUint32(w, uint32(int32(v)))
			case 3:
				o.PutUint16(w, uint16(int16(v)))
			case 5:
				o.PutUint32(w, math.Float32bits(float32(v)))
			case 8, 16:
				w[0] = byte(int8(v))
			}
			b.Write(w)
		}
	}
	b.Write(s.Tail)
	for i := 0; i < s.Trailers; i++ {
		b.Write(bytes.Repeat([]byte{' '}, 3200))
	}
	return b.Bytes()
}

// IBM encodes v as an IBM System/370 single-precision hexadecimal float
// (IBM System/370 Principles of Operation: sign bit, 7-bit excess-64
// exponent of 16, 24-bit fraction), truncating the fraction. NaN and values
// below the smallest magnitude give 0; values above the largest give the
// largest. Worked example of that manual: -118.625 = 0xC276A000.
func IBM(v float64) uint32 {
	if v == 0 || math.IsNaN(v) {
		return 0
	}
	var sign uint32
	if v < 0 {
		sign, v = 0x80000000, -v
	}
	if math.IsInf(v, 0) {
		return sign | 0x7fffffff
	}
	e := 64
	for v >= 1 {
		v /= 16
		e++
	}
	for v < 1.0/16 {
		v *= 16
		e--
	}
	switch {
	case e > 127:
		return sign | 0x7fffffff
	case e < 0:
		return 0
	}
	return sign | uint32(e)<<24 | uint32(v*(1<<24))
}

// EBCDICText returns a 3200-byte textual header in EBCDIC (IBM code page
// 037, the encoding SEG-Y rev 1 section 3 prescribes): 40 cards of 80
// characters, text split at '\n', each line cut or blank-padded to 80.
// Characters outside code page 037 become blanks.
func EBCDICText(text string) []byte {
	return cards(text, 0x40, func(r rune) (byte, bool) {
		c, ok := charmap.CodePage037.EncodeRune(r)
		return c, ok && r >= 0x20
	})
}

// ASCIIText is EBCDICText in ASCII (allowed by SEG-Y rev 2.0 section 3);
// non-ASCII characters become blanks.
func ASCIIText(text string) []byte {
	return cards(text, ' ', func(r rune) (byte, bool) { return byte(r), r >= 0x20 && r < 0x7f })
}

// cards lays text out as 40 cards of 80 characters: lines split at '\n',
// each cut or padded with blank; encode gives a character's byte, or false
// for one that becomes a blank.
func cards(text string, blank byte, encode func(rune) (byte, bool)) []byte {
	out := bytes.Repeat([]byte{blank}, 3200)
	for li, line := range strings.Split(text, "\n") {
		if li >= 40 {
			break
		}
		col := 0
		for _, r := range line {
			if col >= 80 {
				break
			}
			if c, ok := encode(r); ok {
				out[li*80+col] = c
			}
			col++
		}
	}
	return out
}

// ValueRule is the sample value rule of the open SEG-Y corpus
// (testdata/segy-corpus/README.md): sample k of inline il, crossline xl is
// il + xl/100 + k*1e-5.
func ValueRule(il, xl, k int) float64 {
	return float64(il) + float64(xl)/100 + float64(k)*1e-5
}

// Grid3D returns the traces of an inline-sorted grid (crossline varying
// fastest), CDP = crossline, samples by ValueRule.
func Grid3D(ils, xls []int, samples int) []Trace {
	var out []Trace
	for _, il := range ils {
		for _, xl := range xls {
			tr := Trace{Inline: il, Crossline: xl, CDP: xl}
			for k := 0; k < samples; k++ {
				tr.Values = append(tr.Values, ValueRule(il, xl, k))
			}
			out = append(out, tr)
		}
	}
	return out
}

// Seq returns from, from+step, ... up to and including to.
func Seq(from, to, step int) []int {
	var s []int
	for v := from; v <= to; v += step {
		s = append(s, v)
	}
	return s
}

// Base3D is the well-formed file the malformed cases start from: IEEE
// floats (format 5), big-endian, 8 samples at 4 ms, inlines 1-3 by
// crosslines 10-13 inline-sorted (12 traces of 272 bytes, 6864 bytes in
// all), samples by ValueRule.
func Base3D() File {
	return File{Format: 5, Samples: 8, Interval: 4000, TraceSamples: SameAsBinary, TraceInterval: SameAsBinary,
		Traces: Grid3D(Seq(1, 3, 1), Seq(10, 13, 1), 8)}
}

// Base3D geometry, for the positions the cases name.
const (
	BaseTraceSize = 240 + 8*4     // bytes per trace of Base3D
	BaseTraces    = 12            // traces of Base3D
	BaseSize      = 3600 + 12*272 // bytes of Base3D
)
