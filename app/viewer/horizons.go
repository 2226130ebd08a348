package viewer

import (
	"fmt"
	"image/color"

	"quadtrace/compute/horizon"
)

// namedHorizon is one horizon of the window: a surface on the survey's grid
// with the name and colour the user gave it. H is replaced, never changed in
// place, once the horizon is shown (a tracking or an erase makes a new
// *horizon.Horizon), so background jobs and other panels (the map view) may
// read the H they were handed without locks.
//
// All fields belong to the UI goroutine.
type namedHorizon struct {
	Name   string
	Colour color.NRGBA
	H      *horizon.Horizon // nil until something is tracked or loaded
	// picked is H.Picked(), counted by the job that made H (the UI
	// goroutine does not count).
	picked int
	// Hidden keeps the horizon off the sections (it stays in the list).
	Hidden bool

	// seeds are the seed points placed since the last tracking: the next
	// tracking grows from them (horizonedit.go).
	seeds []horizon.Seed
	// undo holds the states before the last trackings and erases, oldest
	// first, at most maxUndo of them.
	undo []horizonState
}

// horizonState is what an undo brings back: the surface and the seeds
// waiting to be tracked.
type horizonState struct {
	h      *horizon.Horizon
	picked int
	seeds  []horizon.Seed
	what   string // the edit it undoes: "tracking", "erase"
}

// maxUndo is how many edits of one horizon can be undone.
const maxUndo = 16

// replace makes h, with picked traces picked, the horizon's surface after
// an edit called what, keeping the state before it for undo, and sets the
// waiting seeds.
func (n *namedHorizon) replace(h *horizon.Horizon, picked int, seeds []horizon.Seed, what string) {
	n.undo = append(n.undo, horizonState{h: n.H, picked: n.picked, seeds: n.seeds, what: what})
	if len(n.undo) > maxUndo {
		n.undo = append(n.undo[:0:0], n.undo[len(n.undo)-maxUndo:]...)
	}
	n.H, n.picked, n.seeds = h, picked, seeds
}

// undoLast brings back the state before the last edit and says which edit
// it undid ("" when there was none).
func (n *namedHorizon) undoLast() string {
	if len(n.undo) == 0 {
		return ""
	}
	last := n.undo[len(n.undo)-1]
	n.undo = n.undo[:len(n.undo)-1]
	n.H, n.picked, n.seeds = last.h, last.picked, last.seeds
	return last.what
}

// horizonList is the window's horizons, in the order the user added them,
// with the one being edited (seeded, tracked, erased). It belongs to the UI
// goroutine: every change is made there and announced by calling the
// callbacks of changed, also on the UI goroutine, so other panels (the map
// view) redraw from the list.
type horizonList struct {
	items  []*namedHorizon
	active int // index into items; -1 when items is empty
	// changed are called, in order, after every change of the list, of a
	// horizon's name, colour, visibility or surface, or of the active one.
	changed []func()
	// version counts the changes (notify calls).
	version int
}

// onChange registers f to be called on the UI goroutine after every change
// of the list.
func (l *horizonList) onChange(f func()) { l.changed = append(l.changed, f) }

// notify calls the changed callbacks; the caller is on the UI goroutine.
func (l *horizonList) notify() {
	l.version++
	for _, f := range l.changed {
		f()
	}
}

// all returns the horizons in list order (the slice is a copy; the entries
// are shared).
func (l *horizonList) all() []*namedHorizon { return append([]*namedHorizon(nil), l.items...) }

// current returns the active horizon, or nil when there is none.
func (l *horizonList) current() *namedHorizon {
	if l.active < 0 || l.active >= len(l.items) {
		return nil
	}
	return l.items[l.active]
}

// horizonColours are the colours offered to new horizons in turn: strong,
// well-separated hues that stand out on grey and on colour palettes (green
// first: it is in none of the default palettes, and the picked trace's line
// is yellow).
var horizonColours = [...]color.NRGBA{
	{R: 0x40, G: 0xff, B: 0x40, A: 0xff}, // green
	{R: 0xff, G: 0x30, B: 0xc0, A: 0xff}, // magenta
	{R: 0x00, G: 0xe0, B: 0xff, A: 0xff}, // cyan
	{R: 0xff, G: 0xd0, B: 0x00, A: 0xff}, // yellow
	{R: 0xff, G: 0x80, B: 0x20, A: 0xff}, // orange
	{R: 0x90, G: 0x60, B: 0xff, A: 0xff}, // violet
}

// add appends a new, empty horizon with a fresh name and the next colour,
// makes it the active one and announces the change.
func (l *horizonList) add() *namedHorizon { return l.addSurface(l.freshName(), nil, 0) }

// addSurface appends a horizon called name (a fresh name when another
// horizon has it) with surface h (may be nil; picked traces picked) in the
// next colour, makes it the active one and announces the change.
func (l *horizonList) addSurface(name string, h *horizon.Horizon, picked int) *namedHorizon {
	if name == "" || l.named(name) {
		name = l.freshName()
	}
	n := &namedHorizon{Name: name, Colour: horizonColours[len(l.items)%len(horizonColours)], H: h, picked: picked}
	l.items = append(l.items, n)
	l.active = len(l.items) - 1
	l.notify()
	return n
}

// freshName returns "Horizon N" for the smallest N no horizon is named.
func (l *horizonList) freshName() string {
	for n := len(l.items) + 1; ; n++ {
		name := fmt.Sprintf("Horizon %d", n)
		if !l.named(name) {
			return name
		}
	}
}

// named reports whether a horizon is called name.
func (l *horizonList) named(name string) bool {
	for _, h := range l.items {
		if h.Name == name {
			return true
		}
	}
	return false
}

// clear removes every horizon (a new survey has another grid).
func (l *horizonList) clear() {
	if len(l.items) == 0 {
		return
	}
	l.items, l.active = nil, -1
	l.notify()
}

// remove deletes horizon h from the list; the active horizon becomes its
// neighbour. Removing a horizon not in the list does nothing.
func (l *horizonList) remove(h *namedHorizon) {
	i := l.index(h)
	if i < 0 {
		return
	}
	l.items = append(l.items[:i:i], l.items[i+1:]...)
	if l.active >= len(l.items) {
		l.active = len(l.items) - 1
	}
	l.notify()
}

// index returns the position of h in the list, or -1.
func (l *horizonList) index(h *namedHorizon) int {
	for i, x := range l.items {
		if x == h {
			return i
		}
	}
	return -1
}

// setActive makes h the horizon being edited.
func (l *horizonList) setActive(h *namedHorizon) {
	if i := l.index(h); i >= 0 && i != l.active {
		l.active = i
		l.notify()
	}
}
