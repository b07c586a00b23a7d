package page

import (
	"fmt"
	"testing"
	"time"
)

// The whole state of 20 experiments of 500 points, as a page gets it when it connects.
func BenchmarkStateJSON(b *testing.B) {
	h := NewHub()
	for k := range 20 {
		f := fmt.Sprintf("exp%02d.go", k)
		h.RunFinished(f, syntheticRun(f, 500), nil, time.Second)
	}
	b.ResetTimer()
	for range b.N {
		out, err := JSON(h.stateLocked())
		if err != nil {
			b.Fatal(err)
		}
		b.SetBytes(int64(len(out)))
	}
}
