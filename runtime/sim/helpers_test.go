package sim

import (
	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/runtime/internal/runner"
	"tally/runtime/result"
)

// progressLink is uncoded BPSK over AWGN in 512-bit frames.
func progressLink(p Point) *link.Link {
	m := modem.BPSK()
	return link.Chain(source.Random(512), m.Mod(), channel.AWGN(p.Get("ebn0_db")), m.Demod())
}

// testExperiment is an experiment bound to options, as the host binds a script's sim.New.
func testExperiment(name string, o *runner.Options) *Experiment { return newExperiment(name, o) }

// execute runs x without writing its outputs.
func (x *Experiment) execute() (*result.Run, error) { return runner.Execute(&x.spec, x.opts) }
