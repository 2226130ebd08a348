package segytest

import (
	"bytes"
	"encoding/binary"
	"errors"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
)

// NoTrace in Expect.Trace: the error is about no one trace.
const NoTrace = -1

// Expect is the behaviour every reader of quadtrace must show on a case.
type Expect struct {
	// Err, when not empty, is a substring of the one-line error opening
	// must fail with. Trace (0-based, NoTrace when about no one trace) and
	// Byte (1-based file byte, 0 when about no one position) are where the
	// error must say the problem is; they are meaningful only with Err.
	Err   string
	Trace int
	Byte  int64
	// Warning, when Err is empty, is a substring of a warning the open
	// file must report ("" = the file opens and no warning is required).
	Warning string
	// HugeClaim marks headers that claim sizes (samples, traces, headers)
	// far beyond the file: a reader must not allocate memory for them,
	// only in proportion to the file's real size.
	HugeClaim bool
}

// Usable reports whether the case must open.
func (e Expect) Usable() bool { return e.Err == "" }

// Case is one malformed input. Bytes is the file content, unless Dir or
// FIFO is set: then the input is a directory, or a named pipe (which a
// reader must refuse without opening it for reading: that would block
// until a writer came), where a file was expected.
type Case struct {
	Name   string
	Bytes  []byte
	Dir    bool
	FIFO   bool
	Expect Expect
}

// Special reports whether the case is not a regular file (Dir or FIFO):
// it has no bytes to read through an io.ReaderAt.
func (c Case) Special() bool { return c.Dir || c.FIFO }

// MakeFIFO makes a named pipe at p (mode 0644) for tests of inputs and
// outputs that must refuse one; it returns errors.ErrUnsupported where the
// system has none (Windows).
func MakeFIFO(p string) error { return mkfifo(p) }

// Create materialises the case in dir (a file, or a directory when Dir is
// set) and returns its path. The name is derived from Name.
func (c Case) Create(dir string) (string, error) {
	name := strings.Map(func(r rune) rune {
		switch {
		case r >= 'a' && r <= 'z', r >= '0' && r <= '9', r == '-':
			return r
		case r >= 'A' && r <= 'Z':
			return r - 'A' + 'a'
		}
		return '-'
	}, c.Name) + ".sgy"
	p := filepath.Join(dir, name)
	if c.Dir {
		return p, os.Mkdir(p, 0o755)
	}
	if c.FIFO {
		return p, mkfifo(p)
	}
	return p, os.WriteFile(p, c.Bytes, 0o644)
}

// Find returns the case named name.
func Find(name string) (Case, error) {
	for _, c := range Malformed() {
		if c.Name == name {
			return c, nil
		}
	}
	return Case{}, errors.New("segytest: no case " + name)
}

func fails(msg string, trace int, byteNo int64) Expect {
	return Expect{Err: msg, Trace: trace, Byte: byteNo}
}

func usable(warning string) Expect { return Expect{Warning: warning} }

func huge(e Expect) Expect {
	e.HugeClaim = true
	return e
}

// edit returns Base3D's bytes changed by fn.
func edit(fn func(b []byte)) []byte {
	b := Base3D().Bytes()
	fn(b)
	return b
}

// build returns the bytes of Base3D changed by fn.
func build(fn func(s *File)) []byte {
	s := Base3D()
	fn(&s)
	return s.Bytes()
}

