// Package plots draws a finished run: ber.svg and ber.png beside the table, and a
// constellation scatter for a point's received samples. It reads only the result value
// (tally/runtime/result) and knows nothing of how the run was computed.
//
// The BER figure puts the error rate on a logarithmic axis with a tick per decade against the
// first swept parameter. Every measured point carries its confidence interval as a bar; a
// point with no errors is drawn as its interval's upper bound with a downward triangle, since
// all the run showed is that the rate lies below it. Theory curves are dashed. A second swept
// parameter gives one curve (one colour) per value. The pre-decoder BER of a coded link shares
// the panel, dotted with hollow markers; a second panel shows the frame error rate when the
// link is coded or the run was judged on frames.
package plots
