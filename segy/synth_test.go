package segy

import (
	"bytes"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// synthFile builds SEG-Y bytes by hand at the byte positions printed in
// SEG-Y rev 1 (2002) table 2 (binary header) and table 3 (trace header),
// and rev 2.0 (2017) table 2 (byte-order word 3297, extended textual
// header count 3505). The positions are literals here on purpose, so the
// reader's constants are checked against the standard, not against
// themselves.
type synthFile struct {
	order              binary.ByteOrder
	format             int
	samples            int // binary 3221-3222
	interval           int // binary 3217-3218
	trSamples, trIntvl int // trace 115-116 / 117-118; -1 = same as binary
	revision           [2]byte
	byteOrderWord      bool
	extCount           int
	extBlocks          []string
	asciiText          bool
	text               string
	traces             []synthTrace
	sampleBytes        func(tr, k int) []byte // raw sample bytes; nil: IEEE/IBM of value()
	tail               []byte
}

type synthTrace struct {
	il, xl, off, cdp, ffid, chn int
	x, y                        int // raw CDP X/Y (181/185)
	scalar                      int // coordinate scalar (71)
	delay, timeScalar           int // 109, 215
	values                      []float64
}

func (s synthFile) bytes() []byte {
	o := s.order
	if o == nil {
		o = binary.BigEndian
	}
	var b bytes.Buffer
	text := s.text
	if text == "" {
		text = "C 1 SYNTHETIC TEST FILE\nC 2 BUILT BY THE SEGY PACKAGE TESTS"
	}
	if s.asciiText {
		t := bytes.Repeat([]byte(" "), 3200)
		copy(t, text)
		b.Write(t)
	} else {
		b.Write(encodeText(text))
	}
	bin := make([]byte, 400)
	p16 := func(pos, v int) { o.PutUint16(bin[pos-3201:], uint16(int16(v))) }
	p16(3217, s.interval)
	p16(3221, s.samples)
	p16(3225, s.format)
	bin[3501-3201], bin[3502-3201] = s.revision[0], s.revision[1]
	if s.byteOrderWord {
		o.PutUint32(bin[3297-3201:], 0x01020304)
	}
	p16(3505, s.extCount)
	b.Write(bin)
	for _, e := range s.extBlocks {
		b.Write(encodeText(e))
	}
	size := map[int]int{1: 4, 2: 4, 3: 2, 5: 4, 6: 8, 7: 3, 8: 1, 9: 8, 10: 4, 11: 2, 12: 8, 15: 3, 16: 1}[s.format]
	for i, tr := range s.traces {
		h := make([]byte, 240)
		q32 := func(pos, v int) { o.PutUint32(h[pos-1:], uint32(int32(v))) }
		q16 := func(pos, v int) { o.PutUint16(h[pos-1:], uint16(int16(v))) }
		q32(1, i+1)
		q32(9, tr.ffid)
		q32(13, tr.chn)
		q32(21, tr.cdp)
		q32(37, tr.off)
		q16(71, tr.scalar)
		q16(109, tr.delay)
		ns, dt := s.trSamples, s.trIntvl
		if ns < 0 {
			ns = s.samples
		}
		if dt < 0 {
			dt = s.interval
		}
		q16(115, ns)
		q16(117, dt)
		q32(181, tr.x)
		q32(185, tr.y)
		q32(189, tr.il)
		q32(193, tr.xl)
		q16(215, tr.timeScalar)
		b.Write(h)
		n := s.samples
		if n == 0 {
			n = ns
		}
		for k := 0; k < n; k++ {
			if s.sampleBytes != nil {
				b.Write(s.sampleBytes(i, k))
				continue
			}
			v := 0.0
			if k < len(tr.values) {
				v = tr.values[k]
			}
			w := make([]byte, size)
			switch s.format {
			case 5:
				o.PutUint32(w, math.Float32bits(float32(v)))
			case 1:
				o.PutUint32(w, Float32ToIBM(float32(v)))
			case 3:
				o.PutUint16(w, uint16(int16(v)))
			case 2:
				o.PutUint32(w, uint32(int32(v)))
			}
			b.Write(w)
		}
	}
	b.Write(s.tail)
	return b.Bytes()
}

// grid3D returns traces of an inline-sorted grid with the value rule of the
// corpus README (il + xl/100 + k*1e-5).
func grid3D(ils, xls []int, samples int) []synthTrace {
	var out []synthTrace
	for _, il := range ils {
		for _, xl := range xls {
			tr := synthTrace{il: il, xl: xl, cdp: xl}
			for k := 0; k < samples; k++ {
				tr.values = append(tr.values, valueRule(il, xl, k))
			}
			out = append(out, tr)
		}
	}
	return out
}

func seq(from, to, step int) []int {
	var s []int
	for v := from; v <= to; v += step {
		s = append(s, v)
	}
	return s
}

func writeTemp(t testing.TB, data []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "synthetic.sgy")
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
