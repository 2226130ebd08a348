package segy

import (
	"strings"
	"testing"
	"unicode/utf8"

	"quadtrace/segy/segytest"
)

// TestParseStanzas: the stanza layout of SEG-Y rev 1 section 6 / rev 2.0
// section 6 (a "((SEG: name))" line opens a stanza; ((SEG: EndText)) ends
// the extended headers), checked on text laid out by segytest.
func TestParseStanzas(t *testing.T) {
	s := segytest.Base3D()
	s.ExtTextCount = -1
	s.ExtText = []string{
		"((SEG: Processing ver 1.0))\nFREE TEXT ONE\nFREE TEXT TWO",
		"((Halvane Geo: Notes))\nA NOTE\n((SEG: Trace Header Layout ver 1.0))\nINLINE AT 9",
		"((SEG: EndText))",
	}
	f, err := openBytes(s.Bytes(), "st.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := ParseStanzas(f.Info().TextHeaders[1:])
	want := []Stanza{
		{Header: "((SEG: Processing ver 1.0))", Org: "SEG", Name: "Processing ver 1.0", Block: 1, Text: "FREE TEXT ONE\nFREE TEXT TWO"},
		{Header: "((Halvane Geo: Notes))", Org: "Halvane Geo", Name: "Notes", Block: 2, Text: "A NOTE"},
		{Header: "((SEG: Trace Header Layout ver 1.0))", Org: "SEG", Name: "Trace Header Layout ver 1.0", Block: 2, Text: "INLINE AT 9"},
		{Header: "((SEG: EndText))", Org: "SEG", Name: "EndText", Block: 3},
	}
	if len(got) != len(want) {
		t.Fatalf("%d stanzas %+v", len(got), got)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("stanza %d: %+v, want %+v", i, got[i], want[i])
		}
	}
	if len(f.Info().Stanzas) != 4 || !hasWarning(f.Info(), "header-layout stanza ((SEG: Trace Header Layout ver 1.0)) that quadtrace does not apply") {
		t.Errorf("stanzas %q warnings %q", f.Info().Stanzas, f.Info().Warnings)
	}
}

// FuzzStanzas splits arbitrary extended textual headers: no panic, every
// stanza header found is a "((org: name))" line, and the text is kept.
func FuzzStanzas(f *testing.F) {
	f.Add("((SEG: Processing ver 1.0))\nX\n((SEG: EndText))", "")
	f.Add("((", "))")
	f.Add("(( : ))\n((a:b))((c:d))", "((SEG: Trace Header Layout ver 1.0))\n<field name=\"inline\" byte=\"9\"/>")
	f.Fuzz(func(t *testing.T, a, b string) {
		for _, s := range ParseStanzas([]string{a, b}) {
			if s.Header != "" && (!strings.HasPrefix(s.Header, "((") || !strings.HasSuffix(s.Header, "))") || !strings.Contains(s.Header, ":")) {
				t.Fatalf("stanza header %q", s.Header)
			}
			if s.Block < 1 || s.Block > 2 {
				t.Fatalf("block %d", s.Block)
			}
			if utf8.ValidString(a) && utf8.ValidString(b) && !utf8.ValidString(s.Text) {
				t.Fatalf("text %q", s.Text)
			}
		}
	})
}
