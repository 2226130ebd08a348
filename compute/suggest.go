package compute

import (
	"fmt"
	"strings"

	"github.com/agnivade/levenshtein"
)

// Nearest returns the candidate closest to word by edit distance
// (Levenshtein, 1966: insertions, deletions and substitutions, computed by
// github.com/agnivade/levenshtein), ignoring case, and whether it is close
// enough to be a likely slip of the keyboard: at most a third of the longer
// word's letters differ, or two (a swapped pair) in short words. Ties go to
// the earlier candidate.
func Nearest(word string, candidates []string) (string, bool) {
	best, bestD := "", -1
	w := strings.ToLower(word)
	for _, c := range candidates {
		d := levenshtein.ComputeDistance(w, strings.ToLower(c))
		if bestD < 0 || d < bestD {
			best, bestD = c, d
		}
	}
	if bestD < 0 {
		return "", false
	}
	limit := max(2, max(len(word), len(best))/3)
	return best, bestD <= limit
}

// DidYouMean is "" or, when a candidate is near word (see Nearest), the
// text " (did you mean NAME?)" to append to an error about word.
func DidYouMean(word string, candidates []string) string {
	if c, ok := Nearest(word, candidates); ok {
		return fmt.Sprintf(" (did you mean %s?)", c)
	}
	return ""
}
