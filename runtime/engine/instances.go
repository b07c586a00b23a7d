package engine

import (
	"fmt"
	"go/token"
	"hash/fnv"
	"math"
	"reflect"
	"slices"
	"strings"
	"sync"

	"tally/blocks/link"
	"tally/blocks/rng"
)

// Link instances must be independent: every worker builds its own link, and a block that
// shares state with the same block of another link (a buffer declared outside the script's
// Link function, one block object put in every link) makes a frame's counts depend on which
// frames other workers compute at the same moment — a table that differs between worker counts
// with no error. checkInstances looks for that before a point's results are trusted, whatever
// the number of workers (the table would differ at another count):
//
//   - the same block object in two links built for the point is refused outright;
//   - when the link has a block of the script's own (link.Func, or a type defined in the
//     script), frames 0 and 1 are computed alone on one instance (the reference), frame 0
//     once more on it (a block that carries state from frame to frame differs here), then
//     frame 0 on one instance and frame 1 on another with their blocks strictly alternating
//     (deterministic: each block of the one runs between the same block and the next of the
//     other), and finally both at once on free-running goroutines. Any counts or frame
//     contents that differ from the reference refuse the run, naming the first block after
//     which they differ.
//
// tally's compiled blocks are exempt from the frame comparison: each keeps its buffers in its
// own value and draws only from the frame's stream (the contract in package link, held to
// this check by TestBuiltinBlocksPassInstanceCheck), so a link of built-in blocks costs one
// build for the identity check — unless blocks of the two links point to one object a script
// makes (a modem, code or interleaver made outside the Link function): then the comparison
// runs, since an interleaver keeps the permutation of its frame while a modem's tables are
// only read.
func checkInstances(s Spec, first, second *link.Link) error {
	if first.Variants() != nil {
		return checkVariants(s, first, second)
	}
	if err := sameObjects(first, second); err != nil {
		return err
	}
	if !hasCustom(first) && !sharesState(first, second) {
		return nil
	}
	a, err := s.Build()
	if err != nil {
		return err
	}
	b, err := s.Build()
	if err != nil {
		return err
	}
	if len(a.Blocks()) != len(first.Blocks()) || len(b.Blocks()) != len(first.Blocks()) || len(a.Taps()) != len(first.Taps()) {
		return fmt.Errorf("the Link function built links of different lengths for %s: it must build the same link every time", s.name())
	}
	c := checker{s: s, a: a, b: b, taps: len(first.Taps())}
	return c.run()
}

// sameObjects refuses a block object that is in both links.
func sameObjects(a, b *link.Link) error {
	for i, x := range a.Blocks() {
		v := reflect.ValueOf(x)
		if !v.IsValid() || v.Kind() != reflect.Pointer || v.IsNil() {
			continue
		}
		for _, y := range b.Blocks() {
			if w := reflect.ValueOf(y); w.Kind() == reflect.Pointer && w.Pointer() == v.Pointer() {
				return fmt.Errorf("the block %q (block %d of the link) is one object shared by every worker's link, so its buffers are shared: "+
					"make it inside the Link function, so each link gets its own", link.NameOf(x), i+1)
			}
		}
	}
	return nil
}

// sharesState reports whether blocks of the two links hold a pointer to one object: a block
// made from a modem, code or interleaver that the script made once, outside its Link
// function. Such sharing is often harmless (a modem's tables are only read) and sometimes not
// (an interleaver keeps the permutation of the frame it is on), so it makes the frame
// comparison run, which tells the two apart.
func sharesState(a, b *link.Link) bool {
	seen := map[uintptr]bool{}
	for _, x := range a.Blocks() {
		structPointers(reflect.ValueOf(x), 0, seen, nil)
	}
	shared := false
	mark := map[uintptr]bool{}
	for _, y := range b.Blocks() {
		structPointers(reflect.ValueOf(y), 0, mark, func(p uintptr) {
			if seen[p] {
				shared = true
			}
		})
	}
	return shared
}

