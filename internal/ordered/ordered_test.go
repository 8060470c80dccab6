package ordered

import (
	"errors"
	"runtime"
	"testing"

	"pgregory.net/rapid"
)

// TestMapKeepsOrder: whatever the batch size and the number of cores,
// consume sees every item once, in produce's order, with work's result;
// a consumer's error stops the stream and is returned; a producer's error
// is returned after the items it emitted are consumed.
func TestMapKeepsOrder(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(0, 2000).Draw(t, "items")
		batch := rapid.IntRange(1, 300).Draw(t, "batch")
		procs := rapid.IntRange(1, 8).Draw(t, "GOMAXPROCS")
		stopAt := rapid.IntRange(-1, n).Draw(t, "consumer stops at")
		prodFails := rapid.Bool().Draw(t, "producer fails at the end")
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		errConsume, errProduce := errors.New("consume"), errors.New("produce")
		next := 0
		err := Map(batch, func(emit func(int) bool) error {
			for i := range n {
				if !emit(i) {
					return nil
				}
			}
			if prodFails {
				return errProduce
			}
			return nil
		}, func(i int) int { return i * i }, func(i, sq int) error {
			if i != next || sq != i*i {
				t.Fatalf("consume(%d, %d), want item %d and its square", i, sq, next)
			}
			if i == stopAt {
				return errConsume
			}
			next++
			return nil
		})
		switch {
		case stopAt >= 0 && stopAt < n:
			if err != errConsume || next != stopAt {
				t.Fatalf("Map = %v after %d items, want the consumer's error after %d", err, next, stopAt)
			}
		case prodFails:
			if err != errProduce || next != n {
				t.Fatalf("Map = %v after %d items, want the producer's error after %d", err, next, n)
			}
		default:
			if err != nil || next != n {
				t.Fatalf("Map = %v after %d items, want nil after %d", err, next, n)
			}
		}
	})
}
