// Package capture counts bit errors in a lab capture: bits received by a receiver, an FPGA or
// a software radio while the far end sent a known pattern, either an ITU-T O.150 PRBS or a
// reference file. It is the engine of tally count.
//
// The capture is read as a stream of 64-bit words (format.go), compared word by word with the
// expected pattern (prbs.go, reference.go), and the comparison is watched for loss of
// alignment: when the errors over a window pass a threshold the counter searches for the
// pattern again, finds where the alignment changed and by how many bits (a slip), and counts
// the bits before that point against the old alignment and those after it against the new one
// (count.go, resync.go). Memory does not grow with the capture.
//
// Every compared bit then feeds the figures: totals and intervals (tally.go), bursts
// (bursts.go), the time-based figures of ITU-T G.821 (g821.go) and the block-based ones of
// G.826 (g826.go), both with the unavailable-time rule of their Annex A (availability.go).
// Report turns the counts into the estimate, its interval, the one-sided upper limit and a
// verdict (report.go); Files writes table.csv, run.json, the plot and README.md (files.go).
package capture
