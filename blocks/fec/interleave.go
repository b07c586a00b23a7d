package fec

import (
	"fmt"

	"tally/blocks/internal/limit"
	"tally/blocks/link"
	"tally/blocks/rng"
)

// Interleaver permutes the coded bits of a frame so that a burst of channel errors reaches the
// decoder spread out. Interleave sends y_i = x_perm(i); Deinterleave undoes it.
//
// The block interleaver writes a rows × cols array row by row and reads it column by column:
// units that were adjacent leave cols apart (common practice, no source). A frame must be a
// multiple of rows·cols units; each array is permuted on its own. The random interleaver draws a
// uniform permutation of the whole frame for every frame (Fisher–Yates shuffle on the
// interleaving block's own stream), so a run stays deterministic and no fixed pattern favours
// some error bursts.
//
// A unit is one bit, or Group bits kept together: Group(8) interleaves the bytes of a
// Reed–Solomon code, so that a burst of inner-decoder errors lands as few byte errors in
// several codewords rather than as many in one (rows = codewords per frame, cols = n).
//
// Deinterleave works on the frame it finds: right after the demodulator it permutes f.Hard and
// f.LLR back and restores f.Coded to the interleaver's input (the pre-FEC count is unchanged);
// after a decoder (f.Out set, an outer interleaver) it permutes f.Out back. It uses the
// permutation its Interleaver drew for this very frame, so both blocks must come from the same
// Interleaver in the same link.
type Interleaver struct {
	Rows, Cols int  // block interleaver shape in units; 0 for the random interleaver
	Random     bool // a new uniform permutation every frame
	Unit       int  // bits per unit, 1 by default

	perm  []int32 // y[i] = x[perm[i]]
	point int     // the frame perm was made for
	index int
	ready bool
	name  string
	err   error
}

// BlockInterleaver is the rows × cols block interleaver.
func BlockInterleaver(rows, cols int) *Interleaver {
	il := &Interleaver{Rows: rows, Cols: cols, Unit: 1, name: fmt.Sprintf("fec.BlockInterleaver(%d, %d)", rows, cols)}
	switch {
	case rows < 1 || cols < 1:
		il.err = fmt.Errorf("%s: rows = %d and cols = %d must be at least 1", il.name, rows, cols)
	case rows > limit.FrameBits || cols > limit.FrameBits || rows*cols > limit.FrameBits:
		il.err = fmt.Errorf("%s: rows × cols = %d × %d bits is above the frame limit of %d (2^22)", il.name, rows, cols, limit.FrameBits)
	}
	return il
}

// RandomInterleaver is the interleaver with a uniform random permutation per frame.
func RandomInterleaver() *Interleaver {
	return &Interleaver{Random: true, Unit: 1, name: "fec.RandomInterleaver"}
}

// Group makes the interleaver move groups of bits bits as units (8 for bytes).
func (il *Interleaver) Group(bits int) *Interleaver {
	il.Unit = bits
	if bits < 1 && il.err == nil {
		il.err = fmt.Errorf("%s: Group(%d) must be at least 1 bit", il.name, bits)
	}
	return il
}

// Err reports a bad shape.
func (il *Interleaver) Err() error { return il.err }

// Interleave is the block that permutes f.Coded.
func (il *Interleaver) Interleave() *Interleave { return &Interleave{il: il} }

// Deinterleave is the block that undoes Interleave.
func (il *Interleaver) Deinterleave() *Deinterleave { return &Deinterleave{il: il} }

