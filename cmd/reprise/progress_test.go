package main

import (
	"fmt"
	"strings"
	"sync"
	"testing"
	"time"
)

// TestCounterShowsCountsAndAnEstimate: a stage's line says how many of how
// many are done and, past a second, how long is left; calls from several
// goroutines are safe and the last count is always shown.
func TestCounterShowsCountsAndAnEstimate(t *testing.T) {
	var mu sync.Mutex
	var lines []string
	show := func(format string, args ...any) {
		mu.Lock()
		defer mu.Unlock()
		lines = append(lines, fmt.Sprintf(format, args...))
	}
	c := newCounter(show, "aligning pairs", 0)
	c.start = time.Now().Add(-2 * time.Second) // as if the stage began two seconds ago
	var wg sync.WaitGroup
	for range 4 {
		wg.Go(func() {
			for range 250 {
				c.at(int(c.done.Add(1)), 1000)
			}
		})
	}
	wg.Wait()
	if lines[0] != "aligning pairs: 0" || lines[len(lines)-1] != "aligning pairs: 1000 of 1000 (100%)" {
		t.Fatalf("first %q, last %q", lines[0], lines[len(lines)-1])
	}
	if len(lines) > 100 {
		t.Fatalf("%d lines for 1000 calls in well under a second", len(lines))
	}
	if got := c.line(250, 2*time.Second); got != "aligning pairs: 250 of 1000 (25%), about 6s left" {
		t.Fatalf("line %q", got)
	}
	if !strings.Contains(c.line(10, 500*time.Millisecond), "(1%)") || strings.Contains(c.line(10, 500*time.Millisecond), "left") {
		t.Fatalf("no estimate before a second: %q", c.line(10, 500*time.Millisecond))
	}
}
