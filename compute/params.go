package compute

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// ParamSpec describes one parameter of an attribute.
type ParamSpec struct {
	Name, Unit, Description string
	Default                 string   // as typed on the command line
	Min, Max                float64  // numeric range (inclusive); ignored when Choices is set
	Choices                 []string // non-nil: an enumerated parameter
}

// Params holds an attribute's resolved, validated parameter values. Build it
// with Attribute.Resolve; the zero Params stands for "all defaults".
type Params struct {
	attr string
	text map[string]string
	num  map[string]float64
}

// Float returns a numeric parameter, or NaN when there is no numeric
// parameter of that name.
func (p Params) Float(name string) float64 {
	if v, ok := p.num[name]; ok {
		return v
	}
	return math.NaN()
}

// String returns a parameter as text (a choice, or a number as typed
// after normalising), or "" when there is none of that name.
func (p Params) String(name string) string { return p.text[name] }

// Encode returns the parameters as "name=value" pairs sorted by name and
// joined by commas: a stable key for caches and file headers.
func (p Params) Encode() string {
	names := make([]string, 0, len(p.text))
	for k := range p.text {
		names = append(names, k)
	}
	sort.Strings(names)
	var b strings.Builder
	for i, k := range names {
		if i > 0 {
			b.WriteByte(',')
		}
		b.WriteString(k + "=" + p.text[k])
	}
	return b.String()
}

// Resolve validates raw parameter values (name -> value as typed) against
// the attribute's ParamSpecs and fills in defaults. Unknown names, values
// that are not numbers, out of range or not among the choices are errors
// that name the attribute and the parameter.
func (a *Attribute) Resolve(raw map[string]string) (Params, error) {
	p := Params{attr: a.ID, text: map[string]string{}, num: map[string]float64{}}
	for name := range raw {
		if a.param(name) == nil {
			known := make([]string, len(a.Params))
			for i, s := range a.Params {
				known[i] = s.Name
			}
			if len(known) == 0 {
				return Params{}, fmt.Errorf("attribute %q: unknown parameter %q (it takes none)", a.ID, name)
			}
			return Params{}, fmt.Errorf("attribute %q: unknown parameter %q%s (it takes %s)", a.ID, name, DidYouMean(name, known), strings.Join(known, ", "))
		}
	}
	for _, s := range a.Params {
		v, given := raw[s.Name]
		if !given {
			v = s.Default
		}
		v = strings.TrimSpace(v)
		if s.Choices != nil {
			if !slices.Contains(s.Choices, v) {
				return Params{}, fmt.Errorf("attribute %q: parameter %q: %q is not one of %s", a.ID, s.Name, v, strings.Join(s.Choices, ", "))
			}
			p.text[s.Name] = v
			continue
		}
		f, err := strconv.ParseFloat(v, 64)
		if err != nil || math.IsNaN(f) || math.IsInf(f, 0) {
			return Params{}, fmt.Errorf("attribute %q: parameter %q: %q is not a number", a.ID, s.Name, v)
		}
		if f < s.Min {
			return Params{}, fmt.Errorf("attribute %q: parameter %q: %s is below the minimum %s", a.ID, s.Name, v, withUnit(s.Min, s.Unit))
		}
		if f > s.Max {
			return Params{}, fmt.Errorf("attribute %q: parameter %q: %s is above the maximum %s", a.ID, s.Name, v, withUnit(s.Max, s.Unit))
		}
		p.num[s.Name] = f
		p.text[s.Name] = strconv.FormatFloat(f, 'g', -1, 64)
	}
	return p, nil
}

func withUnit(v float64, unit string) string {
	s := strconv.FormatFloat(v, 'g', -1, 64)
	if unit != "" {
		s += " " + unit
	}
	return s
}

func (a *Attribute) param(name string) *ParamSpec {
	for i := range a.Params {
		if a.Params[i].Name == name {
			return &a.Params[i]
		}
	}
	return nil
}

// ParseParams splits "name=value" strings (as given to --param) into a map.
// A repeated name is an error.
func ParseParams(pairs []string) (map[string]string, error) {
	raw := map[string]string{}
	for _, kv := range pairs {
		name, value, ok := strings.Cut(kv, "=")
		name = strings.TrimSpace(name)
		if !ok || name == "" {
			return nil, fmt.Errorf("parameter %q: want NAME=VALUE", kv)
		}
		if _, dup := raw[name]; dup {
			return nil, fmt.Errorf("parameter %q given twice", name)
		}
		raw[name] = value
	}
	return raw, nil
}

// ResolveAll resolves one set of NAME=VALUE settings for several attributes
// at once (a figure's base and overlay, an export's outputs): each setting
// goes to every attribute that has a parameter of that name, and a name
// that none of them has is an error that names the attributes and suggests
// the nearest parameter they do have.
func ResolveAll(attrs []*Attribute, raw map[string]string) ([]Params, error) {
	var known []string
	for _, a := range attrs {
		for _, s := range a.Params {
			if !slices.Contains(known, s.Name) {
				known = append(known, s.Name)
			}
		}
	}
	var unknown []string
	for name := range raw {
		if !slices.Contains(known, name) {
			unknown = append(unknown, name)
		}
	}
	if len(unknown) > 0 {
		slices.Sort(unknown)
		ids := make([]string, len(attrs))
		for i, a := range attrs {
			ids[i] = a.ID
		}
		takes := "they take none"
		if len(known) > 0 {
			takes = "they take " + strings.Join(known, ", ")
		}
		return nil, fmt.Errorf("parameter %q%s: none of the chosen attributes (%s) has it; %s",
			unknown[0], DidYouMean(unknown[0], known), strings.Join(ids, ", "), takes)
	}
	out := make([]Params, len(attrs))
	for i, a := range attrs {
		mine := map[string]string{}
		for _, s := range a.Params {
			if v, ok := raw[s.Name]; ok {
				mine[s.Name] = v
			}
		}
		p, err := a.Resolve(mine)
		if err != nil {
			return nil, err
		}
		out[i] = p
	}
	return out, nil
}
