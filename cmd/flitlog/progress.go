package main

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"sync"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
)

// batchProgress shows the progress of a batch on stderr: on a terminal one
// bar over the batch (clips weighted by their frames) whose description
// lists the running clips with their own frame progress and the frames/s;
// elsewhere a plain line per clip started and finished and every 10 s.
type batchProgress struct {
	mu      sync.Mutex
	w       io.Writer
	quiet   bool
	tty     bool
	bar     *progressbar.ProgressBar
	total   int
	nDone   int
	running map[int]*clipProgress
	frames  int64 // decoded in this run, all clips
	start   time.Time
	stop    chan struct{}
	stopped chan struct{}
}

type clipProgress struct {
	b         *batchProgress
	job       clipJob
	framesMax int
	framesNow int
	lastLine  time.Time
}

const barScale = 1000 // bar units per clip

func newBatchProgress(jobs []clipJob, opts runOptions) *batchProgress {
	p := &batchProgress{w: opts.Progress, quiet: opts.Quiet, total: len(jobs),
		running: map[int]*clipProgress{}, start: time.Now(),
		stop: make(chan struct{}), stopped: make(chan struct{})}
	if f, ok := opts.Progress.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		p.tty = true
	}
	if p.quiet {
		close(p.stopped)
		return p
	}
	if p.tty {
		p.bar = progressbar.NewOptions(len(jobs)*barScale,
			progressbar.OptionSetWriter(opts.Progress),
			progressbar.OptionSetWidth(30),
			progressbar.OptionSetPredictTime(true),
			progressbar.OptionSetElapsedTime(true),
			progressbar.OptionThrottle(150*time.Millisecond),
			progressbar.OptionShowDescriptionAtLineEnd(),
			progressbar.OptionFullWidth(),
		)
	}
	go p.loop()
	return p
}

func (p *batchProgress) loop() {
	defer close(p.stopped)
	t := time.NewTicker(250 * time.Millisecond)
	defer t.Stop()
	for {
		select {
		case <-p.stop:
			return
		case <-t.C:
			p.mu.Lock()
			p.render()
			p.mu.Unlock()
		}
	}
}

// render updates the bar; p.mu is held.
func (p *batchProgress) render() {
	if p.bar == nil {
		return
	}
	units := p.nDone * barScale
	ids := make([]int, 0, len(p.running))
	for id := range p.running {
		ids = append(ids, id)
	}
	sort.Ints(ids)
	var parts []string
	for _, id := range ids {
		c := p.running[id]
		pct := 0
		if c.framesMax > 0 {
			pct = min(100, 100*c.framesNow/c.framesMax)
			units += min(barScale, barScale*c.framesNow/c.framesMax)
		}
		parts = append(parts, fmt.Sprintf("%s %d%%", shorten(filepath.Base(c.job.Path), 24), pct))
	}
	fps := float64(p.frames) / max(time.Since(p.start).Seconds(), 1e-3)
	p.bar.Describe(fmt.Sprintf("clips %d/%d | %s | %.0f frames/s", p.nDone, p.total, strings.Join(parts, ", "), fps))
	p.bar.Set(units)
}

func shorten(s string, n int) string {
	r := []rune(s)
	if len(r) <= n {
		return s
	}
	return string(r[:n-1]) + "…"
}

// clip returns the progress of one clip.
func (p *batchProgress) clip(j clipJob) *clipProgress {
	c := &clipProgress{b: p, job: j}
	p.mu.Lock()
	p.running[j.Index] = c
	p.mu.Unlock()
	return c
}

// Start is called once the clip's length is known (from its header).
func (c *clipProgress) Start(frames int) {
	p := c.b
	p.mu.Lock()
	defer p.mu.Unlock()
	c.framesMax = frames
	if !p.quiet && !p.tty {
		fmt.Fprintf(p.w, "flitlog: [%d/%d] %s: started (%d frames)\n", c.job.Index+1, p.total, c.job.Path, frames)
		c.lastLine = time.Now()
	}
}

// Frames reports that n frames of the clip have been processed.
func (c *clipProgress) Frames(n int) {
	p := c.b
	p.mu.Lock()
	defer p.mu.Unlock()
	p.frames += int64(n - c.framesNow)
	c.framesNow = n
	if !p.quiet && !p.tty && time.Since(c.lastLine) >= 10*time.Second {
		pct := 0
		if c.framesMax > 0 {
			pct = 100 * n / c.framesMax
		}
		fps := float64(p.frames) / max(time.Since(p.start).Seconds(), 1e-3)
		fmt.Fprintf(p.w, "flitlog: [%d/%d] %s: %d/%d frames (%d%%), %.0f frames/s in the batch\n",
			c.job.Index+1, p.total, c.job.Path, n, c.framesMax, pct, fps)
		c.lastLine = time.Now()
	}
}

func (p *batchProgress) done(j clipJob, r clipResult) {
	p.mu.Lock()
	defer p.mu.Unlock()
	delete(p.running, j.Index)
	p.nDone++
	if p.quiet {
		return
	}
	line := fmt.Sprintf("[%d/%d] %s: %s", j.Index+1, p.total, j.Path, r.Status)
	if r.Skipped {
		line += " (unchanged, not redone; --force redoes it)"
	} else if r.Status != statusFailed {
		line += fmt.Sprintf(", %d frames, %d tracks, %d landings", r.Frames, r.Tracks, r.Landings)
	}
	if r.Reason != "" {
		line += ": " + r.Reason
	}
	if p.tty {
		p.bar.Clear()
		fmt.Fprintln(p.w, line)
		p.render()
	} else {
		fmt.Fprintln(p.w, "flitlog: "+line)
	}
}

func (p *batchProgress) finish() {
	if !p.quiet {
		close(p.stop)
	}
	<-p.stopped
	if p.bar != nil {
		p.mu.Lock()
		p.render()
		p.bar.Finish()
		fmt.Fprintln(p.w)
		p.mu.Unlock()
	}
}
