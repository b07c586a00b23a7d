package link

import "tally/blocks/rng"

// Block is one box of the block diagram. Process transforms the frame in place, drawing any
// randomness from r, the block's own stream for this frame (keyed by seed, point, frame and the
// block's position; in a paired link, its role: see Roled). It must treat every frame as
// independent (see the package doc).
type Block interface {
	Process(f *Frame, r *rng.Stream) error
}

// Named is implemented by blocks that report a readable name for messages and records.
type Named interface{ Name() string }

// Checked is implemented by blocks whose parameters can be wrong; the link asks before the
// first frame, so a bad parameter stops the run with a message naming block and value.
type Checked interface{ Err() error }

// FuncBlock is a block written as a plain function, for custom blocks in scripts.
type FuncBlock struct {
	Label string
	Fn    func(f *Frame, r *rng.Stream)
	// Shares is the role of the random numbers the block draws in a paired comparison (see
	// Roled); empty: its Label.
	Shares string
}

// Func makes a block of a function; name labels it in messages.
// A script's own block runs interpreted, so expect it to be slower than a compiled one.
func Func(name string, fn func(f *Frame, r *rng.Stream)) *FuncBlock {
	return &FuncBlock{Label: name, Fn: fn}
}

// Process calls the function.
func (b *FuncBlock) Process(f *Frame, r *rng.Stream) error { b.Fn(f, r); return nil }

// Draws gives the block a role in a paired comparison (see Roled and sim's Variants): a
// block of the script's own that adds noise declares Draws("noise"), so a variant that puts it
// where another variant has channel.AWGN draws from the same stream. Without it the block's role is
// its name: variants share its stream when they hold a block of that name.
func (b *FuncBlock) Draws(role string) *FuncBlock { b.Shares = role; return b }

// Role is the role given to Draws, or the block's name.
func (b *FuncBlock) Role() string {
	if b.Shares != "" {
		return b.Shares
	}
	return b.Label
}

// Name is the label given to Func.
func (b *FuncBlock) Name() string { return b.Label }

// NameOf is a block's name for messages: its Name, or its Go type.
func NameOf(b Block) string {
	if n, ok := b.(Named); ok {
		return n.Name()
	}
	return typeName(b)
}
