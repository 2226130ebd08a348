package viewer

import (
	"fmt"
	"quadtrace/compute"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

func (v *viewer) attributeTab() fyne.CanvasObject {
	u := v.ui
	groups, byGroup := attributeGroups()
	u.attrTree = widget.NewTree(
		func(id widget.TreeNodeID) []widget.TreeNodeID {
			if id == "" {
				return groups
			}
			return byGroup[id]
		},
		func(id widget.TreeNodeID) bool { return id == "" || byGroup[id] != nil },
		func(branch bool) fyne.CanvasObject { return widget.NewLabel("Instantaneous bandwidth xx") },
		func(id widget.TreeNodeID, branch bool, o fyne.CanvasObject) {
			l := o.(*widget.Label)
			if branch {
				l.SetText(groupTitle(id))
				l.TextStyle.Bold = true
			} else {
				a := lookup(strings.TrimPrefix(id, "attr:"))
				l.SetText(a.Name)
				l.TextStyle.Bold = false
			}
			l.Refresh()
		})
	for _, g := range groups {
		u.attrTree.OpenBranch(g)
	}
	u.attrTree.OnSelected = func(id widget.TreeNodeID) {
		if u.refreshing || !strings.HasPrefix(id, "attr:") {
			return
		}
		v.setAttribute(strings.TrimPrefix(id, "attr:"))
	}
	u.attrName = widget.NewLabel("")
	u.attrName.TextStyle.Bold = true
	u.attrAbout = widget.NewLabel("")
	u.attrAbout.Wrapping = fyne.TextWrapWord
	u.paramBox = container.NewVBox()
	condForm := container.New(layout.NewFormLayout())
	for i, name := range []string{"Low cut (Hz)", "High cut (Hz)", "AGC window (ms)"} {
		e := widget.NewEntry()
		e.SetPlaceHolder("off")
		e.OnSubmitted = func(string) { v.applyConditioning() }
		u.condEntries[i] = e
		condForm.Add(widget.NewLabel(name))
		condForm.Add(e)
	}
	condApply := widget.NewButton("Apply conditioning", v.applyConditioning)
	cond := widget.NewCard("", "Conditioning before the attribute", container.NewVBox(condForm, condApply))
	details := container.NewVBox(u.attrName, u.attrAbout, u.paramBox, cond)
	treeBox := container.NewGridWrap(fyne.NewSize(300, 300), u.attrTree)
	return container.NewBorder(treeBox, nil, nil, nil, container.NewVScroll(details))
}

// attributeGroups lists the registry's groups in registry order and the
// attributes of each, as tree node ids.
func attributeGroups() ([]string, map[string][]string) {
	var groups []string
	by := map[string][]string{}
	for _, a := range compute.Attributes() {
		g := "group:" + string(a.Group)
		if by[g] == nil {
			groups = append(groups, g)
		}
		by[g] = append(by[g], "attr:"+a.ID)
	}
	return groups, by
}

func groupTitle(id string) string {
	g := strings.TrimPrefix(id, "group:")
	if g == "" {
		return g
	}
	return strings.ToUpper(g[:1]) + g[1:]
}

// buildParamControls makes an entry (or a choice) for each parameter of a.
func (v *viewer) buildParamControls(a *compute.Attribute) {
	u := v.ui
	u.paramBox.RemoveAll()
	if len(a.Params) == 0 {
		u.paramBox.Add(widget.NewLabel("No parameters"))
		return
	}
	form := container.New(layout.NewFormLayout())
	vals := v.state.params(a.ID)
	for _, ps := range a.Params {
		ps := ps
		label := ps.Name + unitSuffix(ps.Unit)
		cur, ok := vals[ps.Name]
		if !ok {
			cur = ps.Default
		}
		var ctl fyne.CanvasObject
		if ps.Choices != nil {
			sel := widget.NewSelect(ps.Choices, nil)
			sel.SetSelected(cur)
			sel.OnChanged = func(s string) { v.setParam(a, ps.Name, s) }
			ctl = sel
		} else {
			e := widget.NewEntry()
			e.SetText(cur)
			e.Validator = func(s string) error {
				f, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
				if err != nil {
					return fmt.Errorf("a number, please")
				}
				if f < ps.Min || f > ps.Max {
					return fmt.Errorf("between %g and %g", ps.Min, ps.Max)
				}
				return nil
			}
			e.OnSubmitted = func(s string) {
				if e.Validate() == nil {
					v.setParam(a, ps.Name, strings.TrimSpace(s))
				}
			}
			ctl = e
		}
		lab := widget.NewLabel(label)
		form.Add(lab)
		form.Add(ctl)
		form.Add(layout.NewSpacer())
		help := widget.NewLabel(ps.Description)
		help.Wrapping = fyne.TextWrapWord
		help.SizeName = theme.SizeNameCaptionText
		form.Add(help)
	}
	u.paramBox.Add(widget.NewLabelWithStyle("Parameters (Enter applies)", fyne.TextAlignLeading, fyne.TextStyle{Italic: true}))
	u.paramBox.Add(form)
}

// unitSuffix is " (unit)", or nothing for unitless values and for values in
// the input's own amplitude units, which SEG-Y does not name.
func unitSuffix(unit string) string {
	if unit == "" || unit == "amplitude" {
		return ""
	}
	return " (" + unit + ")"
}
