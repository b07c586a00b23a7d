package capture

import "testing"

// Hand-computed cases from the definitions of ITU-T G.821 (12/2002): ES one or more errored
// bits in a second, SES a bit error ratio ≥ 1e-3 in a second, ESR and SESR over available
// time, and Annex A's unavailable time (ten consecutive SES begin it, those ten included;
// ten consecutive non-SES end it, those ten available). Clause numbers from memory.

// seconds builds seconds of 10 000 bits from a string: '.' clean, 'e' one error (ES, BER
// 1e-4), 'S' twenty errors (SES, BER 2e-3), 'b' exactly ten errors (BER 1e-3: SES, the
// threshold is inclusive), 'd' a defect with no error.
func seconds(s string) []second {
	var out []second
	for i, ch := range s {
		sec := second{Index: int64(i), Bits: 10_000}
		switch ch {
		case 'e':
			sec.Errors = 1
		case 'S':
			sec.Errors = 20
		case 'b':
			sec.Errors = 10
		case 'd':
			sec.Defect = true
		}
		out = append(out, sec)
	}
	return out
}

func run821(s string) *G821 {
	g := newG821()
	for _, sec := range seconds(s) {
		g.add(sec)
	}
	g.finish(int64(len(s)))
	return g
}

func TestG821ByHand(t *testing.T) {
	for _, c := range []struct {
		name                             string
		secs                             string
		avail, unavail, es, ses, pending int64
		periods                          []Period
	}{
		// 0–2 clean, 3 ES, 4–8 five SES (too few), 9 clean, 10–21 twelve SES: unavailable from
		// 10; 22–24 clean but 25 SES breaks the run; 26–35 ten non-SES: available again from
		// 26 (26, 27 ES); 36 SES; 37–39 clean. Unavailable 10–25 = 16 s; available 24 s with
		// ES 3, 4–8, 26, 27, 36 = 9 and SES 4–8, 36 = 6.
		{"entry and exit", "...eSSSSS.SSSSSSSSSSSS...See........S...", 24, 16, 9, 6, 0, []Period{{10, 16}}},
		// the threshold is inclusive: BER exactly 1e-3 is severe; a defect is severe too
		{"threshold", "b.d.", 4, 0, 2, 2, 0, []Period{}},
		// ten SES exactly: unavailable, the ten included; the four clean seconds after them
		// are a run shorter than ten when the capture ends, so they stay unavailable
		{"ends unavailable", "SSSSSSSSSS....", 0, 14, 0, 0, 4, []Period{{0, 14}}},
		// nine SES are not enough: they stay available, as severely errored seconds
		{"nine severe", ".....SSSSSSSSS", 14, 0, 9, 9, 9, []Period{}},
		// two periods
		{"two periods", "SSSSSSSSSSSS..........eSSSSSSSSSS..........", 21, 22, 1, 0, 0, []Period{{0, 12}, {23, 10}}},
	} {
		secs := []rune(c.secs)
		s := string(secs)
		g := run821(s)
		if g.Available != c.avail || g.Unavailable != c.unavail || g.ES != c.es || g.SES != c.ses || int64(g.Pending) != c.pending {
			t.Errorf("%s: available %d unavailable %d ES %d SES %d pending %d; want %d %d %d %d %d", c.name,
				g.Available, g.Unavailable, g.ES, g.SES, g.Pending, c.avail, c.unavail, c.es, c.ses, c.pending)
		}
		if len(g.Periods) != len(c.periods) {
			t.Errorf("%s: periods %v, want %v", c.name, g.Periods, c.periods)
			continue
		}
		for i := range c.periods {
			if g.Periods[i] != c.periods[i] {
				t.Errorf("%s: periods %v, want %v", c.name, g.Periods, c.periods)
			}
		}
		if g.Available > 0 && (g.ESR != float64(c.es)/float64(c.avail) || g.SESR != float64(c.ses)/float64(c.avail)) {
			t.Errorf("%s: ESR %v SESR %v", c.name, g.ESR, g.SESR)
		}
	}
}

