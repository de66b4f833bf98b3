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
