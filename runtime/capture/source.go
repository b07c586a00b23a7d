package capture

import "io"

// wordSource hands out the capture's words, 64 bits each except a final partial one.
type wordSource struct {
	rd    *bitReader
	buf   []uint64
	i, n  int   // unread words buf[i:n]
	pos   int64 // capture bit of buf[i]
	eof   bool
	total int64 // capture bits, once eof
}

func (s *wordSource) fill() error {
	if s.i < s.n || s.eof {
		return nil
	}
	nb, err := s.rd.read(s.buf[:cap(s.buf)])
	s.buf = s.buf[:cap(s.buf)]
	s.i, s.n = 0, 0
	if err == io.EOF {
		s.eof, s.total = true, s.pos
		return nil
	}
	if err != nil {
		return err
	}
	s.n = int((nb + 63) / 64)
	if nb < int64(len(s.buf))*64 {
		s.eof, s.total = true, s.pos+nb
	}
	return nil
}

// limit is the end of the capture if known, else a bound beyond every word read.
func (s *wordSource) limit() int64 {
	if s.eof {
		return s.total
	}
	return 1<<62 - 1
}

// word hands out one word and its number of bits; ok is false at the end.
func (s *wordSource) word() (v uint64, nbits int64, ok bool, err error) {
	if err := s.fill(); err != nil {
		return 0, 0, false, err
	}
	if s.i == s.n {
		return 0, 0, false, nil
	}
	v = s.buf[s.i]
	nbits = min(64, s.limit()-s.pos)
	s.i++
	s.pos += 64
	return v, nbits, true, nil
}

// unread puts words back in front of the unread ones; the first starts at capture bit p.
func (s *wordSource) unread(words []uint64, p int64) {
	rest := s.buf[s.i:s.n]
	nb := make([]uint64, 0, max(len(words)+len(rest), 1<<13))
	nb = append(nb, words...)
	nb = append(nb, rest...)
	s.buf, s.i, s.n, s.pos = nb, 0, len(nb), p
}
