package main

import (
	"time"

	"github.com/schollz/progressbar/v3"
)

// progressDelay is how long a search or budget runs before a progress bar
// appears: shorter runs print nothing.
const progressDelay = time.Second

// progress draws a progress bar on stderr for a long search or Monte Carlo
// run. It is active only when stderr is a terminal and --quiet is not
// given, and a bar appears only once the work has run for progressDelay.
// Each kind of work (design classes, Monte Carlo trials) gets its own bar.
type progress struct {
	io     *IOStreams
	now    func() time.Time
	start  time.Time
	active bool
	bar    *progressbar.ProgressBar
	desc   string // what the current bar counts
}

func newProgress(ios *IOStreams, quiet bool, now func() time.Time) *progress {
	return &progress{io: ios, now: now, start: now(), active: ios.IsStderrTTY() && !quiet}
}

// update is the search's Progress callback.
func (p *progress) update(done, total int) { p.set("searching design classes", done, total) }

// trials is the Monte Carlo callback of the exact budget.
func (p *progress) trials(done, total int) { p.set("Monte Carlo trials", done, total) }

// set moves the bar of work desc to done of total, starting a new bar when
// the kind of work or its total changes.
func (p *progress) set(desc string, done, total int) {
	if !p.active || total <= 0 {
		return
	}
	if p.bar != nil && (p.desc != desc || p.bar.GetMax() != total) {
		p.finish()
		p.bar = nil
	}
	if p.bar == nil {
		if p.now().Sub(p.start) < progressDelay {
			return
		}
		p.desc = desc
		p.bar = progressbar.NewOptions(total,
			progressbar.OptionSetWriter(p.io.progressOut()),
			progressbar.OptionSetDescription(desc),
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