// structPointers visits the pointers to structs reachable from v through struct fields and
// interfaces, a few levels deep, and reports those below the top (the block itself) to found.
func structPointers(v reflect.Value, depth int, seen map[uintptr]bool, found func(uintptr)) {
	if !v.IsValid() || depth > 4 {
		return
	}
	switch v.Kind() {
	case reflect.Interface:
		structPointers(v.Elem(), depth, seen, found)
	case reflect.Pointer:
		if v.IsNil() || v.Elem().Kind() != reflect.Struct {
			return
		}
		p := v.Pointer()
		if seen[p] {
			return
		}
		seen[p] = true
		// Only objects of exported types count: those a script can make (a modem, a code, an
		// interleaver); a package's own tables (a Galois field's, say) are shared on purpose.
		if depth > 0 && found != nil && token.IsExported(v.Elem().Type().Name()) {
			found(p)
		}
		structPointers(v.Elem(), depth+1, seen, found)
	case reflect.Struct:
		for i := range v.NumField() {
			structPointers(v.Field(i), depth, seen, found)
		}
	}
}

// HasCustom reports whether a link (or a variant of a paired one) has a block of the script's
// own: one the interpreter computes when the script runs interpreted, where a link of tally's
// blocks alone computes at compiled speed either way.
func HasCustom(l *link.Link) bool {
	if vs := l.Variants(); vs != nil {
		for _, v := range vs {
			if HasCustom(v) {
				return true
			}
		}
		return false
	}
	return hasCustom(l)
}

// hasCustom reports whether a link has a block that is not one of tally's compiled blocks.
func hasCustom(l *link.Link) bool {
	for _, b := range l.Blocks() {
		if custom(b) {
			return true
		}
	}
	return false
}

func custom(b link.Block) bool {
	if _, ok := b.(*link.FuncBlock); ok {
		return true
	}
	t := reflect.TypeOf(b)
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	return !strings.HasPrefix(t.PkgPath(), "tally/blocks/")
}

// checker runs the frame comparison of checkInstances.
type checker struct {
	s    Spec
	a, b *link.Link
	taps int
}

// trace is what one frame left: its counts, and a digest of the frame as the next block found
// it after each block (the last after the counting).
type trace struct {
	counts []link.Tally
	after  []uint64
	err    error
}

func (t trace) same(u trace) bool {
	// DeepEqual, not ==: it compiles whatever fields a Tally gains.
	return t.err == nil && u.err == nil && reflect.DeepEqual(t.counts, u.counts) && slices.Equal(t.after, u.after)
}

// firstDiff is the first block after which two traces differ (len(after) for the counts).
func (t trace) firstDiff(u trace) int {
	for k := range min(len(t.after), len(u.after)) {
		if t.after[k] != u.after[k] {
			return k
		}
	}
	return len(t.after)
}

func (c *checker) run() error {
	ref0 := c.alone(c.a, 0)
	ref1 := c.alone(c.a, 1)
	if ref0.err != nil || ref1.err != nil {
		return nil // the run itself reports a failing frame, with its position
	}
	if again := c.alone(c.a, 0); !again.same(ref0) {
		return c.refuse(ref0.firstDiff(again), "gives another result when it computes a frame a second time: it carries state from one frame to the next")
	}
	x, y := c.interleaved()
	if !x.same(ref0) {
		return c.refuse(ref0.firstDiff(x), "gives another result while another link of the same point runs: its state leaks between link instances")
	}
	if !y.same(ref1) {
		return c.refuse(ref1.firstDiff(y), "gives another result while another link of the same point runs: its state leaks between link instances")
	}
	x, y = c.concurrent()
	if !x.same(ref0) || !y.same(ref1) {
		k := ref0.firstDiff(x)
		if x.same(ref0) {
			k = ref1.firstDiff(y)
		}
		return c.refuse(k, "gives another result while another link of the same point runs at the same time: its state leaks between link instances")
	}
	return nil
}

