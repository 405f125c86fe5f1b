// Package workgroup holds what groups of worker goroutines share across pcqc's
// packages: keeping a worker's panic so that it surfaces in the caller.
package workgroup

import "sync"

// Panic keeps the first panic of a group of workers. A panic in a worker
// goroutine would otherwise end the program without the caller's recovery
// (and its one-line internal-error message) ever running.
type Panic struct {
	once  sync.Once
	value any
	set   bool
}

// Catch, deferred in a worker, records a panic and calls stop, which
// should make the other workers run out of tasks.
func (p *Panic) Catch(stop func()) {
	if r := recover(); r != nil {
		p.once.Do(func() { p.value, p.set = r, true })
		stop()
	}
}

// Raise panics again with the recorded value, in the caller's goroutine.
func (p *Panic) Raise() {
	if p.set {
		panic(p.value)
	}
}
