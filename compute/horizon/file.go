package horizon

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Header is the first line of a horizon file: the names of its columns,
// separated by single spaces.
const Header = "inline crossline x y time_ms quality origin"

// Pick is one row of a horizon file.
type Pick struct {
	Inline, Crossline int     // line numbers as in the survey
	X, Y              float64 // projected coordinates of the bin centre, metres
	TimeMS            float64 // two-way time, ms
	Quality           float64 // correlation with the neighbour tracked from, -1..1 (1 at seeds)
	Seed              bool    // origin column: "seed" or "tracked"
	// Line is the line of the file the pick was read from (0 when not read).
	Line int
}

// Write writes a horizon file: the Header line, then one line per pick,
// columns separated by single spaces: inline and crossline as integers,
// x and y to 0.01 m, time to 0.001 ms, quality to 0.0001, origin. It
// refuses picks with values that Read would refuse, writing nothing.
func Write(w io.Writer, picks []Pick) error {
	for i, p := range picks {
		if err := p.check(); err != nil {
			return fmt.Errorf("horizon pick %d (inline %d crossline %d): %w", i+1, p.Inline, p.Crossline, err)
		}
	}
	bw := bufio.NewWriter(w)
	bw.WriteString(Header + "\n")
	buf := make([]byte, 0, 96)
	for _, p := range picks {
		buf = strconv.AppendInt(buf[:0], int64(p.Inline), 10)
		buf = append(buf, ' ')
		buf = strconv.AppendInt(buf, int64(p.Crossline), 10)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, p.X, 'f', 2, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, p.Y, 'f', 2, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, p.TimeMS, 'f', 3, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, p.Quality, 'f', 4, 64)
		if p.Seed {
			buf = append(buf, " seed\n"...)
		} else {
			buf = append(buf, " tracked\n"...)
		}
		if _, err := bw.Write(buf); err != nil {
			return fmt.Errorf("writing horizon: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing horizon: %w", err)
	}
	return nil
}

// check refuses values a horizon file cannot hold.
func (p Pick) check() error {
	for _, v := range []struct {
		name string
		x    float64
	}{{"x", p.X}, {"y", p.Y}, {"time_ms", p.TimeMS}, {"quality", p.Quality}} {
		if math.IsNaN(v.x) || math.IsInf(v.x, 0) {
			return fmt.Errorf("%s %v is not a finite number", v.name, v.x)
		}
	}
	if p.Quality < -1 || p.Quality > 1 {
		return fmt.Errorf("quality %v is outside -1..1", p.Quality)
	}
	return nil
}

// maxLine is the longest line Read accepts.
const maxLine = 4096

// Read reads a horizon file written by Write (or by hand, or by another
// program: columns may be separated by any run of spaces or tabs, lines may
// end in CRLF, and blank lines are skipped). The first non-blank line must
// be the Header. A malformed file gives a one-line error that names the
// line, the column and what was wrong, e.g.
//
//	line 7: column 5 (time_ms): "12,5" is not a number
//
// A second pick for the same inline and crossline is an error naming both
// lines.
func Read(r io.Reader) ([]Pick, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 0, 4096), maxLine)
	columns := strings.Fields(Header)
	var picks []Pick
	seen := map[[2]int]int{}
	line, header := 0, false
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if text == "" {
			continue
		}
		fields := strings.Fields(text)
		if !header {
			if strings.Join(fields, " ") != Header {
				return nil, fmt.Errorf("line %d: %q is not the horizon header %q", line, clip(text), Header)
			}
			header = true
			continue
		}
		if len(fields) != len(columns) {
			return nil, fmt.Errorf("line %d: %d columns, want %d (%s)", line, len(fields), len(columns), Header)
		}
		bad := func(col int, why string) error {
			return fmt.Errorf("line %d: column %d (%s): %q %s", line, col+1, columns[col], clip(fields[col]), why)
		}
		p := Pick{Line: line}
		ints := []*int{&p.Inline, &p.Crossline}
		for c, dst := range ints {
			v, err := strconv.Atoi(fields[c])
			if err != nil {
				return nil, bad(c, "is not a whole number")
			}
			*dst = v
		}
		floats := []*float64{&p.X, &p.Y, &p.TimeMS, &p.Quality}
		for i, dst := range floats {
			c := i + len(ints)
			v, err := strconv.ParseFloat(fields[c], 64)
			switch {
			case err != nil && !errors.Is(err, strconv.ErrRange):
				return nil, bad(c, "is not a number")
			case err != nil || math.IsNaN(v) || math.IsInf(v, 0):
				return nil, bad(c, "is not a finite number")
			}
			*dst = v
		}
		if p.Quality < -1 || p.Quality > 1 {
			return nil, bad(5, "is outside -1..1")
		}
		switch fields[6] {
		case "seed":
			p.Seed = true
		case "tracked":
		default:
			return nil, bad(6, `is neither "seed" nor "tracked"`)
		}
		key := [2]int{p.Inline, p.Crossline}
		if first, ok := seen[key]; ok {
			return nil, fmt.Errorf("line %d: inline %d crossline %d again (first on line %d)", line, p.Inline, p.Crossline, first)
		}
		seen[key] = line
		picks = append(picks, p)
	}
	if err := sc.Err(); err != nil {
		if errors.Is(err, bufio.ErrTooLong) {
			return nil, fmt.Errorf("line %d: longer than %d bytes", line+1, maxLine)
		}
		return nil, fmt.Errorf("line %d: %w", line+1, err)
	}
	if !header {
		return nil, fmt.Errorf("line %d: no header (want %q)", line+1, Header)
	}
	return picks, nil
}