// Malformed returns the bad-input suite: files that are cut short,
// contradict themselves, claim impossible sizes, hold awkward but usable
// data, or are not SEG-Y at all. Each case is generated afresh (the slice
// and its bytes may be modified by the caller) and states the behaviour
// expected. The messages and positions are those of quadtrace/segy's
// *Error ("trace N: byte B: what"); trace numbers are 0-based, byte
// numbers 1-based as the standards print them.
func Malformed() []Case {
	good := Base3D().Bytes()
	const ts = BaseTraceSize
	cut := func(n int) []byte { return append([]byte(nil), good[:n]...) }
	rng := rand.New(rand.NewPCG(7, 8))
	random := make([]byte, 9000)
	for i := range random {
		random[i] = byte(rng.Uint32())
	}
	be := binary.BigEndian
	return append([]Case{
		// Cut short.
		{Name: "empty file", Bytes: []byte{},
			Expect: fails("file is 0 bytes: truncated inside the 3200-byte textual header", NoTrace, 0)},
		{Name: "truncated in textual header", Bytes: cut(1000),
			Expect: fails("file is 1000 bytes: truncated inside the 3200-byte textual header", NoTrace, 0)},
		{Name: "truncated in binary header", Bytes: cut(3300),
			Expect: fails("file ends inside the binary header (bytes 3201-3600): 3300 bytes", NoTrace, 3301)},
		{Name: "truncated in first trace header", Bytes: cut(3600 + 100),
			Expect: fails("file ends 100 bytes into the first trace: a trace is 272 bytes", 0, 3601)},
		{Name: "truncated in a later trace header", Bytes: cut(3600 + 3*ts + 50),
			Expect: fails("file ends 50 bytes into trace 3: a trace is 272 bytes", 3, 3600+3*ts+1)},
		{Name: "truncated mid-trace", Bytes: cut(3600 + 3*ts + 250),
			Expect: fails("file ends 250 bytes into trace 3: a trace is 272 bytes", 3, 3600+3*ts+1)},
		{Name: "trailing bytes not a whole trace", Bytes: append(cut(len(good)), 1, 2, 3),
			Expect: fails("file ends 3 bytes into trace 12", 12, BaseSize+1)},
		{Name: "trace size does not divide the file", Bytes: edit(func(b []byte) {
			// binary header says 9 samples, trace headers say nothing
			be.PutUint16(b[3220:], 9)
			for i := 0; i < BaseTraces; i++ {
				be.PutUint16(b[3600+i*ts+114:], 0)
			}
		}), Expect: fails("file ends 228 bytes into trace 11: a trace is 276 bytes", 11, 3600+11*276+1)},

		// Sample counts.
		{Name: "sample count 0", Bytes: build(func(s *File) {
			s.Samples, s.TraceSamples = 0, 0
			s.Tail = make([]byte, 64)
		}), Expect: fails("sample count 0 in the binary header and in the first trace header (byte 3715)", 0, 3221)},
		{Name: "sample count 60000 in a short file", Bytes: edit(func(b []byte) {
			be.PutUint16(b[3220:], 60000)
			be.PutUint16(b[3600+114:], 60000)
		}), Expect: huge(fails("file ends 3264 bytes into the first trace: a trace is 240240 bytes", 0, 3601))},
		{Name: "disagreeing sample counts", Bytes: edit(func(b []byte) { be.PutUint16(b[3220:], 50) }),
			Expect: usable("binary header sample count 50 (byte 3221) disagrees with the first trace header's 8 (byte 3715): using 8")},

		// Claims of billions.
		{Name: "rev 2 extended sample count 2e9", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0            // rev 2.0: bytes 3501-3502 revision
			be.PutUint32(b[3268:], 2000000000) // rev 2.0: bytes 3269-3272 extended samples per trace
		}), Expect: huge(usable("disagrees with the first trace header's 8 (byte 3715): using 8"))},
		{Name: "rev 2 extended sample count 2e9 and none in trace headers", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0
			be.PutUint32(b[3268:], 2000000000)
			be.PutUint16(b[3600+114:], 0)
		}), Expect: huge(fails("file ends 3264 bytes into the first trace: a trace is 8000000240 bytes", 0, 3601))},
		{Name: "65535 samples of 8 bytes", Bytes: edit(func(b []byte) {
			be.PutUint16(b[3220:], 65535)
			be.PutUint16(b[3224:], 6)
			be.PutUint16(b[3600+114:], 65535)
		}), Expect: huge(fails("file ends 3264 bytes into the first trace: a trace is 524520 bytes", 0, 3601))},
		{Name: "rev 2 trace count 5e9", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0
			be.PutUint64(b[3512:], 5000000000) // rev 2.0: bytes 3513-3520 number of traces in the file
			be.PutUint16(b[3212:], 65535)      // bytes 3213-3214 data traces per ensemble
		}), Expect: huge(usable(""))},
		{Name: "32767 extended textual headers", Bytes: edit(func(b []byte) { be.PutUint16(b[3504:], 32767) }),
			Expect: huge(fails("32767 extended textual headers need 104858000 bytes but the file has 6864", NoTrace, 3505))},

		// Sample interval.
		{Name: "negative interval in binary header", Bytes: build(func(s *File) { s.Interval, s.TraceInterval = -4000, 2000 }),
			Expect: usable("binary header interval is -4000 (byte 3217): using the first trace header's 2000 (byte 3717)")},
		{Name: "negative interval in trace headers", Bytes: build(func(s *File) { s.TraceInterval = -4000 }),
			Expect: usable("first trace header interval is -4000 (byte 3717): using 4000 from the binary header")},
		{Name: "negative interval in binary and trace headers", Bytes: build(func(s *File) { s.Interval = -4000 }),
			Expect: usable("interval unknown")},
		{Name: "zero interval everywhere", Bytes: build(func(s *File) { s.Interval, s.TraceInterval = 0, 0 }),
			Expect: usable("no positive sample interval in the binary header (byte 3217: 0) or the first trace header (0): interval unknown")},
		{Name: "disagreeing intervals", Bytes: build(func(s *File) { s.TraceInterval = 2000 }),
			Expect: usable("binary header interval 4000 disagrees with trace headers 2000 (byte 3717): using 4000 from the binary header")},

		// Format and byte order.
		{Name: "unknown format code", Bytes: build(func(s *File) { s.Format = 17 }),
			Expect: fails("unknown sample format 17", NoTrace, 3225)},
		{Name: "obsolete format 4", Bytes: edit(func(b []byte) { be.PutUint16(b[3224:], 4) }),
			Expect: fails("sample format 4 (fixed point with gain) is obsolete", NoTrace, 3225)},
		{Name: "little-endian without byte-order word", Bytes: build(func(s *File) { s.Order = binary.LittleEndian }),
			Expect: usable("")},
		{Name: "rev 2 little-endian with byte-order word", Bytes: build(func(s *File) {
			s.Order, s.ByteOrderWord, s.Revision = binary.LittleEndian, true, [2]byte{2, 0}
		}), Expect: usable("")},
		{Name: "trace headers in the other byte order", Bytes: edit(func(b []byte) {
			// binary header big-endian, every trace header little-endian
			for i := 0; i < BaseTraces; i++ {
				h := b[3600+i*ts : 3600+i*ts+240]
				for _, p := range [][2]int{{1, 4}, {9, 4}, {13, 4}, {21, 4}, {37, 4}, {71, 2}, {109, 2}, {115, 2}, {117, 2}, {181, 4}, {185, 4}, {189, 4}, {193, 4}, {215, 2}} {
					f := h[p[0]-1 : p[0]-1+p[1]]
					for x, y := 0, len(f)-1; x < y; x, y = x+1, y-1 {
						f[x], f[y] = f[y], f[x]
					}
				}
			}
		}), Expect: fails("trace headers are little-endian but the binary header is big-endian", 0, 3715)},
		{Name: "sample counts that vary between traces", Bytes: edit(func(b []byte) {
			be.PutUint16(b[3600+4*ts+114:], 7)
			be.PutUint16(b[3600+9*ts+114:], 9)
		}), Expect: usable("2 traces declare a sample count other than the file's 8 (first: trace 4, byte 4803: 7)")},
		{Name: "rev 2 additional header count 65535 in a short file", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0
			be.PutUint16(b[3506:], 65535) // rev 2.0: bytes 3507-3508 additional trace headers
		}), Expect: huge(fails("file ends 3264 bytes into the first trace: a trace is 15728672 bytes", 0, 3601))},
		{Name: "rev 2 first trace past the end", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0
			be.PutUint64(b[3520:], 1e12) // rev 2.0: bytes 3521-3528 byte offset of the first trace
		}), Expect: huge(fails("first trace at byte offset 1000000000000: outside 3600..6864", NoTrace, 3521))},
		{Name: "rev 2 data trailers larger than the file", Bytes: edit(func(b []byte) {
			b[3500], b[3501] = 2, 0
			be.PutUint32(b[3528:], 5) // rev 2.0: bytes 3529-3532 number of data trailer stanzas
		}), Expect: fails("5 data trailer stanzas of 3200 bytes do not fit in the 3264 bytes", NoTrace, 3529)},
		{Name: "pairwise byte-swapped word", Bytes: edit(func(b []byte) { copy(b[3296:], []byte{2, 1, 4, 3}) }),
			Expect: fails("byte-order word 0x02010403 means pairwise byte-swapped data", NoTrace, 3297)},

		// Extended textual headers.
		{Name: "extended header count past the end", Bytes: edit(func(b []byte) { be.PutUint16(b[3504:], 500) }),
			Expect: fails("500 extended textual headers need 1603600 bytes but the file has 6864", NoTrace, 3505)},
		{Name: "extended header count -1 without end stanza", Bytes: build(func(s *File) {
			s.ExtTextCount, s.ExtText = -1, []string{"((SEG: SOMETHING))"}
		}), Expect: fails("extended textual header count -1: no ((SEG: EndText)) stanza", NoTrace, 3505)},
		{Name: "extended header count -1 with end stanza", Bytes: build(func(s *File) {
			s.ExtTextCount, s.ExtText = -1, []string{"((SEG: Processing ver 1.0))\nFREE TEXT", "((SEG: EndText))"}
		}), Expect: usable("")},

		// Awkward but usable data.
		{Name: "all-zero traces", Bytes: build(func(s *File) {
			for i := range s.Traces {
				s.Traces[i].Values = nil
			}
		}), Expect: usable("every sample of the 12 sampled traces is zero")},
		{Name: "NaN and Inf samples", Bytes: build(func(s *File) {
			s.Traces[2].Values[3] = math.NaN()
			s.Traces[5].Values[0] = math.Inf(-1)
		}), Expect: usable("2 NaN or infinite samples")},
		{Name: "duplicate inline/crossline pairs", Bytes: build(func(s *File) {
			s.Traces = append(s.Traces, s.Traces[4], s.Traces[5])
		}), Expect: usable("2 duplicate traces")},
		{Name: "unsorted traces", Bytes: build(func(s *File) {
			r := rand.New(rand.NewPCG(3, 4))
			r.Shuffle(len(s.Traces), func(i, j int) { s.Traces[i], s.Traces[j] = s.Traces[j], s.Traces[i] })
		}), Expect: usable("sorted neither by inline nor by crossline")},
		{Name: "missing traces", Bytes: build(func(s *File) { s.Traces = append(s.Traces[:5], s.Traces[7:]...) }),
			Expect: usable("2 grid positions have no trace")},
		{Name: "sparse numbering", Bytes: build(func(s *File) { s.Traces[0].Inline = 1000000 }),
			Expect: usable("1 traces have inline or crossline numbers far outside the others and are left out of the grid: trace 0 (byte 3789: inline 1000000)")},
		{Name: "numbering at the int32 extremes", Bytes: build(func(s *File) {
			s.Traces[0].Inline, s.Traces[0].Crossline = math.MinInt32, math.MinInt32
			s.Traces[1].Inline, s.Traces[1].Crossline = math.MaxInt32, math.MaxInt32
		}), Expect: huge(usable("2 traces have inline or crossline numbers far outside the others"))},
		{Name: "flipped byte in one crossline", Bytes: edit(func(b []byte) {
			// the high byte of trace 5's crossline (bytes 193-196) flipped
			b[3600+5*ts+192] ^= 0x40
		}), Expect: huge(usable("trace 5 (byte 5153: crossline 1073741835)"))},
		{Name: "garbage numbering everywhere", Bytes: edit(func(b []byte) {
			r := rand.New(rand.NewPCG(12, 2))
			for i := 0; i < BaseTraces; i++ {
				be.PutUint32(b[3600+i*ts+188:], r.Uint32()) // inline, bytes 189-192
				be.PutUint32(b[3600+i*ts+192:], r.Uint32()) // crossline, bytes 193-196
			}
		}), Expect: huge(usable("traces shown in file order"))},
		{Name: "headers only", Bytes: build(func(s *File) { s.Traces = nil }),
			Expect: usable("no traces")},

		// Not SEG-Y at all.
		{Name: "PNG image", Bytes: noisePNG(),
			Expect: fails("unknown sample format", NoTrace, 3225)},
		{Name: "small PNG image", Bytes: flatPNG(),
			Expect: fails("truncated inside the 3200-byte textual header", NoTrace, 0)},
		{Name: "random bytes", Bytes: random,
			Expect: fails("unknown sample format", NoTrace, 3225)},
		{Name: "a directory", Dir: true,
			Expect: fails("is a directory", NoTrace, 0)},
	}, fifoCases()...)
}

// noisePNG is a real PNG (image/png) of 64 x 64 pixels of seeded noise,
// larger than the SEG-Y headers, so a reader gets past the size checks.
func noisePNG() []byte {
	img := image.NewNRGBA(image.Rect(0, 0, 64, 64))
	r := rand.New(rand.NewPCG(11, 12))
	for i := range img.Pix {
		img.Pix[i] = byte(r.Uint32())
	}
	var b bytes.Buffer
	png.Encode(&b, img) // cannot fail on a valid image and a bytes.Buffer
	return b.Bytes()
}

// flatPNG is a real PNG of one grey square: a few dozen bytes.
func flatPNG() []byte {
	img := image.NewGray(image.Rect(0, 0, 32, 32))
	for i := range img.Pix {
		img.Pix[i] = color.Gray{Y: 128}.Y
	}
	var b bytes.Buffer
	png.Encode(&b, img)
	return b.Bytes()
}
