package main

import (
	"strings"
	"testing"
	"time"
)

func TestColorEnabled(t *testing.T) {
	tests := []struct {
		name     string
		terminal bool
		noColor  bool
		mode     string
		want     bool
	}{
		{name: "terminal, auto", terminal: true, mode: "auto", want: true},
		{name: "pipe, auto", terminal: false, mode: "auto", want: false},
		// NO_COLOR set and non-empty disables colour (no-color.org, common practice).
		{name: "terminal, NO_COLOR", terminal: true, noColor: true, mode: "auto", want: false},
		{name: "pipe, always", terminal: false, mode: "always", want: true},
		{name: "terminal, never", terminal: true, mode: "never", want: false},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ios, _, _, _ := TestIO()
			ios.SetTerminal(tt.terminal, tt.terminal)
			ios.noColor = tt.noColor
			ios.SetColorMode(tt.mode)
			if got := ios.ColorEnabled(); got != tt.want {
				t.Errorf("ColorEnabled = %v, want %v", got, tt.want)
			}
			if got := ios.Red("x"); (got != "x") != tt.want {
				t.Errorf("Red(x) = %q", got)
			}
		})
	}
}

func TestProgress(t *testing.T) {
	tests := []struct {
		name     string
		terminal bool
		quiet    bool
		elapsed  time.Duration
		wantBar  bool
	}{
		{name: "short search on a terminal", terminal: true, elapsed: 200 * time.Millisecond},
		{name: "long search on a terminal", terminal: true, elapsed: 3 * time.Second, wantBar: true},
		{name: "long search in a pipe", elapsed: 3 * time.Second},
		{name: "long search, quiet", terminal: true, quiet: true, elapsed: 3 * time.Second},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ios, _, _, errOut := TestIO()
			ios.SetTerminal(false, tt.terminal)
			start := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
			now := start
			p := newProgress(ios, tt.quiet, func() time.Time { return now })
			now = start.Add(tt.elapsed)
			p.update(5, 10)
			p.update(10, 10)
			p.finish()
			if got := errOut.Len() > 0; got != tt.wantBar {
				t.Errorf("bar drawn = %v, want %v (stderr %q)", got, tt.wantBar, errOut.String())
			}
			if tt.wantBar && !strings.Contains(errOut.String(), "searching") {
				t.Errorf("bar lacks its description: %q", errOut.String())
			}
		})
	}
}

// TestProgressTrials: a long Monte Carlo run gets its own bar on a
// terminal's stderr after the class search's (hardening finding 2: a run
// of 10^7 trials once ran for minutes without a sign of life).
func TestProgressTrials(t *testing.T) {
	ios, _, out, errOut := TestIO()
	ios.SetTerminal(false, true)
	start := time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC)
	now := start
	p := newProgress(ios, false, func() time.Time { return now })
	now = start.Add(3 * time.Second)
	p.update(5, 10)
	p.update(10, 10)
	p.trials(4096, 100000)
	p.trials(100000, 100000)
	p.finish()
	if !strings.Contains(errOut.String(), "searching") || !strings.Contains(errOut.String(), "Monte Carlo trials") {
		t.Errorf("bars %q", errOut.String())
	}
	if out.Len() > 0 {
		t.Errorf("progress went to stdout: %q", out.String())
	}
}