// clip shortens a quoted piece of a bad line for an error message.
func clip(s string) string {
	if len(s) > 40 {
		return s[:40] + "..."
	}
	return s
}

// Layout numbers and places the traces of a grid: grid index (il, xl) is
// inline FirstInline + il*InlineStep and crossline FirstCrossline +
// xl*CrosslineStep.
type Layout struct {
	Inlines, Crosslines           int
	FirstInline, InlineStep       int
	FirstCrossline, CrosslineStep int
	// XY returns the projected coordinates of the bin centre at grid index
	// (il, xl); nil gives zeros.
	XY func(il, xl int) (x, y float64)
}

// Picks returns the picked traces of h in grid order (inline-major), as
// rows for Write.
func (h *Horizon) Picks(l Layout) []Pick {
	var out []Pick
	for k, s := range h.State {
		if s == Empty {
			continue
		}
		il, xl := k/h.Crosslines, k%h.Crosslines
		p := Pick{
			Inline: l.FirstInline + il*l.InlineStep, Crossline: l.FirstCrossline + xl*l.CrosslineStep,
			TimeMS: h.TimeMS[k], Quality: float64(h.Quality[k]), Seed: s == Seeded,
		}
		if l.XY != nil {
			p.X, p.Y = l.XY(il, xl)
		}
		out = append(out, p)
	}
	return out
}

// FromPicks places picks on the grid of l. A pick whose inline or crossline
// is not on the grid is an error naming its line (or its position in
// picks when it was not read from a file); so is a second pick for the
// same trace.
func FromPicks(l Layout, picks []Pick) (*Horizon, error) {
	if l.Inlines < 1 || l.Crosslines < 1 || l.InlineStep == 0 || l.CrosslineStep == 0 {
		return nil, fmt.Errorf("horizon: layout of %d x %d traces, steps %d and %d: not a grid", l.Inlines, l.Crosslines, l.InlineStep, l.CrosslineStep)
	}
	h := New(l.Inlines, l.Crosslines)
	where := func(i int, p Pick) string {
		if p.Line > 0 {
			return fmt.Sprintf("line %d", p.Line)
		}
		return fmt.Sprintf("pick %d", i+1)
	}
	for i, p := range picks {
		if err := p.check(); err != nil {
			return nil, fmt.Errorf("%s: %w", where(i, p), err)
		}
		di, dx := p.Inline-l.FirstInline, p.Crossline-l.FirstCrossline
		il, xl := di/l.InlineStep, dx/l.CrosslineStep
		if di%l.InlineStep != 0 || dx%l.CrosslineStep != 0 || il < 0 || il >= l.Inlines || xl < 0 || xl >= l.Crosslines {
			return nil, fmt.Errorf("%s: inline %d crossline %d is not on the survey's grid (inlines %d to %d, crosslines %d to %d)",
				where(i, p), p.Inline, p.Crossline, l.FirstInline, l.FirstInline+(l.Inlines-1)*l.InlineStep,
				l.FirstCrossline, l.FirstCrossline+(l.Crosslines-1)*l.CrosslineStep)
		}
		k := il*l.Crosslines + xl
		if h.State[k] != Empty {
			return nil, fmt.Errorf("%s: inline %d crossline %d picked twice", where(i, p), p.Inline, p.Crossline)
		}
		s := Tracked
		if p.Seed {
			s = Seeded
		}
		h.set(k, p.TimeMS, float32(p.Quality), s)
	}
	return h, nil
}

// MapHeader is the first line of a map file written by WriteMap.
const MapHeader = "inline crossline x y value"

// WriteMap writes a map as text: the MapHeader line, then one line per
// trace with a value (NaN traces are left out), in grid order: inline and
// crossline numbers, x and y to 0.01 m, the value with 7 significant
// digits (a float32 keeps about that many).
func WriteMap(w io.Writer, m *AttributeMap, l Layout) error {
	if m == nil || m.Inlines != l.Inlines || m.Crosslines != l.Crosslines || len(m.Values) != m.Inlines*m.Crosslines {
		return fmt.Errorf("writing map: the map's grid does not match the layout's %d x %d traces", l.Inlines, l.Crosslines)
	}
	bw := bufio.NewWriter(w)
	bw.WriteString(MapHeader + "\n")
	buf := make([]byte, 0, 96)
	for k, v := range m.Values {
		if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
			continue
		}
		il, xl := k/m.Crosslines, k%m.Crosslines
		var x, y float64
		if l.XY != nil {
			x, y = l.XY(il, xl)
		}
		buf = strconv.AppendInt(buf[:0], int64(l.FirstInline+il*l.InlineStep), 10)
		buf = append(buf, ' ')
		buf = strconv.AppendInt(buf, int64(l.FirstCrossline+xl*l.CrosslineStep), 10)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, x, 'f', 2, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, y, 'f', 2, 64)
		buf = append(buf, ' ')
		buf = strconv.AppendFloat(buf, float64(v), 'g', 7, 32)
		buf = append(buf, '\n')
		if _, err := bw.Write(buf); err != nil {
			return fmt.Errorf("writing map: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing map: %w", err)
	}
	return nil
}