// G.826 (12/2002) clause 5 by hand, 10 blocks a second: ES one or more errored blocks or a
// defect, SES ≥ 30 % errored blocks or a defect, BBE an errored block outside SES, BBER over
// the blocks of available time outside SES; Annex A as in G.821.
func TestG826ByHand(t *testing.T) {
	run := func(eb []int64, defect map[int]bool) *G826 {
		g := newG826(1000, 10)
		for i, e := range eb {
			g.add(second{Index: int64(i), Bits: 10_000, Errors: e, Errored: e, Defect: defect[i]})
		}
		g.finish(int64(len(eb)))
		return g
	}
	// s1: 2 EB (20 %: ES, not SES); s2: 3 EB (30 %: SES); s3: 1 EB and a defect (SES); s4: 10
	// EB (SES); the rest clean. ES 4, SES 3, BBE 2 (those of s1), background blocks 5 s · 10.
	g := run([]int64{0, 2, 3, 1, 10, 0, 0, 0}, map[int]bool{3: true})
	if g.ES != 4 || g.SES != 3 || g.BBE != 2 || g.BBEBlocks != 50 || g.BBER != 0.04 || g.Unavailable != 0 {
		t.Errorf("G.826 case 1: %+v", g)
	}
	// twelve SES (3 EB each) then ten clean: unavailable 12 s, available 10 s, nothing errored
	eb := make([]int64, 22)
	for i := range 12 {
		eb[i] = 3
	}
	g = run(eb, nil)
	if g.Unavailable != 12 || g.Available != 10 || g.ES != 0 || g.BBE != 0 || len(g.Periods) != 1 || g.Periods[0] != (Period{0, 12}) {
		t.Errorf("G.826 case 2: %+v", g)
	}
}

// The same figures through a generated capture at 10 000 bit/s with 1000-bit blocks.
func TestTimeFiguresFromCapture(t *testing.T) {
	const rate = 10_000
	b := prbsBits(t, 15, 40*rate, true)
	put := func(sec, block, n, spread int) { // n errors in second sec from block on, over spread blocks
		for i := range n {
			p := sec*rate + (block+i%spread)*1000 + 17*(i/spread) + 3
			b[p] ^= 1
		}
	}
	put(2, 4, 5, 1) // 5 errors in one block: ES (BER 5e-4), one EB
	for s := 5; s <= 17; s++ {
		put(s, 0, 15, 5) // BER 1.5e-3: SES; 5 EB of 10: SES
	}
	put(20, 2, 10, 3) // BER exactly 1e-3: SES; 3 EB: SES
	put(33, 7, 3, 1)  // ES, one EB
	c := countBytes(t, pack(b, false), Options{PRBS: 15, Rate: rate, Block: 1000})
	// unavailable from 5 (13 SES); 18, 19 clean, 20 SES breaks the run; 21–30 available again
	g := c.G821
	if g.Seconds != 40 || g.Unavailable != 16 || g.Available != 24 || g.ES != 2 || g.SES != 0 || len(g.Periods) != 1 || g.Periods[0] != (Period{5, 16}) {
		t.Errorf("G.821: %+v", g)
	}
	h := c.G826
	if h.Unavailable != 16 || h.ES != 2 || h.SES != 0 || h.BBE != 2 || h.BBEBlocks != 240 {
		t.Errorf("G.826: %+v", h)
	}
	if c.Blocks != 400 || c.EBlocks != 1+13*5+3+1 {
		t.Errorf("blocks %d errored %d", c.Blocks, c.EBlocks)
	}
	r, err := Analyse(c, 0.95, "", 0)
	if err != nil {
		t.Fatal(err)
	}
	if *r.ErroredSeconds != 2 || *r.SeverelyErrored != 0 || *r.UnavailableSeconds != 16 {
		t.Errorf("report: ES %d SES %d UAS %d", *r.ErroredSeconds, *r.SeverelyErrored, *r.UnavailableSeconds)
	}
}
