package link

import (
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"math/bits"
)

// Roled is implemented by blocks that draw random numbers, to say what they draw: "source",
// "noise", "fading", "phase noise", "interleaver". In a paired link (Paired) a block's stream
// is keyed by its role and the role's occurrence in the chain (the first "noise", the second
// "noise", …) instead of its position, so two variants that differ by blocks without
// randomness — an equaliser inserted in one, another detector — draw the same bits, noise and
// fades frame by frame.
type Roled interface{ Role() string }

// RoleOf is a block's role: its Role when it declares one, else its name (NameOf). A
// script's own block takes one with link.Func(…).Draws("noise").
func RoleOf(b Block) string {
	if r, ok := b.(Roled); ok && r.Role() != "" {
		return r.Role()
	}
	return NameOf(b)
}

// Paired makes one link of the variants of a design that run on common random numbers: frame
// f of each variant draws its randomness by role (see Roled), keyed by the same seed, point
// and frame, so the variants see the same source bits, the same noise and the same fades.
// names name the variants, the first being the reference every other variant is compared
// with.
//
// The paired link's taps are the reference's taps, then every other variant's taps prefixed
// with its name and "/" ("MRC/ber"), then for every variant after the first the three counts
// of its comparison with the reference, bit by bit, on the BER tap's decisions (see PairTaps):
// bits wrong in the reference only, bits wrong in the variant only, and their sum (which keeps
// the sum of squares per frame the frame-level variance of the difference needs). Variants
// must send the same number of source bits per frame.
func Paired(names []string, variants ...*Link) *Link {
	l := &Link{names: append([]string(nil), names...)}
	for _, v := range variants {
		if v == nil {
			l.variants = append(l.variants, nil)
			continue
		}
		v.byRole = true // its streams keyed by role (roles filled at the first frame)
		l.variants = append(l.variants, v)
	}
	l.frames = make([]Frame, len(variants))
	return l
}

// Variants are the links of a paired link, in the order given to Paired (nil otherwise).
func (l *Link) Variants() []*Link { return l.variants }

// VariantNames are the names given to Paired.
func (l *Link) VariantNames() []string { return l.names }

// The comparison taps of a paired link, per variant after the first: named
// "<variant>/" + PairOnlyRef, PairOnlyVariant and PairDiscordant.
const (
	PairOnlyRef     = "only_ref"     // bits wrong in the reference and right in the variant
	PairOnlyVariant = "only_variant" // bits right in the reference and wrong in the variant
	PairDiscordant  = "discordant"   // their sum, per frame
)

// PairTaps are the names of variant v's comparison taps in a paired link (v ≥ 1).
func PairTaps(name string) [3]string {
	return [3]string{name + "/" + PairOnlyRef, name + "/" + PairOnlyVariant, name + "/" + PairDiscordant}
}

// VariantTap is the name a paired link gives tap of variant v.
func (l *Link) VariantTap(v int, tap string) string {
	if v == 0 {
		return tap
	}
	return l.names[v] + "/" + tap
}

func (l *Link) pairedTaps() []string {
	var t []string
	for v, x := range l.variants {
		for _, name := range x.Taps() {
			t = append(t, l.VariantTap(v, name))
		}
	}
	for v := 1; v < len(l.variants); v++ {
		p := PairTaps(l.names[v])
		t = append(t, p[:]...)
	}
	return t
}

func (l *Link) checkVariants() error {
	if len(l.variants) < 2 || len(l.names) != len(l.variants) {
		return fmt.Errorf("link.Paired: %d variants with %d names: a comparison needs two or more variants, one name each", len(l.variants), len(l.names))
	}
	for v, x := range l.variants {
		if x == nil {
			return fmt.Errorf("link.Paired: variant %q is nil", l.names[v])
		}
		if x.variants != nil {
			return fmt.Errorf("link.Paired: variant %q is itself a paired link", l.names[v])
		}
		if x.est != Count {
			return fmt.Errorf("link.Paired: variant %q has an estimator: a paired comparison counts errors", l.names[v])
		}
		if err := x.Check(); err != nil {
			return fmt.Errorf("%s: %w", l.names[v], err)
		}
	}
	return nil
}

// keyRoles gives each block of a variant its stream's key index: a hash of its role and the
// role's occurrence before it in the chain.
func (l *Link) keyRoles() {
	l.roles = make([]int, len(l.blocks))
	seen := map[string]int{}
	for k, b := range l.blocks {
		role := RoleOf(b)
		n := seen[role]
		seen[role] = n + 1
		h := fnv.New64a()
		fmt.Fprintf(h, "%s\x00%d", role, n)
		l.roles[k] = int(h.Sum64() >> 1) // never a small position index
	}
}

// runPaired runs frame index through every variant (the reference on f, the others on the
// link's own frames) and counts each variant's taps and each comparison.
func (l *Link) runPaired(f *Frame, seed uint64, point, index int, counts []Tally) error {
	at := 0
	for v, x := range l.variants {
		fv := f
		if v > 0 {
			fv = &l.frames[v]
		}
		n := x.tapCount()
		if err := x.Run(fv, seed, point, index, counts[at:at+n]); err != nil {
			return fmt.Errorf("%s: %w", l.names[v], err)
		}
		at += n
	}
	ref := f
	for v := 1; v < len(l.variants); v++ {
		fv := &l.frames[v]
		if len(fv.Bits) != len(ref.Bits) {
			return fmt.Errorf("variant %q sends %d source bits a frame and %q %d: paired variants must send the same bits",
				l.names[v], len(fv.Bits), l.names[0], len(ref.Bits))
		}
		a, b := OnlyWrong(ref.Bits, decided(ref), fv.Bits, decided(fv))
		n := int64(len(ref.Bits))
		counts[at].Trials += n
		counts[at].Errors += a
		counts[at+1].Trials += n
		counts[at+1].Errors += b
		counts[at+2].Trials += n
		counts[at+2].Errors += a + b
		at += 3
	}
	return nil
}

// decided is what the BER tap counts: the decoded bits, or the hard decisions of a link with
// no decoder.
func decided(f *Frame) []byte {
	if f.Out != nil {
		return f.Out
	}
	return f.Hard
}

// OnlyWrong counts, over the positions of two links' frames, the bits wrong in the first only
// (a's decision differs from a's source bit and b's does not) and in the second only; bits
// are one per byte, 0 or 1, and the four slices of equal length. The bits wrong in both or in
// neither cancel in the difference of the two error counts, so only these two carry its
// information: they are McNemar's discordant pairs.
func OnlyWrong(bitsA, outA, bitsB, outB []byte) (onlyA, onlyB int64) {
	n := min(len(bitsA), len(outA), len(bitsB), len(outB))
	var ca, cb int
	i := 0
	for ; i+8 <= n; i += 8 {
		wa := binary.LittleEndian.Uint64(bitsA[i:]) ^ binary.LittleEndian.Uint64(outA[i:])
		wb := binary.LittleEndian.Uint64(bitsB[i:]) ^ binary.LittleEndian.Uint64(outB[i:])
		ca += bits.OnesCount64(wa &^ wb)
		cb += bits.OnesCount64(wb &^ wa)
	}
	for ; i < n; i++ {
		wa, wb := bitsA[i]^outA[i], bitsB[i]^outB[i]
		if wa != 0 && wb == 0 {
			ca++
		}
		if wb != 0 && wa == 0 {
			cb++
		}
	}
	return int64(ca), int64(cb)
}
