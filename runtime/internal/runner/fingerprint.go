package runner

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"hash"
	"io"
	"math"
	"os"
	"reflect"
	goruntime "runtime"
	"slices"
	"strings"
	"sync"

	"tally/blocks/link"
	"tally/blocks/stop"
	"tally/runtime/result"
)

// A point's fingerprint is a digest of everything that decides its frames' counts: the
// program that computes them (this binary), the seed and the point (its index keys the random
// streams, its values the parameters), and the link as built for it — every block in the
// chain, in order, with its type and every field of its value, read by reflection, and the
// link's taps and estimator. Two runs whose points have the same fingerprint compute the same
// counts for every frame, so a later run may reuse the frames of an earlier one, and a what-
// changed report may say "same frames" without a test.
//
// Reflection sees values, not code. What it cannot see into — a block of the script's own
// (link.Func, a type the script defined), a function value (a tap of the script's own), a
// channel — makes the fingerprint depend on the whole script as well (its SHA-256 and the files
// it read): any edit of the script then changes it. Never reuse when unsure.
//
// The stop rules get a fingerprint of their own: a point whose link is unchanged but whose
// rules changed computes the same frames, only more or fewer of them.

// fingerprintVersion changes when what a fingerprint covers changes.
const fingerprintVersion = "tally point fingerprint v1"

// linkFingerprint is the fingerprint of point pt's link l under seed; script is the script's
// hash and the inputs' (mixed in when the link holds anything reflection cannot judge), and
// wholeScript says whether it was.
func linkFingerprint(l *link.Link, pt Point, seed uint64, script string) (fp string, wholeScript bool) {
	f := newPrinter()
	f.str(fingerprintVersion)
	f.str(buildIdentity())
	f.u64(seed)
	f.u64(uint64(pt.Index))
	for i, v := range pt.Values {
		f.str(pt.Names[i])
		f.u64(math.Float64bits(v))
	}
	f.str(strings.Join(l.Taps(), ","))
	f.str(l.Estimator().String())
	for _, b := range l.Blocks() {
		if isCustom(b) {
			f.unsure = true
			f.str("custom " + link.NameOf(b))
			continue
		}
		f.walk(reflect.ValueOf(b))
	}
	// The link's other fields hold its taps of the script's own (functions) and its settings.
	lv := reflect.ValueOf(l).Elem()
	for i := range lv.NumField() {
		if name := lv.Type().Field(i).Name; name != "blocks" && name != "streams" {
			f.str(name)
			f.walk(lv.Field(i))
		}
	}
	if f.unsure {
		f.str(script)
	}
	return f.sum(), f.unsure
}

// rulesFingerprint is the fingerprint of the stop rules with the interval they are judged at.
func rulesFingerprint(rules []stop.Rule, confidence float64, method, script string) string {
	f := newPrinter()
	f.str(fingerprintVersion + " rules")
	f.u64(math.Float64bits(confidence))
	f.str(method)
	for _, r := range rules {
		f.walk(reflect.ValueOf(&r).Elem())
	}
	if f.unsure {
		f.str(script)
	}
	return f.sum()
}

