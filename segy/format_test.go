package segy

import (
	"encoding/binary"
	"encoding/hex"
	"math"
	"slices"
	"testing"

	"quadtrace/segy/segytest"
)

// Sample formats of SEG-Y rev 1 (2002) section 4 (codes 1, 2, 3, 5, 8) and
// rev 2.0 (2017) table 2, bytes 3225-3226 (adds 6 = 8-byte IEEE, 7 = 3-byte
// two's complement, 9 = 8-byte two's complement, 10 = 4-byte unsigned,
// 11 = 2-byte unsigned, 12 = 8-byte unsigned, 15 = 3-byte unsigned,
// 16 = 1-byte unsigned; the rev 2.0 codes are recalled from memory and
// agree with the SEGY_FORMAT enum of segyio's lib/include/segyio/segy.h in
// releases after 1.8.3). Each case gives big-endian sample bytes written
// by hand and the value they encode; the little-endian variant reverses
// each sample's bytes.
func TestSampleFormats(t *testing.T) {
	cases := []struct {
		format int
		hex    []string
		want   []float32
	}{
		{1, []string{"c276a000", "41100000", "00000000"}, []float32{-118.625, 1, 0}}, // IBM worked example (System/370 PoO)
		{2, []string{"80000000", "7fffffff", "ffffffff"}, []float32{-2147483648, 2147483647, -1}},
		{3, []string{"8000", "7fff", "fffe"}, []float32{-32768, 32767, -2}},
		{5, []string{"3f800000", "c0490fdb", "00000001"}, []float32{1, float32(-math.Pi), math.SmallestNonzeroFloat32}}, // IEEE 754 binary32
		{6, []string{"3ff8000000000000", "bfb999999999999a", "7fefffffffffffff"}, []float32{1.5, -0.1, float32(math.Inf(1))}},
		{7, []string{"fffffe", "800000", "7fffff"}, []float32{-2, -8388608, 8388607}},
		{8, []string{"80", "7f", "ff"}, []float32{-128, 127, -1}},
		{9, []string{"8000000000000000", "ffffffffffffffff", "0000000000000100"}, []float32{-9223372036854775808, -1, 256}},
		{10, []string{"ffffffff", "80000000", "00000001"}, []float32{4294967295, 2147483648, 1}},
		{11, []string{"ffff", "8000", "0001"}, []float32{65535, 32768, 1}},
		{12, []string{"ffffffffffffffff", "8000000000000000", "0000000000000002"}, []float32{18446744073709551615, 9223372036854775808, 2}},
		{15, []string{"ffffff", "800000", "000001"}, []float32{16777215, 8388608, 1}},
		{16, []string{"ff", "80", "01"}, []float32{255, 128, 1}},
	}
	for _, c := range cases {
		for _, little := range []bool{false, true} {
			name := FormatName(c.format)
			if little {
				name += "/little"
			}
			t.Run(name, func(t *testing.T) {
				raw := make([][]byte, len(c.hex))
				for i, h := range c.hex {
					b, err := hex.DecodeString(h)
					if err != nil {
						t.Fatal(err)
					}
					if little {
						slices.Reverse(b)
					}
					raw[i] = b
				}
				var order binary.ByteOrder = binary.BigEndian
				if little {
					order = binary.LittleEndian
				}
				s := segytest.File{Order: order, Format: c.format, Samples: len(raw), Interval: 2000, TraceSamples: -1, TraceInterval: -1,
					Traces:      segytest.Grid3D([]int{10, 11}, []int{100, 101, 102}, len(raw)),
					SampleBytes: func(tr, k int) []byte { return raw[k] }}
				f, err := openBytes(s.Bytes(), "formats.sgy", Options{})
				if err != nil {
					t.Fatal(err)
				}
				in := f.Info()
				if in.Format != c.format || in.ByteOrder != map[bool]string{false: "big", true: "little"}[little] {
					t.Fatalf("format %d order %s", in.Format, in.ByteOrder)
				}
				got, err := f.ReadTrace(4, nil)
				if err != nil {
					t.Fatal(err)
				}
				for k := range c.want {
					if math.Float32bits(got[k]) != math.Float32bits(c.want[k]) {
						t.Errorf("sample %d (%s) = %g, want %g", k, c.hex[k], got[k], c.want[k])
					}
					sl, err := f.TimeSlice(k, 0)
					if err != nil {
						t.Fatal(err)
					}
					if math.Float32bits(sl[1][1]) != math.Float32bits(c.want[k]) {
						t.Errorf("TimeSlice(%d)[1][1] = %g, want %g", k, sl[1][1], c.want[k])
					}
				}
			})
		}
	}
}

func TestDecodeSamplesRejects(t *testing.T) {
	dst := make([]float32, 4)
	if DecodeSamples(dst, make([]byte, 15), 5, "big") {
		t.Error("short source accepted")
	}
	if DecodeSamples(dst, make([]byte, 64), 4, "big") || DecodeSamples(dst, make([]byte, 64), 13, "big") {
		t.Error("unknown format accepted")
	}
	if FormatSize(4) != 0 || FormatSize(7) != 3 || FormatSize(16) != 1 {
		t.Error("format sizes")
	}
}

// TestDecodeIEEE32MatchesLoop checks the word-swapping decode of format 5
// against the one-sample-a-time loop (the definition: IEEE 754 binary32 in
// the file's byte order, SEG-Y rev 1 section 4) bit for bit, at every
// length to 70 samples (the 16-byte body and the word tail) and at source
// offsets 0-3 (unaligned reads), on bit patterns that cover NaNs,
// infinities, subnormals and both signs. segyio's values for whole files
// of format 5 in both byte orders are checked through ReadTrace in
// TestSegyioWritesQuadtraceReads (python3-segyio), and the corpus's
// small.sgy and small-lsb.sgy must read alike (TestCorpusLittleEndianTwin).
func TestDecodeIEEE32MatchesLoop(t *testing.T) {
	patterns := []uint32{0x7fc00000, 0xff800000, 0x7f800000, 0x00000001, 0x80000001, 0x3f800000, 0xc0490fdb, 0x007fffff, 0xdeadbeef, 0x01020304}
	raw := make([]byte, 4*70+3)
	for i := range raw {
		raw[i] = byte(i*37 + 11)
	}
	for k, p := range patterns {
		binary.BigEndian.PutUint32(raw[4*k+1:], p)
	}
	for _, order := range []binary.ByteOrder{binary.BigEndian, binary.LittleEndian} {
		for shift := 0; shift < 4; shift++ {
			for n := 0; n <= 70; n++ {
				src := raw[shift : shift+4*n]
				got := make([]float32, n)
				want := make([]float32, n)
				decodeIEEE32(got, src, order)
				decodeIEEE32Loop(want, src, order)
				for i := range want {
					if math.Float32bits(got[i]) != math.Float32bits(want[i]) {
						t.Fatalf("%v, offset %d, %d samples: sample %d is %08x, the loop gives %08x", order, shift, n, i, math.Float32bits(got[i]), math.Float32bits(want[i]))
					}
				}
			}
		}
	}
}
