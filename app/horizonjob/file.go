package horizonjob

import (
	"fmt"
	"os"

	"quadtrace/compute/horizon"
)

// ReadFile reads the horizon file at path (horizon.Read) onto the grid of
// l (horizon.FromPicks); errors name the file and the line.
func ReadFile(path string, l horizon.Layout) (*horizon.Horizon, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	picks, err := horizon.Read(f)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	h, err := horizon.FromPicks(l, picks)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	return h, nil
}
