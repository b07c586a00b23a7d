package wire

import (
	"encoding/gob"
	"errors"
	"fmt"
	"os"
	"os/signal"
	"runtime/debug"
)

// MaxStack is a run process's stack limit: endless recursion in a script fails in about a
// second instead of after a gigabyte (the Go default). Interpreted calls are deep, but 32 MiB
// is still tens of thousands of levels of a script's own recursion.
const MaxStack = 32 << 20

// Open is a run process's start, the same for the interpreter's process and a compiled
// script's: it checks the protocol named by EnvChild, takes the pipes (reports on 3, control
// on 4, the log on 5), reads the job, and sets the process up as tally asks (Ctrl-C left to
// the parent, which stops the run by the control pipe; the stack and memory limits). The
// control pipe's decoder is returned for the replies that follow the job.
func Open() (p *Pipes, ctl *gob.Decoder, log *os.File, j Job, err error) {
	if v := os.Getenv(EnvChild); v != Protocol {
		return nil, nil, nil, j, fmt.Errorf("a run of another version (protocol %q, this program %q)", v, Protocol)
	}
	os.Unsetenv(EnvChild) // a trusted script that starts tally starts a parent, not a child
	out, in, log := os.NewFile(3, "reports"), os.NewFile(4, "control"), os.NewFile(5, "log")
	if out == nil || in == nil || log == nil {
		return nil, nil, nil, j, errors.New("started without its pipes")
	}
	// Processes a trusted script starts must not hold the pipes open after this one ends.
	for fd := 3; fd <= 5; fd++ {
		closeOnExec(fd)
	}
	ctl = gob.NewDecoder(in)
	if err := ctl.Decode(&j); err != nil {
		return nil, nil, nil, j, fmt.Errorf("no job: %v", err)
	}
	// A terminal's Ctrl-C reaches the whole group; the parent decides and stops the run.
	signal.Ignore(os.Interrupt)
	debug.SetMaxStack(MaxStack)
	p = NewPipes(out)
	if j.Memory > 0 {
		// The runtime collects harder as the heap nears the limit; WatchMemory ends the run
		// when collecting no longer keeps it below.
		debug.SetMemoryLimit(j.Memory)
		go p.WatchMemory(j.Memory)
	}
	return p, ctl, log, j, nil
}
