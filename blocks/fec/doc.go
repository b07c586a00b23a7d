// Package fec holds the forward error correction blocks: block codes (Hamming, Reed–Solomon,
// BCH), the convolutional code with its Viterbi decoder and puncturing, LDPC codes with
// message-passing decoders, polar codes with SC and CRC-aided list decoding, and interleavers.
//
// Every code is a small value that hands out a pair of blocks, an encoder and its decoder, so
// the link reads like the block diagram:
//
//	c := fec.Conv()
//	link.Chain(src, c.Encoder(), mod, ch, demod, c.Decoder())
//
// Stacking several stages (outer code, interleaver, inner code) puts the encoders in order after
// the source and their decoders in the reverse order after the demodulator:
//
//	rs, il, cc := fec.RS(204, 188), fec.BlockInterleaver(4, 204).Group(8), fec.Conv()
//	link.Chain(source.Random(4*188*8), rs.Encoder(), il.Interleave(), cc.Encoder(), mod, ch, demod,
//		cc.Decoder(), il.Deinterleave(), rs.Decoder())
//
// The frame's buffers are handed on by these rules:
//   - An encoder reads f.Coded (the source's bits, or the previous encoder's output), points
//     f.Coded at its own output and multiplies f.CodeRate by the rate the frame actually sees
//     (information bits over coded bits, a convolutional code's tail included), so the channel's
//     Eb/N0 counts energy per information bit.
//   - f.Hard, f.LLR and f.Coded stay in the channel's domain: the link's pre-FEC tap compares
//     f.Hard with f.Coded after the last block, and counts the demodulator's decisions on the
//     bits that were sent. A deinterleaver standing right after the demodulator permutes f.Hard
//     and f.LLR back and restores f.Coded to its interleaver's input, so both stay consistent
//     and the count is unchanged.
//   - The first decoder reads f.Hard (hard decoders) or f.LLR (soft decoders) and writes the
//     information bits it found to f.Out. A later decoder or deinterleaver sees f.Out set and
//     works on f.Out instead: decoders pass on hard bits only. So the soft decoders of LDPC and
//     polar codes are inner codes (right after the demodulator or its deinterleaver), and BCH,
//     RS or Hamming codes around them outer codes.
//   - The last decoder leaves in f.Out as many bits as the source made; the link counts them
//     against f.Bits (tap "ber") and counts frames with any wrong bit (tap "fer").
//
// Block codes take frames whose length is a multiple of their k (and decoders a multiple of n);
// any other length is an error naming the block and the length, not silent padding, so the
// rate and the bit count stay exact. The convolutional code takes any length and terminates
// every frame with K−1 zero tail bits.
//
// A decoder keeps a reference to the code that made it (and a deinterleaver to its
// interleaver, whose permutation may be drawn per frame), so a code must be made inside the
// link function, once per worker, like every block.
package fec
