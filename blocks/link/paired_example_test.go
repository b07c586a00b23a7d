package link_test

import (
	"fmt"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/rng"
	"tally/blocks/source"
)

// Two variants of one link on common random numbers: the second inserts a block of its own
// before the detector. sim's Variants builds such a paired link for every point; a script
// rarely calls Paired itself.
func ExamplePaired() {
	build := func(extra bool) *link.Link {
		m := modem.QPSK()
		l := link.Chain(source.Random(512), m.Mod(), channel.AWGN(6))
		if extra {
			// A block of the script's own that draws numbers names the role it draws for.
			var clicks link.Block = link.Func("clicks", func(f *link.Frame, r *rng.Stream) {
				for i := range f.Samples {
					if r.Float64() < 0.01 {
						f.Samples[i] = -f.Samples[i]
					}
				}
			}).Draws("impulses")
			l.Add(clicks)
		}
		return l.Add(m.Demod())
	}
	p := link.Paired([]string{"plain", "clicks"}, build(false), build(true))
	fmt.Println(p.Taps())
	counts := make([]link.Tally, len(p.Taps()))
	var f link.Frame
	for i := range 50 {
		p.Run(&f, 1, 0, i, counts)
	}
	// Every error of the plain receiver is made by the other too, on the same noise, unless a
	// click happened to flip it back.
	fmt.Println(counts[4].Errors < counts[5].Errors, counts[0].Errors-counts[2].Errors == counts[4].Errors-counts[5].Errors)
	// Output:
	// [ber fer clicks/ber clicks/fer clicks/only_ref clicks/only_variant clicks/discordant]
	// true true
}
