package link

import "testing"

// tapCount is the number of names Taps gives, plain and paired alike.
func TestTapCount(t *testing.T) {
	plain := Chain().Count("payload", func(*Frame) (int64, int64) { return 0, 0 })
	for _, l := range []*Link{Chain(), plain, Paired([]string{"a", "b", "c"}, Chain(), plain, Chain())} {
		if got, want := l.tapCount(), len(l.Taps()); got != want {
			t.Errorf("tapCount %d, Taps %d %v", got, want, l.Taps())
		}
	}
}
