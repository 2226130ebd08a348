package synth

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

func TestValidate(t *testing.T) {
	ok := DefaultConfig()
	if err := ok.Validate(); err != nil {
		t.Fatalf("default config: %v", err)
	}
	with := func(f func(*Config)) Config { c := ok; f(&c); return c }
	tests := []struct {
		name string
		cfg  Config
		want string // a fragment of the message naming the field
	}{
		{"zero inlines", with(func(c *Config) { c.Inlines = 0 }), "inlines 0"},
		{"negative crosslines", with(func(c *Config) { c.Crosslines = -5 }), "crosslines -5"},
		{"too few samples", with(func(c *Config) { c.Samples = 3 }), "samples 3"},
		// SEG-Y rev 1, binary header bytes 3221-3222: samples per trace in
		// a two-byte integer.
		{"samples beyond the SEG-Y header field", with(func(c *Config) { c.Samples = 40000 }), "samples 40000"},
		{"1 ms interval", with(func(c *Config) { c.IntervalUS = 1000 }), "interval 1000"},
		{"zero interval", with(func(c *Config) { c.IntervalUS = 0 }), "interval 0"},
		{"negative noise", with(func(c *Config) { c.Noise = -0.1 }), "noise -0.1"},
		{"NaN noise", with(func(c *Config) { c.Noise = math.NaN() }), "noise NaN"},
		{"huge noise", with(func(c *Config) { c.Noise = 11 }), "noise 11"},
		{"too many samples in all", with(func(c *Config) { c.Inlines, c.Crosslines, c.Samples = 20000, 20000, 1000 }), "in all"},
		{"overflowing product", with(func(c *Config) { c.Inlines, c.Crosslines = math.MaxInt/2, math.MaxInt/2 }), "in all"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.cfg.Validate()
			if !errors.Is(err, ErrInvalidConfig) {
				t.Fatalf("Validate() = %v, want an error wrapping ErrInvalidConfig", err)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("Validate() = %q, want it to say %q", err, tc.want)
			}
			// Generate refuses the same config without allocating a survey.
			s, gerr := Generate(context.Background(), tc.cfg, nil)
			if s != nil || !errors.Is(gerr, ErrInvalidConfig) {
				t.Errorf("Generate() = %v, %v; want nil and the Validate error", s, gerr)
			}
		})
	}
	// Both accepted intervals and a noise-free survey are valid.
	for _, c := range []Config{
		with(func(c *Config) { c.IntervalUS = 4000 }),
		with(func(c *Config) { c.Noise = 0 }),
	} {
		if err := c.Validate(); err != nil {
			t.Errorf("%+v: %v", c, err)
		}
	}
}
