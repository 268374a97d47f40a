package nufft

import "sync"

// team runs one job on a fixed number of goroutines and waits for all of them.
// The per-worker closures are built once, so run allocates nothing: a go
// statement on a prebuilt, argument-free func value needs no heap wrapper.
type team struct {
	wg    sync.WaitGroup
	job   func(worker int)
	tasks []func()
}

func newTeam(workers int) *team {
	t := &team{tasks: make([]func(), workers)}
	for w := range workers {
		t.tasks[w] = func() {
			t.job(w)
			t.wg.Done()
		}
	}
	return t
}

// size returns the number of workers.
func (t *team) size() int { return len(t.tasks) }

// run calls job(0) … job(size−1) concurrently and returns when all are done.
// job must be a func value built once (for example a method value stored in
// a struct field), not a fresh closure, or run would allocate it.
func (t *team) run(job func(worker int)) {
	if len(t.tasks) == 1 {
		job(0)
		return
	}
	t.job = job
	t.wg.Add(len(t.tasks) - 1)
	for w := 1; w < len(t.tasks); w++ {
		go t.tasks[w]()
	}
	job(0)
	t.wg.Wait()
	t.job = nil
}

// chunk returns the half-open range of n items that worker w of size takes in
// a static, contiguous partition.
func chunk(n, w, size int) (lo, hi int) {
	return n * w / size, n * (w + 1) / size
}
