package response

// stepWork holds the buffers of one StepMetrics call that grow with the
// number of samples: the sampled output and its slope, the state
// checkpoints of the evaluator, the located points, and the input and
// output of a discrete run. A call takes one from stepWorkPool and puts it
// back when done, so a sweep that calls StepMetrics many times on several
// goroutines reuses buffers instead of allocating about (n/16 + 4)·8 bytes
// per sample on every call: that allocation, not the arithmetic, bound
// parallel sweeps, because every goroutine waited for the garbage
// collector. Nothing in a result refers to a workspace.
type stepWork struct {
	ys, ds      []float64 // evaluator: y and y′ at the samples
	checkpoints []float64 // evaluator: x(c·checkpointEvery·h), row c
	x, nx       []float64 // evaluator: current state and the next one
	xa, xb, xm  []float64 // evaluator.locate: bracket ends and midpoint
	lattice     []float64 // evaluator: Φ_j and Γ_j, j = 1…L, back to back
	lphi, lgam  [][]float64
	pts         []point
	u, y        []float64 // discretePoints: unit input and output
}

// maxPooledFloats bounds the float64s a workspace may hold and still be
// kept (2 MB; the automatic grid of 20 000 samples needs about 100 000): a
// rare long run (up to maxSamples samples) does not keep its memory alive
// for the next short one.
const maxPooledFloats = 1 << 18

// stepWorkPool holds up to 16 idle workspaces (at most 32 MB). A buffered
// channel rather than a sync.Pool: a sync.Pool is emptied by every second
// garbage collection, which in a sweep that allocates elsewhere (margins,
// poly) happens every few calls, and the buffers were then grown afresh.
var stepWorkPool = make(chan *stepWork, 16)

func getStepWork() *stepWork {
	select {
	case w := <-stepWorkPool:
		return w
	default:
		return new(stepWork)
	}
}

// release keeps w for a later call unless it grew beyond maxPooledFloats
// or 16 are kept already.
func (w *stepWork) release() {
	size := cap(w.ys) + cap(w.ds) + cap(w.checkpoints) + cap(w.lattice) + 2*cap(w.pts) + cap(w.u) + cap(w.y)
	if size > maxPooledFloats {
		return
	}
	select {
	case stepWorkPool <- w:
	default:
	}
}

// zeroed returns buf resliced to length n and set to zero, reallocated only
// when its capacity is short.
func zeroed(buf []float64, n int) []float64 {
	if cap(buf) < n {
		return make([]float64, n)
	}
	buf = buf[:n]
	clear(buf)
	return buf
}
