package sim

import (
	"fmt"
	"strings"

	"tally/blocks/channel"
	"tally/blocks/link"
	"tally/blocks/modem"
	"tally/blocks/source"
	"tally/blocks/stop"
	"tally/blocks/theory"
	"tally/runtime/internal/runner"
	"tally/runtime/output"
	"tally/runtime/result"
)

// quick is an experiment bound to quiet options with one worker, as the host binds a script's
// sim.New, for the examples.
func quick(name string) *Experiment {
	return testExperiment(name, &runner.Options{Quiet: true, Workers: 1})
}

// executeTyped settles the typed declarations as Run does and runs x without writing outputs.
func (x *Experiment) executeTyped() (*result.Run, error) {
	x.settle()
	return x.execute()
}

// header is the first line of the run's table.csv.
func header(r *result.Run) string {
	return strings.SplitN(string(output.Table(r)), "\n", 2)[0]
}

func ExampleExperiment_Axis() {
	x := quick("BPSK over AWGN")
	ebn0 := x.Axis("ebn0_db", 0, 2, 4) // the x axis, read at a point with ebn0.At(p)
	x.Link(func(p Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	})
	x.Stop(stop.Bits(2048))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(header(r))
	fmt.Println(len(r.Points), "points")
	// Output:
	// ebn0_db,ber_trials,ber_errors,ber,ber_low,ber_high,stop,fer_trials,fer_errors,fer,fer_low,fer_high
	// 3 points
}

func ExampleExperiment_Choices() {
	x := quick("two modems")
	ebn0 := x.Axis("ebn0_db", 4)
	mod := x.Choices("modem", "BPSK", "QPSK") // read with mod.At(p): "BPSK" or "QPSK"
	x.Link(func(p Point) *link.Link {
		m := modem.BPSK()
		if mod.At(p) == "QPSK" {
			m = modem.QPSK()
		}
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	})
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range r.Points {
		fmt.Println(r.Value(p, 0), r.Value(p, 1))
	}
	// Output:
	// 4 BPSK
	// 4 QPSK
}

// Each curve is declared once, with its link and its theory; the target compares each with
// its own theory. Gray QPSK has BPSK's bit error rate (Proakis, Digital Communications, 4th
// ed., 2001, eq. 5.2-58, from memory), so both cross 1e-2 near 4.3 dB, theory.EbN0For's
// answer, and the penalties are small.
func ExampleExperiment_Curve() {
	x := quick("BPSK and QPSK")
	ebn0 := x.Axis("ebn0_db", 2, 3, 4, 5, 6)
	over := func(m *modem.Modem) func(p Point) *link.Link {
		return func(p Point) *link.Link {
			return link.Chain(source.Random(4096), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
		}
	}
	x.Legend("modem")
	x.Curve("BPSK", over(modem.BPSK())).Theory(theory.BPSK)
	x.Curve("QPSK", over(modem.QPSK())).Theory(theory.QPSK)
	x.Stop(stop.Errors(400), stop.Bits(1e6))
	x.Target(1e-2)
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(header(r))
	fmt.Printf("theory: %.1f dB\n", theory.EbN0For(1e-2, theory.BPSK))
	for _, t := range r.Targets {
		fmt.Printf("%s: against %s, |penalty| < 0.3 dB: %v\n", t.Curve, t.Against, t.Penalty > -0.3 && t.Penalty < 0.3)
	}
	// Output:
	// ebn0_db,modem,ber_trials,ber_errors,ber,ber_low,ber_high,stop,fer_trials,fer_errors,fer,fer_low,fer_high,theory_theory
	// theory: 4.3 dB
	// modem=BPSK: against theory, |penalty| < 0.3 dB: true
	// modem=QPSK: against theory, |penalty| < 0.3 dB: true
}

// A curve's theory is any function of the x value; theory.PSKCurve(8) fixes PSK's order. At
// 10 dB, Gray 8-PSK's BER is about (2/3)·Q(√(6·Eb/N0)·sin(π/8)) = 1.0e-3 (Proakis, Digital
// Communications, 4th ed., 2001, eq. 5.2-61 with Pb ≈ Ps/log2 M; from memory).
func ExampleCurve_Theory() {
	x := quick("8-PSK")
	ebn0 := x.Axis("ebn0_db", 10)
	x.Curve("8-PSK", func(p Point) *link.Link {
		m := modem.PSK(8)
		return link.Chain(source.Random(3072), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}).Theory(theory.PSKCurve(8))
	x.Stop(stop.Bits(3072))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s = %.3g\n", r.Theory[0], r.Points[0].Theory[0])
	// Output: theory = 0.00101
}

// A curve's theory can be a limit no link beats on a tap: the normal approximation on the
// frame error rate of a code, say. It is recorded as a limit of that tap.
func ExampleCurve_Limit() {
	x := quick("limit")
	ebn0 := x.Axis("ebn0_db", 2)
	x.TheoryName("normal_approx")
	x.Curve("uncoded", func(p Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}).Limit(link.TapFER, theory.NormalApproxCurve(1024, 1024))
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Limits[0].Tap, r.Limits[0].Curve)
	// Output: fer normal_approx
}

// A curve's Scatter chooses the point of the constellation plot by the curve itself.
func ExampleCurve_Scatter() {
	x := quick("scatter")
	ebn0 := x.Axis("ebn0_db", 4, 8)
	over := func(m *modem.Modem) func(p Point) *link.Link {
		return func(p Point) *link.Link {
			return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
		}
	}
	x.Curve("BPSK", over(modem.BPSK()))
	x.Curve("16-QAM", over(modem.QAM(16))).Scatter(8)
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Scatter.Label, len(r.Scatter.Received), "symbols")
	// Output: ebn0_db=8 curve=16-QAM 256 symbols
}

