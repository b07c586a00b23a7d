package wire

import (
	"encoding/gob"
	"errors"
	"io"
	"os"
	"runtime/metrics"
	"sync"
	"time"
)

// Pipes is a run process's side of its pipes to tally, the same for the interpreter's process
// and a compiled script's: reports go out one at a time, replies to the reports that await one
// (done, write) come back on Answers.
type Pipes struct {
	mu      sync.Mutex
	out     io.Writer
	enc     *gob.Encoder
	Answers chan Reply
}

// NewPipes sends reports on out.
func NewPipes(out io.Writer) *Pipes {
	return &Pipes{out: out, enc: gob.NewEncoder(out), Answers: make(chan Reply)}
}

// Close closes the report pipe: the parent reads to its end.
func (p *Pipes) Close() error {
	if c, ok := p.out.(io.Closer); ok {
		return c.Close()
	}
	return nil
}

// Send sends one report; a parent that stopped listening ends the process (exit 3).
func (p *Pipes) Send(r Report) {
	p.mu.Lock()
	defer p.mu.Unlock()
	if err := p.enc.Encode(r); err != nil {
		os.Exit(3)
	}
}

// Answer waits for the parent's reply to the last report that awaits one.
func (p *Pipes) Answer() error {
	r := <-p.Answers
	if r.Err != "" {
		return errors.New(r.Err)
	}
	return nil
}

// WatchMemory ends the process (exit 4, after a memory report) when the memory the Go runtime
// holds from the system stays above limit: debug.SetMemoryLimit makes the runtime collect
// harder near the limit, and this ends the run when collecting no longer keeps it below.
func (p *Pipes) WatchMemory(limit int64) {
	s := []metrics.Sample{{Name: "/memory/classes/total:bytes"}, {Name: "/memory/classes/heap/released:bytes"}}
	for {
		time.Sleep(25 * time.Millisecond)
		metrics.Read(s)
		held := int64(s[0].Value.Uint64() - s[1].Value.Uint64())
		if held > limit {
			p.Send(Report{Kind: KindMemory, Bytes: held})
			os.Exit(4)
		}
	}
}
