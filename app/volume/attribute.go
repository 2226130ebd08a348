package volume

import (
	"context"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"

	"quadtrace/app/outfile"
	"quadtrace/compute"
)

// MemoryCacheBytes is the largest whole-volume attribute cache kept in
// memory; a larger one goes to a temporary file that is removed on Close.
const MemoryCacheBytes = 1 << 30

// blockTraces is how many traces one compute call gets when a whole volume
// is computed: enough to keep every core busy, few enough to stay small.
const blockTraces = 2048

// Attribute returns attribute a (with parameters p, after conditioning cond)
// on slice s. Inline and crossline sections are computed directly from
// their traces. A time slice needs the attribute on every trace: the first
// request computes the whole volume (reporting progress per inline and
// honouring ctx), keeps it (memory when it fits, else a temporary file),
// and later time slices of the same attribute are read from that cache.
func (v *Volume) Attribute(ctx context.Context, s Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning, progress func(done, total int)) (Section, error) {
	if s.Orientation != TimeSlice {
		sec, err := v.Read(ctx, s)
		if err != nil {
			return Section{}, err
		}
		return v.apply(ctx, sec, a, p, cond, progress)
	}
	if s.Number < 0 || s.Number >= v.info.Samples {
		return Section{}, fmt.Errorf("%s: sample %d is outside 0 to %d", v.name, s.Number, v.info.Samples-1)
	}
	if a.ID == "amplitude" && cond == (compute.Conditioning{}) {
		return v.Read(ctx, s)
	}
	cache, err := v.attributeVolume(ctx, a, p, cond, v.offset(s.Offset), progress)
	if err != nil {
		return Section{}, err
	}
	grid, err := cache.slice(s.Number)
	if err != nil {
		return Section{}, err
	}
	dt, t0 := v.sampling()
	return Section{
		Section: compute.Section{Traces: grid, DT: dt, T0: t0}, Slice: s,
		Keys: Numbers(v.info.Crossline), InlineKeys: Numbers(v.info.Inline), MapAspect: v.mapAspect(),
	}, nil
}

// apply conditions and computes one section, keeping its axes.
func (v *Volume) apply(ctx context.Context, sec Section, a *compute.Attribute, p compute.Params, cond compute.Conditioning, progress func(done, total int)) (Section, error) {
	in := sec.Section
	var err error
	if cond != (compute.Conditioning{}) {
		if in, err = cond.Apply(ctx, in, nil); err != nil {
			return Section{}, err
		}
	}
	out, err := a.Compute(ctx, in, p, progress)
	if err != nil {
		return Section{}, fmt.Errorf("%s: %s %d: %s: %w", v.name, sec.Slice.Orientation, sec.Slice.Number, a.ID, err)
	}
	sec.Section = out
	return sec, nil
}

// TraceAttribute returns attribute a on the single trace at (inline,
// crossline, offset), for the trace panel.
func (v *Volume) TraceAttribute(ctx context.Context, inline, crossline, offset int, a *compute.Attribute, p compute.Params, cond compute.Conditioning) ([]float32, error) {
	tr, err := v.Trace(inline, crossline, offset)
	if err != nil {
		return nil, err
	}
	dt, t0 := v.sampling()
	sec := Section{Section: compute.Section{Traces: [][]float32{tr}, DT: dt, T0: t0}, Slice: Slice{Orientation: Inline, Number: inline, Offset: offset}}
	out, err := v.apply(ctx, sec, a, p, cond, nil)
	if err != nil {
		return nil, err
	}
	return out.Traces[0], nil
}

// attributeVolume returns the cached whole-volume attribute, computing it
// on first use.
func (v *Volume) attributeVolume(ctx context.Context, a *compute.Attribute, p compute.Params, cond compute.Conditioning, offset int, progress func(done, total int)) (*attributeVolume, error) {
	key := fmt.Sprintf("%s|%v|%s|%d", a.ID, p, cond.String(), offset)
	v.mu.Lock()
	c := v.cache[key]
	v.mu.Unlock()
	if c != nil {
		return c, nil
	}
	c, err := v.computeVolume(ctx, a, p, cond, offset, progress)
	if err != nil {
		return nil, err
	}
	v.mu.Lock()
	if old := v.cache[key]; old != nil {
		// Another request finished the same volume first: keep one.
		v.mu.Unlock()
		c.release()
		return old, nil
	}
	v.cache[key] = c
	v.mu.Unlock()
	return c, nil
}

