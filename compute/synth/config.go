package synth

import (
	"errors"
	"fmt"
	"math"
)

// Limits that Validate enforces.
const (
	// MaxSamples is the largest number of samples per trace. The SEG-Y rev 1
	// binary header holds it in a two-byte integer (bytes 3221-3222), which
	// many readers treat as signed, so 32767 keeps the survey writable by any
	// SEG-Y writer (SEG-Y rev 1 standard, section 3).
	MaxSamples = 32767
	// MaxTotalSamples caps Inlines*Crosslines*Samples so that a survey held
	// in memory as float32 stays under 2 GiB.
	MaxTotalSamples = 1 << 29
	// MaxNoise is the largest noise level accepted (noise RMS ten times the
	// signal RMS already hides every feature).
	MaxNoise = 10
	// minLateral is the smallest grid the model's map-view features can be
	// laid out on.
	minLateral = 4
	// minSamples is the shortest trace accepted.
	minSamples = 16
)

// Config sets the size, sampling, noise and seed of a synthetic survey.
type Config struct {
	// Inlines and Crosslines are the grid size in traces; Samples is the
	// number of samples per trace.
	Inlines, Crosslines, Samples int
	// IntervalUS is the sample interval in microseconds: 2000 or 4000.
	IntervalUS int
	// Noise is the RMS of the added band-limited random noise relative to
	// the RMS of the noise-free survey; 0 gives a noise-free survey.
	Noise float64
	// Seed selects the random draws (layer reflection coefficients, thin-bed
	// sequence, noise). The same Config always gives the same survey.
	Seed int64
}

// DefaultConfig returns the demo survey's size: 150 inlines by 200
// crosslines by 751 samples at 2 ms (0 to 1500 ms), noise at 5 % of the
// signal RMS.
func DefaultConfig() Config {
	return Config{
		Inlines:    150,
		Crosslines: 200,
		Samples:    751,
		IntervalUS: 2000,
		Noise:      0.05,
		Seed:       1,
	}
}

// ErrInvalidConfig is wrapped by every error Validate returns.
var ErrInvalidConfig = errors.New("synth: invalid config")

// Validate reports the first field of c that Generate cannot use. The error
// wraps ErrInvalidConfig and names the field and its value.
func (c Config) Validate() error {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("%w: "+format, append([]any{ErrInvalidConfig}, args...)...)
	}
	switch {
	case c.Inlines < minLateral:
		return bad("inlines %d: need at least %d", c.Inlines, minLateral)
	case c.Crosslines < minLateral:
		return bad("crosslines %d: need at least %d", c.Crosslines, minLateral)
	case c.Samples < minSamples:
		return bad("samples %d: need at least %d", c.Samples, minSamples)
	case c.Samples > MaxSamples:
		return bad("samples %d: more than %d", c.Samples, MaxSamples)
	case c.IntervalUS != 2000 && c.IntervalUS != 4000:
		return bad("sample interval %d us: want 2000 or 4000", c.IntervalUS)
	case math.IsNaN(c.Noise) || c.Noise < 0 || c.Noise > MaxNoise:
		return bad("noise %g: want a level from 0 to %g", c.Noise, float64(MaxNoise))
	}
	// Checked in float64 so that huge sizes cannot overflow the product.
	if total := float64(c.Inlines) * float64(c.Crosslines) * float64(c.Samples); total > MaxTotalSamples {
		return bad("%d x %d x %d samples: more than %d in all", c.Inlines, c.Crosslines, c.Samples, MaxTotalSamples)
	}
	return nil
}
