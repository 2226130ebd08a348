// quadtrace's own replacement for github.com/jeandeaual/go-locale, which
// fyne's lang package calls in its init. The main module's go.mod points
// the module path here with a replace line; see doc.go and DEVELOPERS.md.
module github.com/jeandeaual/go-locale

go 1.26.0

require (
	golang.org/x/sys v0.50.0
	golang.org/x/text v0.44.0
)
