package link

import (
	"encoding/binary"
	"fmt"
	"math/bits"
	"reflect"

	"tally/blocks/rng"
)

// Tally is what a tap counted: trials (bits or frames) and the errors among them. A sum of
// frames also keeps the number of frames and the sum of the squares of their error counts, so
// the spread of errors between frames (bursts) can be judged without keeping any frame.
//
// A link run with an estimator (see Link.Estimate) also sums weights: Weight is Σ over the
// decisions of w·[decision wrong] (importance sampling: w the decision's likelihood ratio) or
// of the probability that the decision is wrong (semi-analytic), so Weight/Trials estimates
// the rate; Errors then counts the decisions wrong in the simulated (biased or noise-free)
// signal. WeightSquares is Σ w²·[wrong] (the same Σ P² when semi-analytic), for the effective
// sample size, and FrameWeights Σ over frames of (the frame's Weight)², for the variance
// between frames (stats.Weighted).
type Tally struct {
	Trials  int64
	Errors  int64
	Frames  int64 // frames summed (0 in one frame's own counts)
	Squares int64 // Σ over frames of (errors in the frame)²

	Estimator     Estimator // Count (0) for plain counting
	Weight        float64   // Σ weighted error indicators
	WeightSquares float64   // Σ squared weighted error indicators
	FrameWeights  float64   // Σ over frames of (frame's Weight)²
}

// Add sums one frame's counts into t. The float sums are added in the order frames are
// committed, so they are the same bits for any number of workers.
func (t *Tally) Add(frame Tally) {
	t.Trials += frame.Trials
	t.Errors += frame.Errors
	t.Frames++
	t.Squares += frame.Errors * frame.Errors
	if frame.Estimator != Count {
		t.Estimator = frame.Estimator
		t.Weight += frame.Weight
		t.WeightSquares += frame.WeightSquares
		t.FrameWeights += frame.Weight * frame.Weight
	}
}

// Tap names. Every link counts TapBER (decoded bits against source bits) and TapFER (frames
// with any decoded bit wrong); a link with a coder also counts TapPre (the demodulator's hard
// decisions against the coded bits, the pre-FEC BER).
const (
	TapBER = "ber"
	TapFER = "fer"
	TapPre = "pre"
)

// Coder is implemented by blocks that change the code rate (encoders, puncturers). A link
// that holds one counts the pre-FEC tap too.
type Coder interface{ Rate() float64 }

// Counter is a user-defined tap: it returns the trials and errors of one frame.
type Counter func(f *Frame) (trials, errors int64)

// Link is the chain of blocks of one sweep point, plus its taps. The engine builds one per
// worker; Run processes one frame through it.
type Link struct {
	blocks  []Block
	streams []rng.Stream
	taps    []string
	extra   []Counter
	coded   bool
	est     Estimator

	// A paired link (Paired) runs its variants on the same frame; a variant keys its blocks'
	// streams by role (roles, see paired.go) instead of by position.
	variants []*Link
	names    []string
	frames   []Frame
	byRole   bool
	roles    []int
}

// Chain makes a link of blocks in the order the signal passes them. A block with wrong
// parameters stops the script at this line (see Add).
func Chain(blocks ...Block) *Link {
	l := &Link{}
	l.Add(blocks...)
	return l
}

// Add appends blocks to the end of the link and returns it. A block whose parameters are
// wrong (its Err is not nil) stops the script here, at the line that built the link, with the
// block's message; Go code that wants the error instead calls Check on a link it built itself.
func (l *Link) Add(blocks ...Block) *Link {
	for _, b := range blocks {
		if c, ok := b.(Checked); ok && b != nil {
			if err := c.Err(); err != nil {
				panic(err)
			}
		}
		if c, ok := b.(Coder); ok && c.Rate() != 1 {
			l.coded = true
		}
		l.blocks = append(l.blocks, b)
	}
	return l
}

// Count adds a tap of the script's own (a symbol error rate, say) under name.
func (l *Link) Count(name string, c Counter) *Link {
	l.taps = append(l.taps, name)
	l.extra = append(l.extra, c)
	return l
}

// Blocks are the link's blocks in order.
func (l *Link) Blocks() []Block { return l.blocks }

// Taps are the names of what the link counts, in the order Run reports them.
func (l *Link) Taps() []string {
	if l.variants != nil {
		return l.pairedTaps()
	}
	t := []string{TapBER, TapFER}
	if l.coded {
		t = append(t, TapPre)
	}
	return append(t, l.taps...)
}

