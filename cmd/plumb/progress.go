package main

import (
	"time"

	"github.com/schollz/progressbar/v3"
)

// progressDelay is how long a search runs before a progress bar appears:
// shorter searches print nothing.
const progressDelay = time.Second

// progress draws a progress bar on stderr for a long search. It is active
// only when stderr is a terminal and --quiet is not given, and the bar
// appears only once the work has run for progressDelay.
type progress struct {
	io     *IOStreams
	now    func() time.Time
	start  time.Time
	active bool
	bar    *progressbar.ProgressBar
}

func newProgress(ios *IOStreams, quiet bool, now func() time.Time) *progress {
	return &progress{io: ios, now: now, start: now(), active: ios.IsStderrTTY() && !quiet}
}

// update is the search's Progress callback.
func (p *progress) update(done, total int) {
	if !p.active || total <= 0 {
		return
	}
	if p.bar == nil {
		if p.now().Sub(p.start) < progressDelay {
			return
		}
		p.bar = progressbar.NewOptions(total,
			progressbar.OptionSetWriter(p.io.ErrOut),
			progressbar.OptionSetDescription("searching design classes"),
			progressbar.OptionShowCount(),
			progressbar.OptionSetWidth(30),
			progressbar.OptionThrottle(100*time.Millisecond),
			progressbar.OptionClearOnFinish(),
			progressbar.OptionEnableColorCodes(false),
		)
	}
	_ = p.bar.Set(done)
}

// finish clears the bar, if one was drawn.
func (p *progress) finish() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}