// scriptIdentity is what a fingerprint mixes in when it cannot judge a value: the script's
// bytes and the files it read.
func scriptIdentity(source []byte, inputs []result.Input) string {
	h := sha256.New()
	h.Write(source)
	for _, in := range inputs {
		io.WriteString(h, "\x00"+in.Name+"\x00"+in.SHA256)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// isCustom reports a block that is not one of tally's compiled blocks (as the engine's
// instance check judges it).
func isCustom(b link.Block) bool {
	if _, ok := b.(*link.FuncBlock); ok {
		return true
	}
	t := reflect.TypeOf(b)
	if t == nil {
		return true
	}
	for t.Kind() == reflect.Pointer {
		t = t.Elem()
	}
	return !strings.HasPrefix(t.PkgPath(), "tally/blocks/")
}

type printer struct {
	h      hash.Hash
	seen   map[uintptr]int // pointers met, in order: shared and cyclic structure hashes as such
	unsure bool
	buf    [8]byte
}

func newPrinter() *printer { return &printer{h: sha256.New(), seen: map[uintptr]int{}} }

func (f *printer) sum() string { return hex.EncodeToString(f.h.Sum(nil)[:16]) }

func (f *printer) u64(v uint64) {
	binary.LittleEndian.PutUint64(f.buf[:], v)
	f.h.Write(f.buf[:])
}

func (f *printer) str(s string) {
	f.u64(uint64(len(s)))
	io.WriteString(f.h, s)
}

func typeName(t reflect.Type) string { return t.PkgPath() + "." + t.String() }

// walk hashes v: its kind, its type where it is dynamic, and every value reachable from it.
func (f *printer) walk(v reflect.Value) {
	if !v.IsValid() {
		f.str("invalid")
		return
	}
	f.u64(uint64(v.Kind()))
	switch v.Kind() {
	case reflect.Bool:
		if v.Bool() {
			f.u64(1)
		} else {
			f.u64(0)
		}
	case reflect.Int, reflect.Int8, reflect.Int16, reflect.Int32, reflect.Int64:
		f.u64(uint64(v.Int()))
	case reflect.Uint, reflect.Uint8, reflect.Uint16, reflect.Uint32, reflect.Uint64, reflect.Uintptr:
		f.u64(v.Uint())
	case reflect.Float32, reflect.Float64:
		f.u64(math.Float64bits(v.Float()))
	case reflect.Complex64, reflect.Complex128:
		c := v.Complex()
		f.u64(math.Float64bits(real(c)))
		f.u64(math.Float64bits(imag(c)))
	case reflect.String:
		f.str(v.String())
	case reflect.Interface:
		if v.IsNil() {
			f.str("nil")
			return
		}
		e := v.Elem()
		f.str(typeName(e.Type()))
		if !known(e.Type()) {
			f.unsure = true
			return
		}
		f.walk(e)
	case reflect.Pointer:
		if v.IsNil() {
			f.str("nil")
			return
		}
		p := v.Pointer()
		if k, ok := f.seen[p]; ok {
			f.str("seen")
			f.u64(uint64(k))
			return
		}
		f.seen[p] = len(f.seen)
		f.str(typeName(v.Type()))
		f.walk(v.Elem())
	case reflect.Struct:
		t := v.Type()
		f.str(typeName(t))
		for i := range v.NumField() {
			f.str(t.Field(i).Name)
			f.walk(v.Field(i))
		}
	case reflect.Slice:
		if v.IsNil() {
			f.str("nil")
			return
		}
		fallthrough
	case reflect.Array:
		n := v.Len()
		f.u64(uint64(n))
		switch v.Type().Elem().Kind() {
		case reflect.Uint8:
			if v.Kind() == reflect.Slice {
				f.h.Write(v.Bytes())
				return
			}
		}
		for i := range n {
			f.walk(v.Index(i))
		}
	case reflect.Map:
		if v.IsNil() {
			f.str("nil")
			return
		}
		// Map order is random: each entry is hashed on its own and the entries sorted.
		var entries [][]byte
		it := v.MapRange()
		for it.Next() {
			g := newPrinter()
			g.walk(it.Key())
			g.walk(it.Value())
			f.unsure = f.unsure || g.unsure
			entries = append(entries, g.h.Sum(nil))
		}
		slices.SortFunc(entries, bytes.Compare)
		f.u64(uint64(len(entries)))
		for _, e := range entries {
			f.h.Write(e)
		}
	case reflect.Func:
		if v.IsNil() {
			f.str("nil")
			return
		}
		// A function of tally's blocks named by itself holds no values: its name says what it
		// does. Closures and method values hold values reflection cannot see; a script's
		// function is the script's.
		fn := goruntime.FuncForPC(v.Pointer())
		name := ""
		if fn != nil {
			name = fn.Name()
		}
		if strings.HasPrefix(name, "tally/blocks/") && !strings.Contains(name, ".func") && !strings.HasSuffix(name, "-fm") {
			f.str(name)
			return
		}
		f.unsure = true
	default: // channels, unsafe pointers
		f.unsure = true
	}
}

// known reports a dynamic type whose values reflection judges fully: one of tally's blocks'
// (not link.FuncBlock), a predeclared one, or an unnamed one made of such. A type of the
// script's own is not, nor, to stay on the safe side, any other package's.
func known(t reflect.Type) bool {
	for t.Kind() == reflect.Pointer || t.Kind() == reflect.Slice || t.Kind() == reflect.Array {
		t = t.Elem()
	}
	if t == reflect.TypeFor[link.FuncBlock]() {
		return false
	}
	p := t.PkgPath()
	if p == "" {
		return t.Name() == "" || t.Kind() != reflect.Struct
	}
	return strings.HasPrefix(p, "tally/blocks/")
}

var (
	buildOnce sync.Once
	buildID   string
)

// BuildIdentity is this tally build's identity for fingerprints, handed to a compiled script
// that continues its run (wire.Job.Build): that program is built from the same sources, so
// the frames it computes are this build's and keep this build's fingerprints.
func BuildIdentity() string { return buildIdentity() }

// adoptBuild makes id the build identity of this program, a compiled script continuing a run
// handed over by the tally build id names; before any fingerprint is made.
func adoptBuild(id string) {
	if id != "" {
		buildOnce.Do(func() { buildID = id })
	}
}

// buildIdentity names this program's build: the Go build ID the linker writes near the start
// of the executable (it changes whenever the program's code does), or, where it cannot be
// read, the executable's size and modification time. Counts computed by another build of tally
// are never taken for this one's.
func buildIdentity() string {
	buildOnce.Do(func() {
		buildID = goruntime.Version()
		exe, err := os.Executable()
		if err != nil {
			return
		}
		fh, err := os.Open(exe)
		if err != nil {
			return
		}
		defer fh.Close()
		head := make([]byte, 64<<10)
		n, _ := io.ReadFull(fh, head)
		head = head[:n]
		const mark = "\xff Go build ID: \""
		if i := bytes.Index(head, []byte(mark)); i >= 0 {
			rest := head[i+len(mark):]
			if j := bytes.IndexByte(rest, '"'); j > 0 {
				buildID += " " + string(rest[:j])
				return
			}
		}
		if st, err := fh.Stat(); err == nil {
			buildID += " " + exe + " " + st.ModTime().UTC().String() + " " + string(binary.AppendVarint(nil, st.Size()))
		}
	})
	return buildID
}