// tapCount is len(l.Taps()) without building the names (a paired link asks it every frame).
func (l *Link) tapCount() int {
	if l.variants != nil {
		n := 0
		for _, v := range l.variants {
			n += v.tapCount()
		}
		return n + 3*(len(l.variants)-1)
	}
	n := 2 + len(l.taps)
	if l.coded {
		n++
	}
	return n
}

// Check reports the first block whose parameters are wrong, or a link that cannot count.
func (l *Link) Check() error {
	if l.variants != nil {
		return l.checkVariants()
	}
	if len(l.blocks) == 0 {
		return fmt.Errorf("link: no blocks")
	}
	for i, b := range l.blocks {
		if b == nil {
			return fmt.Errorf("link: block %d is nil", i+1)
		}
		if c, ok := b.(Checked); ok {
			if err := c.Err(); err != nil {
				return err
			}
		}
	}
	return nil
}

// Run passes frame index of point through the link with streams keyed by seed, and adds what
// every tap counted to counts (one Tally per name of Taps). f's buffers are reused.
func (l *Link) Run(f *Frame, seed uint64, point, index int, counts []Tally) error {
	if l.variants != nil {
		return l.runPaired(f, seed, point, index, counts)
	}
	if len(l.streams) != len(l.blocks) {
		l.streams = make([]rng.Stream, len(l.blocks))
	}
	if l.byRole && len(l.roles) != len(l.blocks) {
		l.keyRoles()
	}
	*f = Frame{Point: point, Index: index, SPS: 1, CodeRate: 1, Es: 1, Estimator: l.est}
	for k, b := range l.blocks {
		s := &l.streams[k]
		if !l.byRole {
			s.Reset(rng.Key(seed, point, index, k))
		} else {
			s.Reset(rng.Key(seed, point, index, l.roles[k]))
		}
		if err := b.Process(f, s); err != nil {
			return fmt.Errorf("%s: %w", NameOf(b), err)
		}
		if l.byRole {
			f.notePending(s.Key())
		}
	}
	out := f.Out
	if out == nil {
		out = f.Hard
	}
	if len(out) != len(f.Bits) {
		return fmt.Errorf("link: %d decided bits for %d source bits (is a demodulator or decoder missing?)", len(out), len(f.Bits))
	}
	e := CountErrors(f.Bits, out)
	counts[0].Trials += int64(len(f.Bits))
	counts[0].Errors += e
	counts[1].Trials++
	if e > 0 {
		counts[1].Errors++
	}
	if l.est != Count {
		if err := l.weigh(f, out, &counts[0], &counts[1]); err != nil {
			return err
		}
	}
	i := 2
	if l.coded {
		if len(f.Hard) != len(f.Coded) {
			return fmt.Errorf("link: %d hard decisions for %d coded bits", len(f.Hard), len(f.Coded))
		}
		counts[2].Trials += int64(len(f.Coded))
		counts[2].Errors += CountErrors(f.Coded, f.Hard)
		i = 3
	}
	for j, c := range l.extra {
		n, e := c(f)
		counts[i+j].Trials += n
		counts[i+j].Errors += e
	}
	return nil
}

// CountErrors counts the positions where two equal-length bit slices (one bit per byte, 0 or
// 1) differ: the bytes are XORed eight at a time and the set bits counted, four words per
// step so the counts overlap.
func CountErrors(a, b []byte) int64 {
	n := min(len(a), len(b))
	a, b = a[:n], b[:n]
	var e0, e1, e2, e3 int
	i := 0
	for ; i+32 <= n; i += 32 {
		x, y := a[i:i+32:i+32], b[i:i+32:i+32]
		e0 += bits.OnesCount64(binary.LittleEndian.Uint64(x[0:]) ^ binary.LittleEndian.Uint64(y[0:]))
		e1 += bits.OnesCount64(binary.LittleEndian.Uint64(x[8:]) ^ binary.LittleEndian.Uint64(y[8:]))
		e2 += bits.OnesCount64(binary.LittleEndian.Uint64(x[16:]) ^ binary.LittleEndian.Uint64(y[16:]))
		e3 += bits.OnesCount64(binary.LittleEndian.Uint64(x[24:]) ^ binary.LittleEndian.Uint64(y[24:]))
	}
	for ; i+8 <= n; i += 8 {
		e0 += bits.OnesCount64(binary.LittleEndian.Uint64(a[i:]) ^ binary.LittleEndian.Uint64(b[i:]))
	}
	for ; i < n; i++ {
		if a[i] != b[i] {
			e0++
		}
	}
	return int64(e0 + e1 + e2 + e3)
}

func typeName(b Block) string {
	t := reflect.TypeOf(b)
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	return t.String()
}
