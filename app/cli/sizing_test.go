package cli

import (
	"testing"
)

func TestParseBytes(t *testing.T) {
	cases := []struct {
		in   string
		want int64
		fail bool
	}{
		{"256M", 256 << 20, false},
		{"256MiB", 256 << 20, false},
		{"256mb", 256 << 20, false},
		{"1G", 1 << 30, false},
		{"1.5G", 3 << 29, false},
		{"64k", 64 << 10, false},
		{"1000000", 1000000, false},
		{"", 0, true},
		{"M", 0, true},
		{"-5M", 0, true},
		{"0", 0, true},
		{"12X", 0, true},
	}
	for _, c := range cases {
		got, err := parseBytes(c.in)
		if (err != nil) != c.fail || got != c.want {
			t.Errorf("parseBytes(%q) = %d, %v; want %d (fail %v)", c.in, got, err, c.want, c.fail)
		}
	}
}
