package output

import (
	"io"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// Progress draws a bar with the count, rate and time left on its writer
// when that is a terminal (golang.org/x/term), and nothing otherwise,
// so that logs and pipes stay clean. The bar is schollz/progressbar's.
type Progress struct {
	bar *progressbar.ProgressBar
}

// NewProgress starts a bar labelled label for total steps on w; it draws
// nothing unless w is a terminal and there is more than one step.
func NewProgress(w io.Writer, label string, total int) *Progress {
	f, ok := w.(*os.File)
	if !ok || !term.IsTerminal(int(f.Fd())) || total <= 1 {
		return &Progress{}
	}
	return &Progress{bar: progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(label),
		progressbar.OptionShowCount(),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionSetWidth(30),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionClearOnFinish(),
		progressbar.OptionSetTheme(progressbar.Theme{Saucer: "█", SaucerPadding: "·", BarStart: "[", BarEnd: "]"}),
	)}
}

// Update shows done steps of total; it may be called from any goroutine
// that holds the caller's lock, as study progress is.
func (p *Progress) Update(done, total int) {
	if p.bar != nil {
		_ = p.bar.Set(done)
	}
}

// Done removes the bar.
func (p *Progress) Done() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}
