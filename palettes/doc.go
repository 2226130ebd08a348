// Package palettes holds quadtrace's own colour maps, generated from control
// points in a perceptual colour space.
package palettes