func (c *checker) refuse(k int, what string) error {
	blocks := c.a.Blocks()
	var names []string
	for _, b := range blocks {
		if custom(b) {
			names = append(names, fmt.Sprintf("%q", link.NameOf(b)))
		}
	}
	who, advice := "the link", "Keep every block's buffers and variables inside the Link function, so each link gets its own"
	custAdvice := "Keep its buffers and variables inside the Link function (declared there, not outside it), so each link gets its own"
	switch {
	case k < len(blocks) && custom(blocks[k]):
		who, advice = fmt.Sprintf("the custom block %q", link.NameOf(blocks[k])), custAdvice
	case k < len(blocks):
		who = fmt.Sprintf("the block %q", link.NameOf(blocks[k]))
		advice = "Make it, and the modem, code or interleaver it comes from, inside the Link function, so each link gets its own"
		var before []string
		for _, b := range blocks[:k] {
			if custom(b) {
				before = append(before, fmt.Sprintf("%q", link.NameOf(b)))
			}
		}
		if len(before) > 0 {
			who += " (or the custom block before it: " + strings.Join(before, ", ") + ")"
			advice += "; keep custom blocks' buffers and variables there too"
		}
	case len(names) == 1:
		who, advice = "the custom block "+names[0], custAdvice
	case len(names) > 1:
		who, advice = "one of the custom blocks "+strings.Join(names, ", "), custAdvice
	}
	return fmt.Errorf("%s: %s %s, so the table would depend on the number of workers. %s", c.s.name(), who, what, advice)
}

// alone computes frame index on l by itself.
func (c *checker) alone(l *link.Link, index int) trace {
	g := gates(l, nil, nil)
	defer g.restore()
	return c.frame(l, index, g)
}

// frame runs one frame through l (its blocks gated by g) and traces it.
func (c *checker) frame(l *link.Link, index int, g *gated) (t trace) {
	var f link.Frame
	t.counts = make([]link.Tally, c.taps)
	defer func() {
		if v := recover(); v != nil {
			t.err = fmt.Errorf("panic: %v", v)
		}
		if t.err != nil {
			g.abort() // the other side must not wait for this one
		}
	}()
	t.err = l.Run(&f, c.s.Seed, c.s.Point, index, t.counts)
	t.after = append(g.after, digest(&f))
	return t
}

// interleaved computes frame 0 on a and frame 1 on b with their blocks alternating: a's block
// k, b's block k, a's block k+1, …; each side's digest after block k is taken once the other
// side's block k has run too, so a block that writes another link's buffer is caught at that
// block.
func (c *checker) interleaved() (trace, trace) {
	toA := make(chan struct{}, 1) // a may run its next block
	toB := make(chan struct{}, 1) // b may run its next block
	stop := make(chan struct{})
	var once sync.Once
	abort := func() { once.Do(func() { close(stop) }) }
	wait := func(ch chan struct{}) bool {
		select {
		case <-ch:
			return true
		case <-stop:
			return false
		}
	}
	// a: before block k (k > 0) wait for b's block k−1; after block k hand over to b.
	ga := gates(c.a, func(k int) bool { return k == 0 || wait(toA) }, func(k int) { toB <- struct{}{} })
	// b: before block k wait for a's block k; after block k hand over to a (a's last block
	// waits for b's last: a counts only once b is done).
	gb := gates(c.b, func(k int) bool { return wait(toB) }, func(k int) { toA <- struct{}{} })
	ga.last = func() bool { return wait(toA) }
	ga.onAbort, gb.onAbort = abort, abort
	return c.both(ga, gb)
}

// concurrent computes frame 0 on a and frame 1 on b at the same time, unordered.
func (c *checker) concurrent() (trace, trace) {
	ga, gb := gates(c.a, nil, nil), gates(c.b, nil, nil)
	return c.both(ga, gb)
}

