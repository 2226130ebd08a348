package viewer

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/compute"
)

// attributePanel is the Attribute tab: the registry's attributes as a tree
// by group, the chosen one's description and source, an entry (or choice)
// per parameter with the reason an entry is refused beside it, and the
// conditioning applied before the attribute. It owns its widgets; refresh
// sets them from the state.
type attributePanel struct {
	v          *viewer
	refreshing bool
	content    fyne.CanvasObject

	attrTree    *widget.Tree
	attrName    *widget.Label
	attrAbout   *widget.Label
	paramBox    *fyne.Container
	condEntries [3]*widget.Entry
	condWhy     *widget.Label

	// The parameter controls are made again only when the attribute
	// changes; paramEntries and paramWhy are those of paramsFor.
	paramsFor    string
	paramEntries map[string]*widget.Entry
	paramWhy     map[string]*widget.Label
}

func newAttributePanel(v *viewer) *attributePanel {
	p := &attributePanel{v: v}
	groups, byGroup := attributeGroups()
	p.attrTree = widget.NewTree(
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
		p.attrTree.OpenBranch(g)
	}
	p.attrTree.OnSelected = func(id widget.TreeNodeID) {
		if p.refreshing || !strings.HasPrefix(id, "attr:") {
			return
		}
		v.setAttribute(strings.TrimPrefix(id, "attr:"))
	}
	p.attrName = widget.NewLabel("")
	p.attrName.TextStyle.Bold = true
	p.attrAbout = widget.NewLabel("")
	p.attrAbout.Wrapping = fyne.TextWrapWord
	p.paramBox = container.NewVBox()
	condForm := container.New(layout.NewFormLayout())
	for i, name := range []string{"Low cut (Hz)", "High cut (Hz)", "AGC window (ms)"} {
		e := widget.NewEntry()
		e.SetPlaceHolder("off")
		e.OnSubmitted = func(string) { v.applyConditioning() }
		p.condEntries[i] = e
		condForm.Add(widget.NewLabel(name))
		condForm.Add(e)
	}
	p.condWhy = refusalLabel()
	condApply := widget.NewButton("Apply conditioning", v.applyConditioning)
	cond := widget.NewCard("", "Conditioning before the attribute", container.NewVBox(condForm, p.condWhy, condApply))
	details := container.NewVBox(p.attrName, p.attrAbout, p.paramBox, cond)
	treeBox := container.NewGridWrap(fyne.NewSize(300, 300), p.attrTree)
	p.content = container.NewBorder(treeBox, nil, nil, nil, container.NewVScroll(details))
	return p
}

// refusalLabel is the line beside an entry that says why its text is
// refused (hidden while it is accepted).
func refusalLabel() *widget.Label {
	l := widget.NewLabel("")
	l.Importance = widget.DangerImportance
	l.Wrapping = fyne.TextWrapWord
	l.SizeName = theme.SizeNameCaptionText
	l.Hide()
	return l
}

// setRefusal shows why (or hides the label when why is "").
func setRefusal(l *widget.Label, why string) {
	l.SetText(why)
	if why == "" {
		l.Hide()
	} else {
		l.Show()
	}
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

// refresh selects the state's attribute in the tree and shows its
// description and parameters.
func (p *attributePanel) refresh(st *viewState) {
	was := p.refreshing
	p.refreshing = true
	defer func() { p.refreshing = was }()
	attr := lookup(st.AttributeID)
	p.attrTree.Select("attr:" + attr.ID)
	p.attrName.SetText(attr.Name + unitSuffix(attr.Unit))
	p.attrAbout.SetText(attr.Description + "\nSource: " + attr.Source)
	if p.paramsFor != attr.ID {
		p.buildParamControls(attr, st)
		return
	}
	vals := st.params(attr.ID)
	for _, ps := range attr.Params {
		e := p.paramEntries[ps.Name]
		if e == nil {
			continue
		}
		cur, ok := vals[ps.Name]
		if !ok {
			cur = ps.Default
		}
		if e.Text != cur && paramRefusal(ps, e.Text) == "" {
			e.SetText(cur)
		}
	}
}

// paramRefusal says why text is not a value of parameter ps ("" when it
// is).
func paramRefusal(ps compute.ParamSpec, text string) string {
	f, err := strconv.ParseFloat(strings.TrimSpace(text), 64)
	if err != nil {
		return fmt.Sprintf("%q is not a number; %s takes %g to %g%s", strings.TrimSpace(text), ps.Name, ps.Min, ps.Max, unitSuffix(ps.Unit))
	}
	if f < ps.Min || f > ps.Max {
		return fmt.Sprintf("%g is out of range: %s takes %g to %g%s", f, ps.Name, ps.Min, ps.Max, unitSuffix(ps.Unit))
	}
	return ""
}

// buildParamControls makes an entry (or a choice) for each parameter of a,
// each with a line under it that says why a typed value is refused.
func (p *attributePanel) buildParamControls(a *compute.Attribute, st *viewState) {
	v := p.v
	p.paramsFor = a.ID
	p.paramEntries, p.paramWhy = map[string]*widget.Entry{}, map[string]*widget.Label{}
	p.paramBox.RemoveAll()
	if len(a.Params) == 0 {
		p.paramBox.Add(widget.NewLabel("No parameters"))
		return
	}
	form := container.New(layout.NewFormLayout())
	vals := st.params(a.ID)
	for _, ps := range a.Params {
		cur, ok := vals[ps.Name]
		if !ok {
			cur = ps.Default
		}
		var ctl fyne.CanvasObject
		why := refusalLabel()
		if ps.Choices != nil {
			sel := widget.NewSelect(ps.Choices, nil)
			sel.SetSelected(cur)
			sel.OnChanged = func(s string) { v.setParam(a, ps.Name, s) }
			ctl = sel
		} else {
			e := widget.NewEntry()
			e.SetText(cur)
			e.OnChanged = func(s string) {
				if paramRefusal(ps, s) == "" {
					setRefusal(why, "")
				}
			}
			e.OnSubmitted = func(s string) {
				if r := paramRefusal(ps, s); r != "" {
					setRefusal(why, r)
					return
				}
				setRefusal(why, v.setParam(a, ps.Name, strings.TrimSpace(s)))
			}
			p.paramEntries[ps.Name] = e
			ctl = e
		}
		p.paramWhy[ps.Name] = why
		help := widget.NewLabel(ps.Description)
		help.Wrapping = fyne.TextWrapWord
		help.SizeName = theme.SizeNameCaptionText
		form.Add(widget.NewLabel(ps.Name + unitSuffix(ps.Unit)))
		form.Add(container.NewVBox(ctl, why))
		form.Add(layout.NewSpacer())
		form.Add(help)
	}
	p.paramBox.Add(widget.NewLabelWithStyle("Parameters (Enter applies)", fyne.TextAlignLeading, fyne.TextStyle{Italic: true}))
	p.paramBox.Add(form)
}

// unitSuffix is " (unit)", or nothing for unitless values and for values in
// the input's own amplitude units, which SEG-Y does not name.
func unitSuffix(unit string) string {
	if unit == "" || unit == "amplitude" {
		return ""
	}
	return " (" + unit + ")"
}
