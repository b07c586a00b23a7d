package capture

// second is what one second of the capture held: capture bits [Index·R, (Index+1)·R).
type second struct {
	Index   int64
	Bits    int64 // compared
	Errors  int64
	Errored int64 // errored blocks (with a block size)
	Defect  bool  // alignment lost, changed or not yet found in this second
}

// clock cuts the capture into seconds at the line rate and hands each whole second to the
// G.821 and G.826 accounting, in order.
type clock struct {
	rate, block int64
	cur         second
	lost        int64 // bits of cur not compared
	lastBlock   int64 // last block counted as errored, −1 none
	g821        *G821
	g826        *G826 // nil without a block size
}

func newClock(rate, block int64) *clock {
	c := &clock{rate: rate, block: block, lastBlock: -1, g821: newG821()}
	if block > 0 {
		c.g826 = newG826(block, rate/block)
	}
	return c
}

func (c *clock) end() int64 { return (c.cur.Index + 1) * c.rate }

// to closes every second that ends at or before capture bit p.
func (c *clock) to(p int64) {
	for p >= c.end() {
		c.close()
	}
}

func (c *clock) close() {
	s := c.cur
	s.Bits = c.rate - c.lost
	c.g821.add(s)
	if c.g826 != nil {
		c.g826.add(s)
	}
	c.cur = second{Index: s.Index + 1}
	c.lost = 0
}

func (c *clock) addError(p int64) {
	c.to(p)
	c.cur.Errors++
	if c.block > 0 {
		if b := p / c.block; b != c.lastBlock {
			c.lastBlock = b
			c.cur.Errored++
		}
	}
}

func (c *clock) addDefect(p int64) { c.to(p); c.cur.Defect = true }

func (c *clock) addLost(p, n int64) {
	for n > 0 {
		c.to(p)
		k := min(n, c.end()-p)
		c.lost += k
		c.cur.Defect = true
		if c.block > 0 {
			first, last := p/c.block, (p+k-1)/c.block
			nb := last - first + 1
			if first == c.lastBlock {
				nb--
			}
			c.cur.Errored += nb
			c.lastBlock = last
		}
		p += k
		n -= k
	}
}

// finish closes the whole seconds of a capture of end bits; the part of a second after the
// last whole one is left out.
func (c *clock) finish(end int64) {
	for c.end() <= end {
		c.close()
	}
	c.g821.finish(c.cur.Index)
	if c.g826 != nil {
		c.g826.finish(c.cur.Index)
	}
}

// blockCount counts errored blocks over the whole capture (without a line rate as well).
type blockCount struct {
	size    int64
	last    int64 // last errored block, −1 none
	errored int64
}

func newBlockCount(size int64) *blockCount { return &blockCount{size: size, last: -1} }

func (b *blockCount) addError(p int64) {
	if k := p / b.size; k != b.last {
		b.last = k
		b.errored++
	}
}

func (b *blockCount) addLost(p, n int64) {
	first, last := p/b.size, (p+n-1)/b.size
	nb := last - first + 1
	if first == b.last {
		nb--
	}
	b.errored += nb
	b.last = last
}

// finish returns the whole blocks and the errored ones among them (a last partial block is
// left out).
func (b *blockCount) finish(end int64) (blocks, errored int64) {
	blocks = end / b.size
	errored = b.errored
	if b.last >= blocks { // errors counted in the partial block
		over := b.last - blocks + 1
		errored -= min(over, errored)
	}
	return blocks, errored
}
