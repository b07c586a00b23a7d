package capture

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"tally/runtime/lab"
)

// Text is the report as an engineer reads it, one finding a line.
func Text(r *Report) string {
	var b strings.Builder
	p := func(format string, a ...any) { fmt.Fprintf(&b, format+"\n", a...) }
	p("%s: %s bits (%s bytes, %s, %s), SHA-256 %s", r.Capture, grouped(r.CaptureBits), grouped(r.Bytes), r.Format, r.BitOrder, short(r.SHA256))
	lock := fmt.Sprintf("locked at bit %s", grouped(r.LockBit))
	if r.LockBit == 0 {
		lock = "locked from the first bit"
	}
	off := ""
	if r.Offset != nil {
		off = fmt.Sprintf(", reference bit %s under the capture's first bit", grouped(*r.Offset))
	}
	p("pattern: %s, received %s%s%s; %s", r.Pattern, r.Polarity, o150(r), off, lock)
	p("compared %s bits: %s, BER %s", grouped(r.Bits), plural(r.Errors, "error"), g3(r.BER))
	p("%s interval (%s): %s to %s; one-sided upper limit %s", percent(r.Confidence), r.Method, g3(r.Low), g3(r.High), g3(r.Upper))
	if r.Verdict != "" {
		p("against BER %s: %s", g3(r.Spec), r.Verdict)
	}
	switch {
	case r.Slips == 0 && r.LostBits == 0:
		p("alignment: held throughout (no slip, no bit lost)")
	default:
		p("alignment: %s, %s not compared (counted apart from errors)", plural(r.Slips, "slip"), plural(r.LostBits, "bit"))
		for i, s := range r.SlipList {
			if i == 20 {
				p("  … %d more in run.json", len(r.SlipList)-20)
				break
			}
			p("  %s", describeSlip(s, r.Rate))
		}
	}
	if r.BeforeLock > 0 {
		p("before the first lock: %s not compared", plural(r.BeforeLock, "bit"))
	}
	br := r.Bursts
	p("bursts (%s): %s, %d of two or more errors", br.Definition, plural(br.Count, "burst"), br.Multi)
	if br.Count > 0 {
		p("  mean length %s bits (%s errors); longest %s bits with %s at bit %s; most errors %s in %s bits at bit %s",
			g3(br.MeanLength), g3(br.MeanErrors), grouped(br.MaxLength), plural(br.MaxErrors, "error"), grouped(br.MaxStart),
			grouped(br.MostErrors), grouped(br.MostLength), grouped(br.MostStart))
	}
	if br.Gaps > 0 {
		p("  error-free gaps: mean %s bits; %s shorter than the guard, %s if errors were independent at this BER",
			g3(br.MeanGap), pct(br.ShortShare), pct(br.ShortIfIndep))
	}
	p("  %s", dispersionLine(r))
	if g := r.G821; g != nil {
		p("ITU-T G.821 at %s, %s whole seconds: %s available, %s unavailable", rateText(r.Rate), grouped(g.Seconds),
			grouped(g.Available), grouped(g.Unavailable))
		p("  errored seconds %s (ESR %s), severely errored %s (SESR %s; %s by BER ≥ 1e-3, %s by a loss of alignment); BER in available time %s",
			grouped(g.ES), g3(g.ESR), grouped(g.SES), g3(g.SESR), grouped(g.SES-g.SESDefect), grouped(g.SESDefect), g3(ratio(g.Errors, g.Bits)))
		for i, u := range g.Periods {
			if i == 10 {
				p("  … %d more periods in run.json", len(g.Periods)-10)
				break
			}
			p("  unavailable from second %s for %s s", grouped(u.Start), grouped(u.Length))
		}
		if g.Pending > 0 {
			p("  the last %d seconds ended a run shorter than ten: they keep the state they were in", g.Pending)
		}
		if r.LeftOverBits > 0 {
			p("  the %s bits after the last whole second are not in these figures", grouped(r.LeftOverBits))
		}
	}
	if g := r.G826; g != nil {
		p("ITU-T G.826 with %s-bit blocks (%s a second): errored seconds %s (ESR %s), severely errored %s (SESR %s)",
			grouped(g.Block), grouped(g.BlocksPerSecond), grouped(g.ES), g3(g.ESR), grouped(g.SES), g3(g.SESR))
		p("  background block errors %s of %s blocks (BBER %s); %s unavailable seconds", grouped(g.BBE), grouped(g.BBEBlocks),
			g3(g.BBER), grouped(g.Unavailable))
	}
	if r.Block > 0 {
		p("blocks of %s bits: %s errored of %s (%s)", grouped(r.Block), grouped(r.ErroredBlocks), grouped(r.Blocks), g3(r.BlockErrorRatio))
	}
	return b.String()
}

