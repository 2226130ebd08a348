// Package version holds quadtrace's version string: printed by `quadtrace
// version`, shown in the window's About box and recorded in the textual
// header of every volume the export writes.
package version

// Version is the quadtrace version.
const Version = "0.1.0"