// Legend names the curves' column and TheoryName their theory's; Reference adds a curve drawn
// for all alike (not compared by a target).
func ExampleExperiment_Reference() {
	x := quick("names")
	ebn0 := x.Axis("ebn0_db", 6)
	x.Reference("awgn", theory.QPSK)
	x.Legend("speed").TheoryName("rayleigh")
	x.Curve("walking", func(p Point) *link.Link {
		m := modem.QPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.Rayleigh(), channel.AWGN(ebn0.At(p)), channel.KnownGain(), m.Demod())
	}).Theory(theory.QPSKRayleigh)
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(header(r))
	// Output: ebn0_db,speed,ber_trials,ber_errors,ber,ber_low,ber_high,stop,fer_trials,fer_errors,fer,fer_low,fer_high,theory_awgn,theory_rayleigh
}

func ExampleExperiment_Legend() {
	x := quick("legend")
	ebn0 := x.Axis("ebn0_db", 6)
	x.Legend("modem")
	x.Curve("BPSK", func(p Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	})
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Params)
	// Output: [ebn0_db modem]
}

// A theory that depends on another axis than the x axis reads the whole point.
func ExampleCurve_TheoryAt() {
	x := quick("order")
	ebn0 := x.Axis("ebn0_db", 10)
	order := x.Axis("order", 4, 16)
	x.Curve("QAM", func(p Point) *link.Link {
		m := modem.QAM(order.Int(p))
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}).TheoryAt(func(p Point) float64 { return theory.QAM(order.Int(p), ebn0.At(p)) })
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range r.Points {
		fmt.Printf("%s-QAM: %.2e\n", r.Value(p, 1), p.Theory[0])
	}
	// Output:
	// 4-QAM: 3.87e-06
	// 16-QAM: 1.75e-03
}

func ExampleAxis_Int() {
	x := quick("converter")
	bits := x.Axis("adc_bits", 3, 4)
	fmt.Println(bits.Name(), bits.Int(Point{Names: []string{"adc_bits"}, Values: []float64{4}}))
	// Output: adc_bits 4
}

func ExampleChoice_Index() {
	x := quick("choices")
	x.Axis("ebn0_db", 4)
	mod := x.Choices("modem", "BPSK", "QPSK", "8-PSK")
	p := Point{Names: []string{"ebn0_db", "modem"}, Values: []float64{4, 2},
		labels: [][]string{nil, {"BPSK", "QPSK", "8-PSK"}}}
	fmt.Println(mod.Name(), mod.Index(p), mod.At(p))
	// Output: modem 2 8-PSK
}

func ExampleExperiment_TheoryName() {
	x := quick("theory name")
	ebn0 := x.Axis("ebn0_db", 4)
	x.TheoryName("coherent")
	c := x.Curve("BPSK", func(p Point) *link.Link {
		m := modem.BPSK()
		return link.Chain(source.Random(1024), m.Mod(), channel.AWGN(ebn0.At(p)), m.Demod())
	}).Theory(theory.BPSK)
	x.Stop(stop.Bits(1024))
	r, err := x.executeTyped()
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(c.Name(), r.Theory)
	// Output: BPSK [coherent]
}
