package segytest

import (
	"bytes"
	"encoding/binary"
	"testing"
)

// TestIBM checks the encoder against IBM System/370 Principles of
// Operation: the worked example -118.625 = 0xC276A000, 1 = 0x41100000
// (fraction 1/16, exponent 65), and 0.
func TestIBM(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want uint32
	}{{-118.625, 0xC276A000}, {1, 0x41100000}, {0, 0}, {0.5, 0x40800000}} {
		if got := IBM(c.v); got != c.want {
			t.Errorf("IBM(%v) = %#08x, want %#08x", c.v, got, c.want)
		}
	}
}

// TestLayout checks a few bytes of Base3D at the positions of SEG-Y rev 1
// tables 2 and 3, and the EBCDIC of the textual header (code page 037:
// 'C' = 0xC3, '1' = 0xF1, blank = 0x40).
func TestLayout(t *testing.T) {
	b := Base3D().Bytes()
	if len(b) != BaseSize {
		t.Fatalf("%d bytes, want %d", len(b), BaseSize)
	}
	if !bytes.Equal(b[:4], []byte{0xC3, 0x40, 0xF1, 0x40}) {
		t.Errorf("text starts % x", b[:4])
	}
	be := binary.BigEndian
	if be.Uint16(b[3216:]) != 4000 || be.Uint16(b[3220:]) != 8 || be.Uint16(b[3224:]) != 5 {
		t.Errorf("binary header interval/samples/format % x", b[3216:3226])
	}
	tr := b[3600+BaseTraceSize*5:]
	if be.Uint32(tr[188:]) != 2 || be.Uint32(tr[192:]) != 11 || be.Uint16(tr[114:]) != 8 {
		t.Errorf("trace 5 inline/crossline/samples % x / % x", tr[188:196], tr[114:116])
	}
}

// TestCasesDistinct guards the suite itself: unique names (they become
// file names) and every expectation complete.
func TestCasesDistinct(t *testing.T) {
	seen := map[string]bool{}
	dir := t.TempDir()
	for _, c := range Malformed() {
		if seen[c.Name] {
			t.Errorf("duplicate case %q", c.Name)
		}
		seen[c.Name] = true
		if c.Expect.Err != "" && c.Expect.Warning != "" {
			t.Errorf("%s: both an error and a warning expected", c.Name)
		}
		if _, err := c.Create(dir); err != nil {
			t.Errorf("%s: %v", c.Name, err)
		}
	}
}
