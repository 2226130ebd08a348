// Package render turns sections and maps into images: variable density,
// wiggles, co-rendering, axes, legends, scale bars and figures. No fyne.
package render
