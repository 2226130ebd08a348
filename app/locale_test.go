//go:build !windows

package app

import (
	"slices"
	"testing"

	locale "github.com/jeandeaual/go-locale" // replaced by app/syslocale (go.mod)

	"golang.org/x/text/language"
)

// TestLocaleLookup checks the replacement of go-locale that fyne's lang
// package calls in its init (app/syslocale): the preference follows GNU
// gettext's reading of LC_ALL, LC_MESSAGES, LANG and LANGUAGE (gettext
// manual, "Locale Environment Variables", "The LANGUAGE variable"): C and
// POSIX, with or without codeset, mean no preference and LANGUAGE is then
// ignored; every tag returned parses with golang.org/x/text/language, the
// parser fyne hands it to.
func TestLocaleLookup(t *testing.T) {
	for _, c := range []struct {
		lcAll, lcMessages, lang, language string
		want                              []string
	}{
		{"", "", "", "", nil},
		{"", "", "C", "", nil},
		{"", "", "C.UTF-8", "", nil},
		{"", "", "C.utf8", "", nil},
		{"", "", "POSIX", "", nil},
		{"", "", "C.UTF-8", "de:fr", nil}, // gettext: LANGUAGE ignored under the C locale
		{"", "", "", "de", nil},           // no locale set is the C locale
		{"", "", "en_US.UTF-8", "", []string{"en-US"}},
		{"", "", "de_DE.UTF-8@euro", "", []string{"de-DE"}},
		{"", "", "pt_BR", "", []string{"pt-BR"}},
		{"", "", "fr", "", []string{"fr"}},
		{"", "", "en_GB.UTF-8", "de_DE:fr:C:de_DE", []string{"de-DE", "fr"}},
		{"C.UTF-8", "", "de_DE.UTF-8", "", nil},
		{"", "fr_FR.UTF-8", "C", "", []string{"fr-FR"}},
		{"es_ES.UTF-8", "fr_FR", "de_DE", "", []string{"es-ES"}},
		{"", "", "not a locale!", "", nil},
		{"", "", "en_US.UTF-8", "xx-!!:en", []string{"en"}},
	} {
		t.Setenv("LC_ALL", c.lcAll)
		t.Setenv("LC_MESSAGES", c.lcMessages)
		t.Setenv("LANG", c.lang)
		t.Setenv("LANGUAGE", c.language)
		got, err := locale.GetLocales()
		one, err1 := locale.GetLocale()
		wantOne := ""
		if len(c.want) > 0 {
			wantOne = c.want[0]
		}
		if err != nil || err1 != nil || !slices.Equal(got, c.want) || one != wantOne {
			t.Errorf("LC_ALL=%q LC_MESSAGES=%q LANG=%q LANGUAGE=%q: GetLocales %q (%v), GetLocale %q (%v); want %q, %q",
				c.lcAll, c.lcMessages, c.lang, c.language, got, err, one, err1, c.want, wantOne)
		}
		for _, tag := range got {
			if _, err := language.Parse(tag); err != nil {
				t.Errorf("%q does not parse: %v", tag, err)
			}
		}
	}
}
