package segy

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/gob"
	"errors"
	"fmt"
)

// A saved index (Checked.Index) is the exact geometry index of one file
// version, for OpenFast to use instead of reading every trace header:
//
//	"QTGEOIDX" | uint64 n | gob(savedIndex without Grid), n bytes |
//	grid as little-endian int32, 4 bytes per cell | SHA-256 of everything before
//
// The grid (one entry per inline x crossline x offset cell, millions for a
// large survey) is kept out of gob: gob's variable-length integers cost
// tens of milliseconds to decode for a 2 GB file's 640 000 cells, the flat
// array about one.
//
// It is used only when the checksum holds and it matches the file being
// opened: the caller's stamp, the file size, the options, the bytes before
// the first trace (textual and binary headers), and the raw headers of
// savedProbes traces spread through the file. Anything else makes OpenFast
// ignore it and sample the file as if there were none.
const savedMagic = "QTGEOIDX"

// savedVersion changes whenever savedIndex or the geometry decision does,
// so entries written by another version are ignored.
const savedVersion = 2

// savedProbes is how many trace headers (first, last and spread between)
// a saved index records and checks against the file.
const savedProbes = 64

type savedIndex struct {
	Version  int
	Stamp    string
	Size     int64
	Options  Options
	Head     [32]byte // SHA-256 of the bytes before the first trace
	Probes   []int
	ProbeSum [32]byte // SHA-256 of the probes' header blocks, in order
	Info     Info
	ILR, XLR Range
	Offsets  []int
	Grid     []int32 // written after the gob part, not in it: see savedMagic
}

// probeTraces lists the traces a saved index checks.
func probeTraces(n int) []int {
	if n <= 0 {
		return nil
	}
	k := min(n, savedProbes)
	out := make([]int, 0, k+1)
	for j := 0; j < k; j++ {
		out = append(out, int(int64(j)*int64(n)/int64(k)))
	}
	if out[len(out)-1] != n-1 {
		out = append(out, n-1)
	}
	return out
}

// fingerprint hashes the bytes before the first trace and the header
// blocks of the probe traces.
func (f *File) fingerprint(probes []int) (head, sum [32]byte, err error) {
	b, err := f.bytesAt(0, int(f.dataStart), nil)
	if err != nil {
		return head, sum, f.errf(-1, 1, "reading headers: %v", err)
	}
	head = sha256.Sum256(b)
	got, err := f.readHeaders(probes) // many reads in flight (cold cache)
	if err != nil {
		return head, sum, err
	}
	h := sha256.New()
	for _, i := range probes {
		r, ok := got[i]
		if !ok {
			return head, sum, fmt.Errorf("probe trace %d outside 0..%d", i, f.ntraces-1)
		}
		h.Write(r)
	}
	copy(sum[:], h.Sum(nil))
	return head, sum, nil
}

// saveIndex encodes the file's exact index (see savedMagic).
func (f *File) saveIndex() ([]byte, error) {
	if !f.exact {
		return nil, errors.New("segy: only an exact index is saved")
	}
	s := savedIndex{Version: savedVersion, Stamp: f.stamp, Size: f.fileSize, Options: f.opt, Info: f.info,
		ILR: f.geo.ilR, XLR: f.geo.xlR, Offsets: f.geo.offsets, Grid: f.geo.grid, Probes: probeTraces(f.ntraces)}
	var err error
	if s.Head, s.ProbeSum, err = f.fingerprint(s.Probes); err != nil {
		return nil, err
	}
	b, err := encodeSaved(s)
	if err != nil {
		return nil, fmt.Errorf("%s: encoding the geometry index: %w", f.path, err)
	}
	return b, nil
}

// encodeSaved frames a saved index as savedMagic describes.
func encodeSaved(s savedIndex) ([]byte, error) {
	var meta bytes.Buffer
	grid := s.Grid
	s.Grid = nil // gob leaves a nil slice out
	if err := gob.NewEncoder(&meta).Encode(&s); err != nil {
		return nil, err
	}
	b := make([]byte, 0, len(savedMagic)+8+meta.Len()+4*len(grid)+sha256.Size)
	b = append(b, savedMagic...)
	b = binary.LittleEndian.AppendUint64(b, uint64(meta.Len()))
	b = append(b, meta.Bytes()...)
	for _, t := range grid {
		b = binary.LittleEndian.AppendUint32(b, uint32(t))
	}
	sum := sha256.Sum256(b)
	return append(b, sum[:]...), nil
}

// useSaved installs a saved index when it matches the file (see
// savedMagic) and reports whether it did; a mismatch or damage leaves the
// file as it was.
func (f *File) useSaved(data []byte) bool {
	s, ok := decodeSaved(data)
	if !ok || s.Stamp != f.stamp || s.Size != f.fileSize || s.Options != f.opt ||
		s.Info.Traces != f.ntraces || s.Info.Samples != f.samples || !slices64Equal(s.Probes, probeTraces(f.ntraces)) {
		return false
	}
	head, sum, err := f.fingerprint(s.Probes)
	if err != nil || head != s.Head || sum != s.ProbeSum {
		return false
	}
	if !plausibleGrid(s, f.ntraces) {
		return false
	}
	f.info = s.Info
	if f.info.Warnings == nil {
		f.info.Warnings = []string{} // gob drops empty slices
	}
	f.geo = geometry{ilR: s.ILR, xlR: s.XLR, offsets: s.Offsets, grid: s.Grid}
	f.info.Offsets = s.Offsets
	return true
}

func slices64Equal(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// decodeSaved checks the frame and checksum and decodes the entry.
func decodeSaved(data []byte) (savedIndex, bool) {
	var s savedIndex
	if len(data) < len(savedMagic)+sha256.Size || string(data[:len(savedMagic)]) != savedMagic {
		return s, false
	}
	body, tail := data[:len(data)-sha256.Size], data[len(data)-sha256.Size:]
	if sum := sha256.Sum256(body); !bytes.Equal(sum[:], tail) {
		return s, false
	}
	body = body[len(savedMagic):]
	if len(body) < 8 {
		return s, false
	}
	n := binary.LittleEndian.Uint64(body)
	body = body[8:]
	if n > uint64(len(body)) || (uint64(len(body))-n)%4 != 0 {
		return s, false
	}
	if err := gob.NewDecoder(bytes.NewReader(body[:n])).Decode(&s); err != nil || s.Version != savedVersion {
		return savedIndex{}, false
	}
	raw := body[n:]
	s.Grid = make([]int32, len(raw)/4)
	for i := range s.Grid {
		s.Grid[i] = int32(binary.LittleEndian.Uint32(raw[4*i:]))
	}
	return s, true
}

// plausibleGrid checks that a decoded index can be used without a read
// out of range: the grid's size matches its ranges and every entry is a
// trace of the file or -1.
func plausibleGrid(s savedIndex, n int) bool {
	if s.ILR.Count <= 0 || s.XLR.Count <= 0 || s.ILR.Step <= 0 || s.XLR.Step <= 0 {
		return false
	}
	if !fitsGrid(s.ILR, s.XLR, gridLimit(n)) {
		return false
	}
	cells := int64(s.ILR.Count) * int64(s.XLR.Count) * int64(max(1, len(s.Offsets)))
	if cells != int64(len(s.Grid)) || cells > int64(gridLimit(n)) {
		return false
	}
	for _, t := range s.Grid {
		if t < -1 || int(t) >= n {
			return false
		}
	}
	if s.Info.Inline != s.ILR || s.Info.Crossline != s.XLR {
		return false
	}
	return true
}
