package segy

import "strings"

// Stanza is one stanza of the extended textual headers (SEG-Y rev 1
// section 6.1, rev 2.0 section 6.1): a header line "((organisation: name))"
// (for the standard's own stanzas "((SEG: name ver x.y))"), then its text up
// to the next stanza header. Header is as written, Org and Name trimmed.
type Stanza struct {
	Header, Org, Name string
	Block             int // 1-based extended textual header where it starts
	Text              string
}

// ParseStanzas splits extended textual headers (as in Info.TextHeaders
// after the first) into stanzas. Text before the first stanza header is
// returned as a stanza with an empty Header. It never fails: anything not
// recognised as a stanza header is stanza text.
func ParseStanzas(blocks []string) []Stanza {
	var out []Stanza
	var cur *Stanza
	var body strings.Builder
	flush := func() {
		if cur != nil {
			cur.Text = strings.TrimRight(body.String(), "\n ")
			out = append(out, *cur)
		}
		body.Reset()
	}
	for bi, b := range blocks {
		for _, line := range strings.Split(b, "\n") {
			t := strings.TrimSpace(line)
			if org, name, ok := stanzaHeader(t); ok {
				flush()
				cur = &Stanza{Header: t, Org: org, Name: name, Block: bi + 1}
				continue
			}
			if cur == nil {
				if t == "" {
					continue
				}
				cur = &Stanza{Block: bi + 1}
			}
			body.WriteString(line)
			body.WriteByte('\n')
		}
	}
	flush()
	return out
}

// stanzaHeader recognises "((ORG: NAME))" (blanks allowed around the parts).
func stanzaHeader(t string) (org, name string, ok bool) {
	if !strings.HasPrefix(t, "((") || !strings.HasSuffix(t, "))") || len(t) < 5 {
		return "", "", false
	}
	inner := t[2 : len(t)-2]
	i := strings.IndexByte(inner, ':')
	if i < 0 || strings.ContainsAny(inner, "()") {
		return "", "", false
	}
	return strings.TrimSpace(inner[:i]), strings.TrimSpace(inner[i+1:]), true
}

// noteStanzas records the stanzas of the extended textual headers and
// warns about header-layout stanzas (SEG-Y rev 2.1 lets one move
// trace-header fields to other bytes): quadtrace does not apply them, so
// the numbering read at the standard bytes may not be what the file means.
func (f *File) noteStanzas() {
	if len(f.info.TextHeaders) < 2 {
		return
	}
	for _, s := range ParseStanzas(f.info.TextHeaders[1:]) {
		if s.Header == "" {
			continue
		}
		f.info.Stanzas = append(f.info.Stanzas, s.Header)
		n := strings.ToUpper(s.Name)
		if strings.Contains(n, "LAYOUT") || strings.Contains(n, "MAPPING") || strings.Contains(n, "HEADER DEF") {
			f.warnf("extended textual header %d holds a header-layout stanza %s that quadtrace does not apply: trace-header fields may sit at other bytes than the standard's (set the inline/crossline bytes by hand if the numbering looks wrong)", s.Block, s.Header)
		}
	}
}
