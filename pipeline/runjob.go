package pipeline

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"

	"drygrid/publish"
)

// resolve fixes what the job's date decides before a run: a date of
// "today" or "yesterday" becomes the calendar date on the job's clock in
// its time zone, the index step's year becomes the date's year (unless
// the job names one), and the daily records' window becomes the first
// of their windows (unless the job names one). The index step is copied,
// never changed under the caller.
func (j *Job) resolve() error {
	if IsRelativeDate(j.Date) {
		d, err := ResolveDate(j.Date, j.Timezone, j.now())
		if err != nil {
			return err
		}
		j.Date = d
	}
	if j.Index == nil || j.Date == "" {
		return nil
	}
	if err := CheckDate(j.Date); err != nil {
		return err
	}
	step := *j.Index
	j.Index = &step
	t, _ := time.Parse("2006-01-02", j.Date)
	if step.Options.Year == 0 {
		step.Options.Year = t.Year()
	}
	if step.Daily != "" {
		step.DailyOptions.Target = j.Date
		if step.Window == 0 && len(step.DailyOptions.Windows) > 0 {
			step.Window = step.DailyOptions.Windows[0]
		}
		j.WindowDays = step.Window
	}
	return nil
}

// DayPlan is a job made ready for its day by PlanDay: its date resolved,
// the daily records read once, one job for each window.
type DayPlan struct {
	// Date is the run's date, YYYY-MM-DD ("" when the job has none).
	Date string
	// Jobs are the runs, one per window of the daily records (one job
	// otherwise), each publishing its own output directory.
	Jobs []Job

	root    string // the archive's directory (Job.Archive), "" without
	archive bool
}

// Abandon is called instead of Finish when a job of the day failed: an
// archive's directory of the day is removed if nothing was published in
// it, and Out/latest is left as it was.
func (p *DayPlan) Abandon() {
	if p.archive {
		_ = os.Remove(filepath.Join(p.root, p.Date)) // only when empty
	}
}

// PlanDay prepares a job for a run: the date resolved ("today",
// "yesterday" on the job's clock), the job validated, and with daily
// records their file read once for every window. With several windows
// each window's layers go into Out/<N>d/ (Out/30d, Out/90d ...) and its
// history rows, if any, into the history file with _<N>d before its
// extension; with Archive into Out/DATE/ (then Out/DATE/<N>d/). Run each
// job in order, then call Finish.
func PlanDay(job Job) (*DayPlan, error) {
	if err := job.resolve(); err != nil {
		return nil, err
	}
	if err := job.Validate(); err != nil {
		return nil, err
	}
	p := &DayPlan{Date: job.Date}
	base := job.Out
	if job.Archive {
		if job.Date == "" {
			return nil, &UsageError{Msg: "--archive needs the run's date (--date)", Key: "archive", Detail: "a dated archive needs the job's date"}
		}
		p.root, p.archive = job.Out, true
		base = filepath.Join(job.Out, job.Date)
	}
	if job.Index == nil || job.Index.Daily == "" {
		job.Out = base
		p.Jobs = []Job{job}
		return p, p.mkdir()
	}
	totals, err := readJobDaily(&job)
	if err != nil {
		return nil, err
	}
	windows := job.Index.DailyOptions.Windows
	for _, n := range windows {
		j := job
		step := *job.Index
		step.Window, step.daily = n, totals
		j.Index, j.WindowDays = &step, n
		j.Out = base
		if len(windows) > 1 {
			j.Out = filepath.Join(base, fmt.Sprintf("%dd", n))
			if j.History != "" {
				ext := filepath.Ext(j.History)
				j.History = fmt.Sprintf("%s_%dd%s", strings.TrimSuffix(j.History, ext), n, ext)
			}
		}
		p.Jobs = append(p.Jobs, j)
	}
	return p, p.mkdir()
}

// mkdir makes the archive's directory of the day, once the day's inputs
// are read.
func (p *DayPlan) mkdir() error {
	if !p.archive {
		return nil
	}
	if err := os.MkdirAll(filepath.Join(p.root, p.Date), 0o755); err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	return nil
}

// Finish completes a day whose jobs all ran: with an archive, Out/latest
// is pointed at the day's directory, unless it already points at a later
// day (a back-filled day does not move it back). The link is replaced
// atomically (publish.Link).
func (p *DayPlan) Finish() error {
	if !p.archive {
		return nil
	}
	latest := filepath.Join(p.root, "latest")
	if cur, err := os.Readlink(latest); err == nil && len(cur) == len(p.Date) && cur > p.Date {
		if st, err := os.Stat(filepath.Join(p.root, cur)); err == nil && st.IsDir() {
			return nil
		}
	}
	if err := publish.Link(latest, p.Date); err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	return nil
}

// RunJob runs a job for its day: PlanDay, Run for each window in order
// (stopping at the first failure), then Finish. It returns the results
// in the order of the windows.
func RunJob(ctx context.Context, job Job) ([]*Result, error) {
	p, err := PlanDay(job)
	if err != nil {
		return nil, err
	}
	var out []*Result
	for _, j := range p.Jobs {
		res, err := Run(ctx, j)
		if err != nil {
			p.Abandon()
			return out, err
		}
		out = append(out, res)
	}
	return out, p.Finish()
}
