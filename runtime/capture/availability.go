package capture

// Unavailable time, as ITU-T G.821 (12/2002) Annex A and G.826 (12/2002) Annex A define it
// (clause numbers from memory): "A period of unavailable time begins at the onset of ten
// consecutive SES events. These ten seconds are considered to be part of unavailable time. A
// new period of available time begins at the onset of ten consecutive non-SES events. These
// ten seconds are considered to be part of available time." The measurement starts in
// available time. Error performance (ES, SES, their ratios, and G.826's background block
// errors) counts available time only.
//
// Both rules reach back ten seconds, so availability delays its verdict: a run of SES (or,
// while unavailable, of non-SES seconds) waits until it either reaches ten, and the state
// changes from its first second on, or is broken, and its seconds stay in the current state.
// Seconds still waiting when the capture ends stay in the state they were in (their run
// did not reach ten); Pending says how many there were.
type availability struct {
	unavailable bool
	wait        []second // the run that may change the state
	emit        func(s second, available bool)
	periods     []Period
	pending     int
}

// Period is a stretch of unavailable time: seconds [Start, Start+Length).
type Period struct {
	Start  int64 `json:"start_s"`
	Length int64 `json:"length_s"` // −1: still unavailable when the capture ended
}

// maxPeriodsKept bounds the periods listed one by one.
const maxPeriodsKept = 10000

const availabilityRun = 10

func (a *availability) push(s second, ses bool) {
	// the run that counts: SES while available, non-SES while unavailable
	if ses != a.unavailable {
		a.wait = append(a.wait, s)
		if len(a.wait) < availabilityRun {
			return
		}
		a.unavailable = !a.unavailable
		start := a.wait[0].Index
		if a.unavailable {
			if len(a.periods) < maxPeriodsKept {
				a.periods = append(a.periods, Period{Start: start, Length: -1})
			}
		} else if n := len(a.periods); n > 0 && a.periods[n-1].Length < 0 {
			a.periods[n-1].Length = start - a.periods[n-1].Start
		}
		a.flush()
		return
	}
	a.flush()
	a.emit(s, !a.unavailable)
}

// flush commits the waiting seconds in the current state.
func (a *availability) flush() {
	for _, w := range a.wait {
		a.emit(w, !a.unavailable)
	}
	a.wait = a.wait[:0]
}

// finish commits what still waits, in the current state, and closes an open period at end
// (the first second not measured).
func (a *availability) finish(end int64) {
	a.pending = len(a.wait)
	a.flush()
	if n := len(a.periods); n > 0 && a.periods[n-1].Length < 0 {
		a.periods[n-1].Length = end - a.periods[n-1].Start
	}
}
