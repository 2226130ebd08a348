package viewer

import (
	"slices"

	"quadtrace/app/volume"
)

// The user's place: the picked trace (by its inline and crossline numbers,
// so it survives a change of view) and the history of views for Back and
// Forward.

// pickKeys are the inline and crossline numbers of a picked trace.
type pickKeys struct{ inline, crossline int }

// pickedKeys returns the numbers of the trace picked in the shown data.
func (v *viewer) pickedKeys() (pickKeys, bool) {
	d, i := v.data.amp, v.state.PickTrace
	if d == nil || i < 0 || len(d.Traces) == 0 {
		return pickKeys{}, false
	}
	switch d.Slice.Orientation {
	case volume.TimeSlice:
		n := len(d.Traces[0])
		if n == 0 {
			return pickKeys{}, false
		}
		row, col := i/n, i%n
		if row >= len(d.InlineKeys) || col >= len(d.Keys) {
			return pickKeys{}, false
		}
		return pickKeys{d.InlineKeys[row], d.Keys[col]}, true
	case volume.Crossline:
		if i >= len(d.Keys) {
			return pickKeys{}, false
		}
		return pickKeys{d.Keys[i], d.Slice.Number}, true
	default:
		if i >= len(d.Keys) {
			return pickKeys{}, false
		}
		return pickKeys{d.Slice.Number, d.Keys[i]}, true
	}
}

// pickIn is the pick index of the trace with numbers k in section s (-1
// when s does not hold it).
func pickIn(s *volume.Section, k pickKeys) int {
	if s == nil || len(s.Traces) == 0 {
		return -1
	}
	switch s.Slice.Orientation {
	case volume.TimeSlice:
		row, col := slices.Index(s.InlineKeys, k.inline), slices.Index(s.Keys, k.crossline)
		if row < 0 || col < 0 {
			return -1
		}
		return row*len(s.Traces[0]) + col
	case volume.Crossline:
		if s.Slice.Number != k.crossline {
			return -1
		}
		return slices.Index(s.Keys, k.inline)
	default:
		if s.Slice.Number != k.inline {
			return -1
		}
		return slices.Index(s.Keys, k.crossline)
	}
}

// placePick sets the pick in newly shown data: the trace asked for by a
// change of view when the data hold it, else the trace picked before when
// it is still there, else the middle trace.
func (v *viewer) placePick(before pickKeys, hadPick bool) {
	n, m := v.dims()
	if v.wantPick != nil {
		if i := pickIn(v.data.amp, *v.wantPick); i >= 0 {
			v.state.PickTrace = i
			v.wantPick = nil
			return
		}
		v.wantPick = nil
	}
	if hadPick {
		if i := pickIn(v.data.amp, before); i >= 0 {
			v.state.PickTrace = i
			return
		}
		// Paging to the next line keeps the pick's place along the line.
		if v.state.PickTrace >= 0 && v.state.PickTrace < n*max(m, 1) && v.data.amp.Slice.Orientation != volume.TimeSlice && v.state.PickTrace < n {
			return
		}
	}
	v.state.PickTrace = n / 2
	if v.state.Orientation == volume.TimeSlice {
		v.state.PickTrace = m/2*n + n/2
	}
}

// historyEntry is one view of the Back/Forward history.
type historyEntry struct {
	state  viewState // its data fields
	pick   pickKeys
	picked bool
	id     string // the keys of its sections: equal ids are the same view
}

// viewID identifies the view of state st.
func viewID(st *viewState) string {
	r := dataRequestFor(st)
	return r.baseKey + "|" + r.overKey
}

// recordView notes the view just shown in the history: moving onto a
// neighbour entry when it is that view (Back and Forward land there),
// otherwise dropping the forward entries and adding it.
func (v *viewer) recordView() {
	id := viewID(&v.state)
	k, ok := v.pickedKeys()
	e := historyEntry{state: v.state.dataFields(), pick: k, picked: ok, id: id}
	h := v.history
	pending := v.histPending
	v.histPending = -1
	switch {
	case pending >= 0 && pending < len(h) && h[pending].id == id:
		v.histPos = pending
		h[pending] = e
		return
	case v.histPos < len(h) && h[v.histPos].id == id:
		h[v.histPos] = e
		return
	case v.histPos > 0 && v.histPos-1 < len(h) && h[v.histPos-1].id == id:
		v.histPos--
		h[v.histPos] = e
		return
	case v.histPos+1 < len(h) && h[v.histPos+1].id == id:
		v.histPos++
		h[v.histPos] = e
		return
	}
	if len(h) > 0 {
		h = h[:v.histPos+1]
	}
	h = append(h, e)
	if len(h) > maxHistory {
		h = h[len(h)-maxHistory:]
	}
	v.history, v.histPos = h, len(h)-1
}

// maxHistory is the number of views Back can return to.
const maxHistory = 100

// goHistory shows the view step entries back (negative) or forward in the
// history, with its pick; it reports whether there was one. Steps taken
// before the data of the last one arrive count from it (histPending).
func (v *viewer) goHistory(step int) bool {
	from := v.histPos
	if v.histPending >= 0 {
		from = v.histPending // a step whose data are still coming
	}
	to := from + step
	if v.vol == nil || to < 0 || to >= len(v.history) {
		return false
	}
	v.histPending = to
	e := v.history[to]
	v.state.restoreDataFields(e.state)
	if e.picked {
		p := e.pick
		v.wantPick = &p
	}
	v.state.PickTrace = -1
	v.refreshControls()
	v.requestData()
	return true
}
