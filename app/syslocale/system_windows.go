//go:build windows

package locale

import "golang.org/x/sys/windows"

// systemLocales asks Windows for the user's preferred UI languages, as
// language-Region names (en-US); none when the call fails.
func systemLocales() []string {
	names, err := windows.GetUserPreferredUILanguages(windows.MUI_LANGUAGE_NAME)
	if err != nil {
		return nil
	}
	return names
}
