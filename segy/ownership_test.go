package segy

import (
	"bytes"
	"context"
	"errors"
	"os"
	"strings"
	"sync"
	"testing"
	"time"

	"quadtrace/segy/segytest"
)

// bigBase is a 20 x 20 grid of 64 IEEE samples: 400 traces of 496 bytes,
// about 48 pages, so truncating it leaves whole mapped pages past the end.
func bigBase() segytest.File {
	return segytest.File{Format: 5, Samples: 64, Interval: 4000, TraceSamples: segytest.SameAsBinary,
		TraceInterval: segytest.SameAsBinary, Traces: segytest.Grid3D(segytest.Seq(1, 20, 1), segytest.Seq(1, 20, 1), 64)}
}

// TestCloseRacesReads: reads on other goroutines racing Close either
// succeed or fail with an error wrapping os.ErrClosed; none faults on the
// unmapped memory (issue 12.1: a read racing Close ended in SIGSEGV).
// Run under -race (CI does).
func TestCloseRacesReads(t *testing.T) {
	path := writeTemp(t, bigBase().Bytes())
	for round := 0; round < 40; round++ {
		f, err := Open(path, Options{})
		if err != nil {
			t.Fatal(err)
		}
		var wg sync.WaitGroup
		start := make(chan struct{})
		errs := make(chan error, 64)
		for g := 0; g < 4; g++ {
			wg.Add(1)
			go func(g int) {
				defer wg.Done()
				<-start
				var buf []float32
				for i := 0; i < 200; i++ {
					var err error
					switch (i + g) % 3 {
					case 0:
						buf, err = f.ReadTrace((i*7+g)%400, buf)
					case 1:
						_, err = f.TraceHeader((i*11 + g) % 400)
					case 2:
						_, err = f.TimeSlice(i%64, 0)
					}
					if err != nil {
						if !errors.Is(err, os.ErrClosed) {
							errs <- err
						}
						return
					}
				}
			}(g)
		}
		close(start)
		if err := f.Close(); err != nil {
			t.Fatal(err)
		}
		wg.Wait()
		close(errs)
		for err := range errs {
			t.Errorf("round %d: read racing Close: %v (want success or os.ErrClosed)", round, err)
		}
		if _, err := f.ReadTrace(0, nil); !errors.Is(err, os.ErrClosed) || !strings.Contains(err.Error(), "closed") {
			t.Fatalf("read after Close: %v", err)
		}
	}
}

// slowReader delays every read, so a header scan takes seconds.
type slowReader struct {
	data  []byte
	delay time.Duration
}

func (r slowReader) ReadAt(p []byte, off int64) (int, error) {
	time.Sleep(r.delay)
	return bytes.NewReader(r.data).ReadAt(p, off)
}

// TestOpenContextStopsTheScan: cancelling the context of an open in
// progress stops the header scan within a few thousand traces, with an
// error wrapping context.Canceled (commands answer SIGINT during open).
func TestOpenContextStopsTheScan(t *testing.T) {
	s := segytest.File{Format: 5, Samples: 1, Interval: 4000, TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary,
		Traces: segytest.Grid3D(segytest.Seq(1, 100, 1), segytest.Seq(1, 100, 1), 1)}
	data := s.Bytes()
	ctx, cancel := context.WithCancel(context.Background())
	time.AfterFunc(50*time.Millisecond, cancel)
	start := time.Now()
	_, err := OpenReaderAtContext(ctx, slowReader{data, 200 * time.Microsecond}, int64(len(data)), "slow.sgy", Options{})
	took := time.Since(start)
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "open stopped at trace") {
		t.Fatalf("error %v, want one wrapping context.Canceled", err)
	}
	if took > 2*time.Second { // the whole scan takes 10000 x 200 us = 2 s at least
		t.Errorf("took %v to stop", took)
	}
	if _, err := OpenContext(ctx, writeTemp(t, data), Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("open with a cancelled context: %v", err)
	}
}