// o150 notes whether the polarity is the one O.150 sends: the 2^15−1, 2^23−1, 2^29−1 and
// 2^31−1 sequences inverted, the others not (as tally/blocks/source; from memory).
func o150(r *Report) string {
	if r.PRBS == 0 {
		return ""
	}
	inv := r.PRBS == 15 || r.PRBS == 23 || r.PRBS == 29 || r.PRBS == 31
	if inv == (r.Polarity == "inverted") {
		return " (as O.150 sends it)"
	}
	return " (O.150 sends it " + map[bool]string{true: "inverted", false: "normal"}[inv] + ": check the transmitter's setting)"
}

func dispersionLine(r *Report) string {
	rows := fmt.Sprintf("%s rows of %s bits", grouped(r.DispersionRows), grouped(r.Interval))
	switch {
	case r.Dispersion == nil:
		return fmt.Sprintf("index of dispersion: not judged over %s (it needs two rows and an error)", rows)
	case r.Clustered:
		return fmt.Sprintf("index of dispersion over %s: %s — errors come in clusters, so the binomial interval (%s to %s) is too narrow by about √D = %s; the interval and limits above are widened by Kish's effective sample size",
			rows, g3(*r.Dispersion), g3(r.PlainLow), g3(r.PlainHigh), g3(math.Sqrt(*r.Dispersion)))
	}
	return fmt.Sprintf("index of dispersion over %s: %s — consistent with independent errors, so the binomial interval stands",
		rows, g3(*r.Dispersion))
}

func describeSlip(s Slip, rate int64) string {
	at := "bit " + grouped(s.Bit)
	if s.Spread > 0 { // the bits there fit both alignments
		at = fmt.Sprintf("bits %s–%s", grouped(s.Bit), grouped(s.Bit+s.Spread))
	}
	if rate > 0 {
		at += fmt.Sprintf(", %s s", g4(float64(s.Bit)/float64(rate)))
	}
	var what string
	switch {
	case !s.Regained:
		what = "alignment lost, not regained before the end"
	case !s.Known:
		what = "alignment lost, regained at an unknown shift"
	case s.Shift == 1:
		what = "slip +1 (a bit missing from the capture)"
	case s.Shift == -1:
		what = "slip −1 (a bit repeated in the capture)"
	case s.Shift > 0:
		what = fmt.Sprintf("slip +%d (bits missing from the capture)", s.Shift)
	case s.Shift < 0:
		what = fmt.Sprintf("slip −%d (bits repeated in the capture)", -s.Shift)
	default:
		what = "same alignment"
	}
	if s.Polarity {
		what += ", polarity changed to " + map[bool]string{false: "normal", true: "inverted"}[s.Inverted]
	}
	if s.Lost > 0 {
		what += fmt.Sprintf(", %s not compared", plural(s.Lost, "bit"))
	}
	return at + ": " + what
}

// grouped writes a whole number with thin groups of three digits: 2 995 732 273 554.
func grouped(n int64) string {
	s := strconv.FormatInt(n, 10)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	if neg {
		b.WriteString("−")
	}
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteByte(' ')
		}
		b.WriteRune(r)
	}
	return b.String()
}

func plural(n int64, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return grouped(n) + " " + noun + "s"
}

func g3(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }
func g4(v float64) string { return strconv.FormatFloat(v, 'g', 4, 64) }

func pct(v float64) string { return strconv.FormatFloat(100*v, 'g', 3, 64) + " %" }

// percent writes a confidence as tally interval does (lab.Percent): 95 %, 99.9 %.
func percent(c float64) string { return lab.Percent(c) }

func short(h string) string {
	if len(h) > 16 {
		return h[:16] + "…"
	}
	return h
}

func ratio(k, n int64) float64 {
	if n == 0 {
		return 0
	}
	return float64(k) / float64(n)
}

// rateText writes a line rate in the trade's units: 10 Gbit/s, 2.048 Mbit/s.
func rateText(r int64) string {
	v := float64(r)
	for _, u := range []struct {
		scale float64
		name  string
	}{{1e12, "Tbit/s"}, {1e9, "Gbit/s"}, {1e6, "Mbit/s"}, {1e3, "kbit/s"}} {
		if v >= u.scale {
			return g4(v/u.scale) + " " + u.name
		}
	}
	return g4(v) + " bit/s"
}