// permutation makes the permutation for a frame of n bits.
func (il *Interleaver) permutation(n int, r *rng.Stream) error {
	g := max(il.Unit, 1)
	if err := multiple(n, g, "bits"); err != nil {
		return err
	}
	units := n / g
	if il.Random {
		il.perm = growInts(il.perm, n)
		p := il.perm[:units] // a permutation of units, spread to bits below
		for i := range p {
			p[i] = int32(i)
		}
		for i := units - 1; i > 0; i-- {
			j := r.IntN(i + 1)
			p[i], p[j] = p[j], p[i]
		}
		il.spread(units, g)
		return nil
	}
	size := il.Rows * il.Cols
	if err := multiple(units, size, "units"); err != nil {
		return err
	}
	if len(il.perm) == n {
		return nil // same shape as the last frame
	}
	il.perm = growInts(il.perm, n)
	for b := 0; b < units; b += size {
		for i := 0; i < size; i++ {
			c, row := i/il.Rows, i%il.Rows // read column by column
			il.perm[b+i] = int32(b + row*il.Cols + c)
		}
	}
	il.spread(units, g)
	return nil
}

// spread turns the unit permutation in perm[:units] into a bit permutation of units·g bits.
func (il *Interleaver) spread(units, g int) {
	if g == 1 {
		return
	}
	p := il.perm
	for u := units - 1; u >= 0; u-- { // from the end, so no unit entry is overwritten early
		src := int(p[u]) * g
		for k := g - 1; k >= 0; k-- {
			p[u*g+k] = int32(src + k)
		}
	}
}

// Interleave is the interleaving block.
type Interleave struct {
	il  *Interleaver
	out []byte
}

// Name names the block in messages.
func (b *Interleave) Name() string { return b.il.name + " interleave" }

// Err reports a bad shape.
func (b *Interleave) Err() error { return b.il.err }

// Process permutes f.Coded.
func (b *Interleave) Process(f *link.Frame, r *rng.Stream) error {
	il := b.il
	il.ready = false
	if len(f.Coded) == 0 {
		return fmt.Errorf("empty frame")
	}
	if err := il.permutation(len(f.Coded), r); err != nil {
		return err
	}
	il.point, il.index, il.ready = f.Point, f.Index, true
	b.out = link.GrowBytes(b.out, len(f.Coded))
	for i, j := range il.perm {
		b.out[i] = f.Coded[j]
	}
	f.Coded = b.out
	return nil
}

// Deinterleave is the deinterleaving block.
type Deinterleave struct {
	il         *Interleaver
	coded, out []byte
	hard       []byte
	llr        []float64
}

// Name names the block in messages.
func (b *Deinterleave) Name() string { return b.il.name + " deinterleave" }

// Err reports a bad shape.
func (b *Deinterleave) Err() error { return b.il.err }

// Process permutes the frame's decisions back.
func (b *Deinterleave) Process(f *link.Frame, _ *rng.Stream) error {
	il := b.il
	if !il.ready || il.point != f.Point || il.index != f.Index {
		return fmt.Errorf("its interleaver did not run on this frame (use Interleave and Deinterleave of one Interleaver in one link)")
	}
	perm := il.perm
	n := len(perm)
	if f.Out != nil {
		if len(f.Out) != n {
			return fmt.Errorf("%d decoded bits for an interleaver of %d", len(f.Out), n)
		}
		b.out = link.GrowBytes(b.out, n)
		for i, j := range perm {
			b.out[j] = f.Out[i]
		}
		f.Out = b.out
		return nil
	}
	if len(f.Hard) != n || len(f.Coded) != n {
		return fmt.Errorf("%d decisions and %d coded bits for an interleaver of %d", len(f.Hard), len(f.Coded), n)
	}
	b.hard = link.GrowBytes(b.hard, n)
	b.coded = link.GrowBytes(b.coded, n)
	for i, j := range perm {
		b.hard[j] = f.Hard[i]
		b.coded[j] = f.Coded[i]
	}
	f.Hard, f.Coded = b.hard, b.coded
	if len(f.LLR) > 0 {
		if len(f.LLR) != n {
			return fmt.Errorf("%d LLRs for an interleaver of %d", len(f.LLR), n)
		}
		b.llr = link.GrowFloats(b.llr, n)
		for i, j := range perm {
			b.llr[j] = f.LLR[i]
		}
		f.LLR = b.llr
	}
	return nil
}
