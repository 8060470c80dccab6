// Package ordered maps a stream of items on every core and hands the
// results on in the stream's order, so that what a command writes does not
// depend on how many cores it ran on. Items travel in batches, a few
// batches ahead of the consumer at most, so memory stays bounded whatever
// the stream's length.
package ordered

import "runtime"

// Map calls produce, which hands items to emit (in order; emit reports
// false once the consumer has stopped, and produce should then return),
// applies work to every item on GOMAXPROCS goroutines, batch items at a
// time, and calls consume with each item and its result in produce's
// order, on the calling goroutine. It returns the first error of consume,
// else of produce.
func Map[In, Out any](batch int, produce func(emit func(In) bool) error, work func(In) Out, consume func(In, Out) error) error {
	type job struct {
		in   []In
		out  []Out
		done chan struct{}
	}
	quit := make(chan struct{})
	workers := runtime.GOMAXPROCS(0)
	queue := make(chan *job, 2)
	order := make(chan *job, 2+workers)
	prodErr := make(chan error, 1)
	go func() {
		defer close(queue)
		defer close(order)
		j := &job{done: make(chan struct{})}
		send := func() bool {
			select {
			case <-quit:
				return false
			default:
			}
			select {
			case order <- j:
			case <-quit:
				return false
			}
			select {
			case queue <- j:
			case <-quit:
				return false
			}
			j = &job{done: make(chan struct{})}
			return true
		}
		err := produce(func(in In) bool {
			j.in = append(j.in, in)
			return len(j.in) < batch || send()
		})
		if len(j.in) > 0 {
			send()
		}
		prodErr <- err
	}()
	for range workers {
		go func() {
			for j := range queue {
				j.out = make([]Out, len(j.in))
				for i, in := range j.in {
					j.out[i] = work(in)
				}
				close(j.done)
			}
		}()
	}
	var err error
	for j := range order {
		<-j.done
		for i := range j.in {
			if err = consume(j.in[i], j.out[i]); err != nil {
				break
			}
		}
		if err != nil {
			break
		}
	}
	close(quit)
	if err != nil {
		// Let the producer and the workers see quit and end.
		for range order {
		}
		return err
	}
	return <-prodErr
}
