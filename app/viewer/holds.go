package viewer

import (
	"sync"
	"time"
)

// surveyHolds counts, for each open survey, the jobs that read it, so that
// a survey is closed only after every job that captured it has returned
// (segy.File.Close unmaps the file: a read racing it could fault). It
// belongs to the UI goroutine, which starts the jobs and closes surveys;
// the jobs only call the release function they were given.
type surveyHolds struct {
	m map[survey]*sync.WaitGroup
}

// hold registers a job reading s and returns the function the job calls
// when it no longer reads s.
func (h *surveyHolds) hold(s survey) func() {
	if h.m == nil {
		h.m = map[survey]*sync.WaitGroup{}
	}
	wg := h.m[s]
	if wg == nil {
		wg = &sync.WaitGroup{}
		h.m[s] = wg
	}
	wg.Add(1)
	var once sync.Once
	return func() { once.Do(wg.Done) }
}

// release forgets s and returns a function that waits until every job
// holding it has returned.
func (h *surveyHolds) release(s survey) func() {
	wg := h.m[s]
	delete(h.m, s)
	if wg == nil {
		return func() {}
	}
	return wg.Wait
}

// startWithSurvey runs run in lane with the current survey held for it.
func (v *viewer) startWithSurvey(lane string, run func(j *job, vol survey)) {
	vol := v.vol
	done := v.holds.hold(vol)
	v.jobs.start(lane, func(j *job) {
		defer done()
		run(j, vol)
	})
}

// closeSurvey cancels the jobs that read vol (data and trace lanes) and
// closes it once every job that captured it, a demo export included, has
// returned. The waiting runs off the UI goroutine, as a job the tests'
// jobs.wait also waits for.
func (v *viewer) closeSurvey(vol survey) {
	if vol == nil {
		return
	}
	v.jobs.cancel("data")
	v.jobs.cancel("trace")
	wait := v.holds.release(vol)
	v.jobs.background(func() {
		wait()
		vol.Close()
	})
}

// closeSurveyNow is closeSurvey for the end of the program: it waits for
// the jobs (which the caller has cancelled) for at most limit, and closes
// the survey only when they returned.
func (v *viewer) closeSurveyNow(limit time.Duration) {
	if v.vol == nil {
		return
	}
	wait := v.holds.release(v.vol)
	done := make(chan struct{})
	go func() { wait(); close(done) }()
	select {
	case <-done:
		v.vol.Close()
	case <-time.After(limit):
		// A job still reads the survey: leave the mapping to the exiting
		// process rather than pull it from under the read.
	}
	v.vol = nil
}