// both computes frame 0 on a and frame 1 on b in two goroutines, each through its gates.
func (c *checker) both(ga, gb *gated) (trace, trace) {
	defer ga.restore()
	defer gb.restore()
	var x, y trace
	var wg sync.WaitGroup
	wg.Add(2)
	go func() { defer wg.Done(); x = c.frame(c.a, 0, ga) }()
	go func() { defer wg.Done(); y = c.frame(c.b, 1, gb) }()
	wg.Wait()
	return x, y
}

// gated holds a link's blocks wrapped so the checker can order them and see the frame between
// them.
type gated struct {
	l       *link.Link
	orig    []link.Block
	after   []uint64       // digest of the frame as block k+1 finds it
	before  func(int) bool // called before block k runs; false aborts the frame
	next    func(int)      // called after block k ran
	last    func() bool    // called after the last block, before the counting
	onAbort func()
	stopped bool
}

// gates wraps the blocks of l in place (the link's own slice: these are the checker's links,
// restored after).
func gates(l *link.Link, before func(int) bool, next func(int)) *gated {
	bs := l.Blocks()
	g := &gated{l: l, orig: slices.Clone(bs), before: before, next: next}
	for k, b := range bs {
		bs[k] = &gate{g: g, k: k, b: b}
	}
	if len(bs) > 0 {
		if _, ok := l.Blocks()[0].(*gate); !ok {
			panic("engine: link.Link.Blocks no longer gives the link's own slice; the instance check cannot order blocks")
		}
	}
	return g
}

func (g *gated) restore() { copy(g.l.Blocks(), g.orig) }

func (g *gated) abort() {
	if g.onAbort != nil {
		g.onAbort()
	}
}

type gate struct {
	g *gated
	k int
	b link.Block
}

type errAborted struct{}

func (errAborted) Error() string { return "the check's other link failed" }

func (t *gate) Process(f *link.Frame, r *rng.Stream) error {
	g := t.g
	if g.before != nil && !g.before(t.k) {
		return errAborted{}
	}
	if t.k > 0 {
		// The frame as this block finds it: after the other side's previous block ran too.
		g.after = append(g.after, digest(f))
	}
	err := t.b.Process(f, r)
	if err == nil && g.next != nil {
		g.next(t.k)
	}
	if err == nil && t.k == len(g.orig)-1 && g.last != nil && !g.last() {
		return errAborted{}
	}
	return err
}

func (t *gate) Name() string { return link.NameOf(t.b) }

// Role is the gated block's: a variant of a paired link keys its streams by it.
func (t *gate) Role() string { return link.RoleOf(t.b) }

// digest is a hash of a frame's signal buffers and scalars.
func digest(f *link.Frame) uint64 {
	h := fnv.New64a()
	var buf [8]byte
	word := func(u uint64) {
		for i := range buf {
			buf[i] = byte(u >> (8 * i))
		}
		h.Write(buf[:])
	}
	bytes := func(b []byte) { word(uint64(len(b))); h.Write(b) }
	floats := func(v []float64) {
		word(uint64(len(v)))
		for _, x := range v {
			word(math.Float64bits(x))
		}
	}
	cplx := func(v []complex128) {
		word(uint64(len(v)))
		for _, x := range v {
			word(math.Float64bits(real(x)))
			word(math.Float64bits(imag(x)))
		}
	}
	bytes(f.Bits)
	bytes(f.Coded)
	cplx(f.Samples)
	word(uint64(f.SPS))
	word(uint64(f.Symbols))
	word(uint64(f.BitsPerSymbol))
	word(math.Float64bits(f.CodeRate))
	word(math.Float64bits(f.Es))
	word(math.Float64bits(f.N0))
	word(math.Float64bits(f.PendingImagSigma))
	cplx(f.Gain)
	floats(f.LLR)
	bytes(f.Hard)
	bytes(f.Out)
	return h.Sum64()
}
