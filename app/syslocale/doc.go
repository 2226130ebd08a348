// Package locale tells fyne which languages the user prefers. It is
// quadtrace's own small replacement for github.com/jeandeaual/go-locale
// (the module path stays that one, so that fyne.io/fyne/v2/lang, which
// imports it, builds against this code through the replace line in
// quadtrace's go.mod).
//
// Why it exists: fyne's lang package looks the locale up in an init
// function, before main runs, and the original package turns LANG=C.UTF-8
// (the default locale of most servers and containers) into the language
// tag "C", which golang.org/x/text/language refuses; fyne then logs three
// "Fyne error: Error parsing user locale C" lines on stderr in every run of
// quadtrace, command-line commands included. Nothing in quadtrace runs
// before that init, so the fix has to sit in the lookup itself.
//
// The contract fyne relies on: GetLocales returns the user's preferred
// languages, most preferred first, as BCP 47 tags that
// golang.org/x/text/language.Parse accepts (each entry is checked with it,
// and dropped when it does not parse), or nil when the user asks for no
// localisation; fyne then uses English. It never returns an error.
//
// Where the preference comes from:
//
//   - Unix and others: the POSIX locale variables as GNU gettext reads them
//     for messages (GNU gettext manual, "Locale Environment Variables" and
//     "The LANGUAGE variable"): the first non-empty of LC_ALL, LC_MESSAGES
//     and LANG names the locale; when that locale is unset, "C" or "POSIX"
//     (with or without a codeset or modifier, such as C.UTF-8), there is no
//     preference and LANGUAGE is ignored; otherwise the colon-separated
//     list in LANGUAGE, when set, comes first, else the locale itself.
//     An entry language[_TERRITORY][.codeset][@modifier] becomes the tag
//     language-TERRITORY. On macOS this is what a terminal sets; a program
//     started from the Finder usually has no LANG and gets English.
//   - Windows: the user's preferred UI languages from
//     GetUserPreferredUILanguages (Win32, through golang.org/x/sys/windows).
//
// Only the functions fyne calls are provided: GetLocale, GetLocales and
// SetRunOnJVM (Android only in fyne; a no-op here, quadtrace does not
// target Android).
package locale
