// Package segy reads and writes SEG-Y files (revisions 0, 1 and 2.0).
package segy
