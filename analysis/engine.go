package analysis

import (
	"math/rand/v2"
	"runtime"
	"sync"
	"sync/atomic"

	"pcqc/internal/workgroup"
)

// Random streams. Every resample and permutation draws from its own PCG
// stream, derived from the user's seed, the kind of resampling and the
// resample's index, so results do not depend on how the work is spread over
// threads or in which order workers pick tasks.
const (
	streamPermutation = 1 << 40
	streamBootstrap   = 2 << 40
)

func taskRNG(seed uint64, stream uint64, index int) *rand.Rand {
	return rand.New(rand.NewPCG(seed, stream+uint64(index)))
}

// Progress receives the number of finished tasks of a named stage. It is
// called from worker goroutines and must be safe for concurrent use.
type Progress func(stage string, done, total int)

// parallelFor runs task(w, i) for i in [0, count) on up to threads workers;
// each worker owns one workspace made by newWorkspace. Results must be
// written by index, which makes them independent of scheduling. A panic in
// a worker (a bug) stops the remaining tasks and is raised again in the
// caller's goroutine, where the command can report it instead of the
// runtime printing every goroutine's stack.
func parallelFor[W any](count, threads int, newWorkspace func() W, task func(w W, i int), stage string, progress Progress) {
	if threads <= 0 {
		threads = runtime.NumCPU()
	}
	threads = max(1, min(threads, count))
	var next, done atomic.Int64
	var wg sync.WaitGroup
	var failed workgroup.Panic
	for t := 0; t < threads; t++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer failed.Catch(func() { next.Store(int64(count)) })
			w := newWorkspace()
			for {
				i := int(next.Add(1) - 1)
				if i >= count {
					return
				}
				task(w, i)
				d := int(done.Add(1))
				if progress != nil {
					progress(stage, d, count)
				}
			}
		}()
	}
	wg.Wait()
	failed.Raise()
}

// workspacePool hands out workspaces to successive parallelFor calls so
// that each call's workers reuse the previous call's: get is the
// newWorkspace argument, reset is called between the calls.
type workspacePool[W any] struct {
	mu    sync.Mutex
	make  func() W
	all   []W
	given int
}

// get returns a workspace not yet given out since the last reset.
func (p *workspacePool[W]) get() W {
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.given == len(p.all) {
		p.all = append(p.all, p.make())
	}
	p.given++
	return p.all[p.given-1]
}

// reset makes every workspace available again; no worker may be using one.
func (p *workspacePool[W]) reset() {
	p.mu.Lock()
	p.given = 0
	p.mu.Unlock()
}

// percentile returns the q-th percentile (0 ≤ q ≤ 100) of sorted values by
// linear interpolation between order statistics (Hyndman & Fan 1996, Amer.
// Statist. 50:361–365, definition 7, the default of R and NumPy).
func percentile(sorted []float64, q float64) float64 {
	n := len(sorted)
	if n == 0 {
		return 0
	}
	h := (float64(n) - 1) * q / 100
	lo := int(h)
	if lo >= n-1 {
		return sorted[n-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}
