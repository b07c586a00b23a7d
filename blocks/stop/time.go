package stop

import (
	"fmt"
	"time"
)

// TimeLimit ends a point once it has run for Max of wall time.
//
// It is the one rule a replay cannot see: where it stops depends on the machine, its load and
// the number of workers, so a table made with it is not reproducible, and a resumed point
// counts its time afresh. Use it as a guard beside an error or bit rule, not as the rule
// that shapes the table.
type TimeLimit struct{ Max time.Duration }

// Time ends a point after d of wall time (for example 10*time.Minute).
func Time(d time.Duration) *TimeLimit { return &TimeLimit{Max: d} }

// Met is true once the point's wall time reaches Max.
func (r *TimeLimit) Met(p *Progress) bool { return p.Elapsed >= r.Max }

// Name is "time".
func (r *TimeLimit) Name() string { return "time" }

// Err reports a budget that is not positive.
func (r *TimeLimit) Err() error {
	if r.Max <= 0 {
		return fmt.Errorf("stop.Time: budget %v must be positive", r.Max)
	}
	return nil
}
