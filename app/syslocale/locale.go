package locale

import (
	"strings"

	"golang.org/x/text/language"
)

// GetLocales returns the user's preferred languages as BCP 47 tags, most
// preferred first, each accepted by language.Parse; nil when there is no
// preference. The error is always nil (kept for the original's signature).
func GetLocales() ([]string, error) {
	return usableTags(systemLocales()), nil
}

// GetLocale returns the most preferred language of GetLocales, or "" when
// there is none. The error is always nil.
func GetLocale() (string, error) {
	tags, _ := GetLocales()
	if len(tags) == 0 {
		return "", nil
	}
	return tags[0], nil
}

// SetRunOnJVM does nothing: fyne calls it on Android only, to give the
// lookup a way into the Java VM, and quadtrace does not target Android.
func SetRunOnJVM(func(fn func(vm, env, ctx uintptr) error) error) {}

// fromEnvironment returns the POSIX locale names that state the message
// language preference, most preferred first, read through getenv as GNU
// gettext reads them (see the package comment); nil when the messages
// locale is unset, C or POSIX.
func fromEnvironment(getenv func(string) string) []string {
	var messages string
	for _, name := range []string{"LC_ALL", "LC_MESSAGES", "LANG"} {
		if messages = getenv(name); messages != "" {
			break
		}
	}
	if isPortable(messages) {
		return nil
	}
	if list := getenv("LANGUAGE"); list != "" {
		return strings.Split(list, ":")
	}
	return []string{messages}
}

// isPortable reports whether the POSIX locale name s is empty or the
// portable locale, C or POSIX, with or without a codeset or modifier
// (C.UTF-8, POSIX@x).
func isPortable(s string) bool {
	name, _, _ := strings.Cut(s, "@")
	name, _, _ = strings.Cut(name, ".")
	return name == "" || name == "C" || name == "POSIX"
}

// usableTags turns locale names (POSIX language_TERRITORY.codeset@modifier
// or BCP 47 language-Region) into BCP 47 tags, keeping only those that
// language.Parse accepts, in order and without repeats.
func usableTags(names []string) []string {
	var tags []string
	seen := map[string]bool{}
	for _, name := range names {
		if isPortable(name) {
			continue
		}
		name, _, _ = strings.Cut(name, "@")
		name, _, _ = strings.Cut(name, ".")
		tag, err := language.Parse(strings.ReplaceAll(name, "_", "-"))
		if err != nil {
			continue
		}
		s := tag.String()
		if !seen[s] {
			seen[s] = true
			tags = append(tags, s)
		}
	}
	return tags
}