// computeVolume computes a on every trace, inline by inline in blocks of
// about blockTraces traces.
func (v *Volume) computeVolume(ctx context.Context, a *compute.Attribute, p compute.Params, cond compute.Conditioning, offset int, progress func(done, total int)) (*attributeVolume, error) {
	inlines := Numbers(v.info.Inline)
	nx := v.info.Crossline.Count
	c, err := newAttributeVolume(len(inlines), nx, v.info.Samples)
	if err != nil {
		return nil, err
	}
	perBlock := max(1, blockTraces/max(1, nx))
	for first := 0; first < len(inlines); first += perBlock {
		last := min(len(inlines), first+perBlock)
		var block Section
		for _, il := range inlines[first:last] {
			sec, err := v.Read(ctx, Slice{Orientation: Inline, Number: il, Offset: offset})
			if err != nil {
				c.release()
				return nil, err
			}
			block.Section.Traces = append(block.Section.Traces, sec.Traces...)
			block.Section.DT, block.Section.T0, block.Slice = sec.DT, sec.T0, sec.Slice
		}
		out, err := v.apply(ctx, block, a, p, cond, nil)
		if err != nil {
			c.release()
			return nil, err
		}
		if err := c.put(first*nx, out.Traces); err != nil {
			c.release()
			return nil, err
		}
		if progress != nil {
			progress(last, len(inlines))
		}
	}
	return c, nil
}

// attributeVolume holds an attribute on every trace of a regular grid,
// trace (i, j) at slot i*nx+j, either in memory or in a temporary file of
// little-endian float32 samples.
type attributeVolume struct {
	ninl, nx, ns int
	mem          []float32
	file         *os.File
}

func newAttributeVolume(ninl, nx, ns int) (*attributeVolume, error) {
	c := &attributeVolume{ninl: ninl, nx: nx, ns: ns}
	size := int64(ninl) * int64(nx) * int64(ns) * 4
	if size <= MemoryCacheBytes {
		c.mem = make([]float32, ninl*nx*ns)
		return c, nil
	}
	// a scratch file no crash leaves behind (unnamed where the system allows)
	f, err := outfile.Scratch("quadtrace-attribute-*.f32")
	if err != nil {
		return nil, fmt.Errorf("attribute cache of %d bytes: %w", size, err)
	}
	c.file = f
	return c, nil
}

// put stores consecutive traces starting at slot first.
func (c *attributeVolume) put(first int, traces [][]float32) error {
	if c.mem != nil {
		for k, tr := range traces {
			copy(c.mem[(first+k)*c.ns:(first+k+1)*c.ns], tr)
		}
		return nil
	}
	buf := make([]byte, 4*c.ns*len(traces))
	for k, tr := range traces {
		for s, x := range tr {
			binary.LittleEndian.PutUint32(buf[4*(k*c.ns+s):], math.Float32bits(x))
		}
	}
	if _, err := c.file.WriteAt(buf, int64(first)*int64(c.ns)*4); err != nil {
		return fmt.Errorf("attribute cache %s: %w", c.file.Name(), err)
	}
	return nil
}

// slice returns the values at one sample, [inline index][crossline index].
func (c *attributeVolume) slice(sample int) ([][]float32, error) {
	grid := make([][]float32, c.ninl)
	var b [4]byte
	for i := range grid {
		row := make([]float32, c.nx)
		for j := range row {
			slot := i*c.nx + j
			if c.mem != nil {
				row[j] = c.mem[slot*c.ns+sample]
				continue
			}
			if _, err := c.file.ReadAt(b[:], (int64(slot)*int64(c.ns)+int64(sample))*4); err != nil && err != io.EOF {
				return nil, fmt.Errorf("attribute cache %s: %w", c.file.Name(), err)
			}
			row[j] = math.Float32frombits(binary.LittleEndian.Uint32(b[:]))
		}
		grid[i] = row
	}
	return grid, nil
}

func (c *attributeVolume) release() {
	c.mem = nil
	if c.file != nil {
		name := c.file.Name()
		c.file.Close()
		os.Remove(name)
		c.file = nil
	}
}
