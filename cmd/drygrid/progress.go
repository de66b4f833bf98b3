package main

import (
	"io"
	"os"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// progress shows a bar on stderr while gridding, only when stderr is a
// terminal (a scheduler's log gets the closing summary alone).
type progress struct {
	bar *progressbar.ProgressBar
}

func newProgress(w io.Writer, total int, what string) *progress {
	f, ok := w.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) || total <= 0 {
		return &progress{}
	}
	return &progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(what),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionThrottle(100*1e6),
		progressbar.OptionClearOnFinish(),
	)}
}

// set reports rows done; safe to call from the interpolator's workers
// (progressbar serialises its own writes).
func (p *progress) set(done, _ int) {
	if p.bar != nil {
		_ = p.bar.Set(done)
	}
}

func (p *progress) done() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}

// dailyProgress is the progress report of a reader of daily records
// (pipeline.ReadDaily): its bar starts at the first report; done closes it.
func dailyProgress(stderr io.Writer) (report func(done, total int64), done func()) {
	var bar *progress
	report = func(n, total int64) {
		if bar == nil {
			bar = newProgress(stderr, int(total), "reading daily records")
		}
		bar.set(int(n), int(total))
	}
	done = func() {
		if bar != nil {
			bar.done()
		}
	}
	return report, done
}
