package capture

// G821 holds the time-based error performance figures of ITU-T G.821 (12/2002), from the
// definitions of its clause on events and parameters (numbers from memory):
//
//   - errored second (ES): a one-second period with one or more bits in error;
//   - severely errored second (SES): a one-second period with a bit error ratio ≥ 10⁻³;
//   - ESR and SESR: ES and SES as a share of the seconds of available time;
//   - unavailable time: Annex A (see availability).
//
// G.821 was written for 64 kbit/s connections; tally applies its definitions at any line
// rate, as test sets commonly do (common practice, no source). A second in which the
// pattern alignment was lost or not yet found (a slip, a re-lock, bits not compared) counts
// as severely errored, as G.826 counts a second with a defect (our choice for G.821, where a
// bit error ratio cannot be measured over bits not compared). Only whole seconds count: the
// part of a second at the end of the capture is left out and reported.
type G821 struct {
	Seconds     int64    `json:"seconds"`
	Available   int64    `json:"available_seconds"`
	Unavailable int64    `json:"unavailable_seconds"`
	ES          int64    `json:"errored_seconds"`
	SES         int64    `json:"severely_errored_seconds"`
	SESDefect   int64    `json:"severely_errored_by_alignment"` // SES from a loss of alignment
	ESR         float64  `json:"esr"`                           // ES / available seconds (NaN-free: 0 when none)
	SESR        float64  `json:"sesr"`                          // SES / available seconds
	Periods     []Period `json:"unavailable_periods"`
	Pending     int      `json:"pending_seconds"`  // seconds at the end whose run did not reach ten
	Errors      int64    `json:"errors_available"` // bit errors in available time
	Bits        int64    `json:"bits_available"`   // bits compared in available time

	avail availability
}

// severeBER is the bit error ratio at or above which a second is severely errored.
const severeBER = 1e-3

func newG821() *G821 {
	g := &G821{}
	g.avail.emit = g.commit
	return g
}

// ses821 reports whether a second is severely errored: a defect, nothing compared, or
// errors/bits ≥ 10⁻³ (compared in integers: 1000·errors ≥ bits).
func ses821(s second) bool { return s.Defect || s.Bits == 0 || 1000*s.Errors >= s.Bits }

func (g *G821) add(s second) { g.Seconds++; g.avail.push(s, ses821(s)) }

func (g *G821) commit(s second, available bool) {
	if !available {
		g.Unavailable++
		return
	}
	g.Available++
	g.Errors += s.Errors
	g.Bits += s.Bits
	if s.Errors > 0 || s.Defect {
		g.ES++
	}
	if ses821(s) {
		g.SES++
		if s.Defect || s.Bits == 0 {
			g.SESDefect++
		}
	}
}

func (g *G821) finish(end int64) {
	g.avail.finish(end)
	g.Periods, g.Pending = g.avail.periods, g.avail.pending
	if g.Periods == nil {
		g.Periods = []Period{}
	}
	if g.Available > 0 {
		g.ESR = float64(g.ES) / float64(g.Available)
		g.SESR = float64(g.SES) / float64(g.Available)
	}
}
