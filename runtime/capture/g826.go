package capture

// G826 holds the block-based error performance figures of ITU-T G.826 (12/2002), from the
// definitions of its clause 5 (events and parameters; numbers from memory):
//
//   - errored block (EB): a block in which one or more bits are in error;
//   - errored second (ES): a one-second period with one or more errored blocks or at least
//     one defect;
//   - severely errored second (SES): a one-second period which contains ≥ 30 % errored
//     blocks or at least one defect;
//   - background block error (BBE): an errored block not occurring as part of an SES;
//   - ESR, SESR: ES and SES as a share of the seconds of available time; BBER: BBE as a
//     share of the blocks of available time, excluding all blocks during SESs;
//   - unavailable time: Annex A (see availability).
//
// A block is N consecutive bits of the capture from its first bit; the line rate must hold a
// whole number of blocks a second, so no block straddles two seconds. A block that holds bits
// not compared (loss of alignment) counts as errored, and its second has a defect. G.826
// detects errored blocks with the path's own error detection code; counting bit errors
// against the known pattern finds every errored block that code could.
type G826 struct {
	Block           int64    `json:"block_bits"`
	BlocksPerSecond int64    `json:"blocks_per_second"`
	Seconds         int64    `json:"seconds"`
	Available       int64    `json:"available_seconds"`
	Unavailable     int64    `json:"unavailable_seconds"`
	ES              int64    `json:"errored_seconds"`
	SES             int64    `json:"severely_errored_seconds"`
	BBE             int64    `json:"background_block_errors"`
	BBEBlocks       int64    `json:"background_blocks"` // blocks of available time outside SES
	ErroredBlocks   int64    `json:"errored_blocks_available"`
	ESR             float64  `json:"esr"`
	SESR            float64  `json:"sesr"`
	BBER            float64  `json:"bber"`
	Periods         []Period `json:"unavailable_periods"`
	Pending         int      `json:"pending_seconds"`

	avail availability
}

func newG826(block, perSecond int64) *G826 {
	g := &G826{Block: block, BlocksPerSecond: perSecond}
	g.avail.emit = g.commit
	return g
}

// ses826: a defect, or 10·EB ≥ 3·blocks (≥ 30 % of the second's blocks errored).
func (g *G826) ses(s second) bool { return s.Defect || 10*s.Errored >= 3*g.BlocksPerSecond }

func (g *G826) add(s second) { g.Seconds++; g.avail.push(s, g.ses(s)) }

func (g *G826) commit(s second, available bool) {
	if !available {
		g.Unavailable++
		return
	}
	g.Available++
	g.ErroredBlocks += s.Errored
	if s.Errored > 0 || s.Defect {
		g.ES++
	}
	if g.ses(s) {
		g.SES++
		return
	}
	g.BBE += s.Errored
	g.BBEBlocks += g.BlocksPerSecond
}

func (g *G826) finish(end int64) {
	g.avail.finish(end)
	g.Periods, g.Pending = g.avail.periods, g.avail.pending
	if g.Periods == nil {
		g.Periods = []Period{}
	}
	if g.Available > 0 {
		g.ESR = float64(g.ES) / float64(g.Available)
		g.SESR = float64(g.SES) / float64(g.Available)
	}
	if g.BBEBlocks > 0 {
		g.BBER = float64(g.BBE) / float64(g.BBEBlocks)
	}
}
