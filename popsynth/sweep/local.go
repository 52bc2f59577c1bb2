package sweep

import (
	"context"
	"fmt"
	"path/filepath"
	"runtime"
	"sort"
	"strings"
	"sync"
)

// LocalOptions control RunLocal.
type LocalOptions struct {
	// Jobs is the number of tasks run at once (0 means 1).
	Jobs int
	// Workers is the number of engine workers of each task; 0 means max(1, cores/Jobs).
	Workers int
	// Force reruns tasks that are done.
	Force bool
	// Progress, if not nil, is called with the number of systems written so far by all the tasks
	// of this run together. Calls are serialised.
	Progress func(done int64)
	// TaskDone, if not nil, is called after each task with its result and error. Calls are
	// serialised.
	TaskDone func(res TaskResult, err error)
}

// LocalResult tells what RunLocal did.
type LocalResult struct {
	Ran     int   // tasks run to completion
	Skipped int   // tasks skipped because they were done
	Failed  []int // tasks that failed, sorted
}

// RunLocal runs the given tasks on this machine, opt.Jobs at a time. A task that fails does not
// stop the others; the error then lists the failed tasks. When ctx is cancelled, running tasks stop
// (leaving no part) and no more start; the error is then the context's.
func (d *Dir) RunLocal(ctx context.Context, tasks []int, opt LocalOptions) (LocalResult, error) {
	jobs := max(opt.Jobs, 1)
	workers := opt.Workers
	if workers <= 0 {
		workers = max(1, runtime.GOMAXPROCS(0)/jobs)
	}
	for _, i := range tasks {
		if _, err := d.Task(i); err != nil {
			return LocalResult{}, err
		}
	}
	var (
		mu       sync.Mutex
		res      LocalResult
		errs     = map[int]error{}
		progress = make(map[int]int64)
		total    int64
	)
	queue := make(chan int)
	var wg sync.WaitGroup
	for range min(jobs, max(len(tasks), 1)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range queue {
				var prog func(int64)
				if opt.Progress != nil {
					prog = func(done int64) {
						mu.Lock()
						total += done - progress[i]
						progress[i] = done
						opt.Progress(total)
						mu.Unlock()
					}
				}
				r, err := d.RunTask(ctx, i, TaskOptions{Force: opt.Force, Workers: workers, Progress: prog})
				mu.Lock()
				switch {
				case err != nil:
					res.Failed = append(res.Failed, i)
					errs[i] = err
				case r.Skipped:
					res.Skipped++
				default:
					res.Ran++
				}
				if opt.TaskDone != nil {
					opt.TaskDone(r, err)
				}
				mu.Unlock()
			}
		}()
	}
feed:
	for _, i := range tasks {
		select {
		case <-ctx.Done():
			break feed
		case queue <- i:
		}
	}
	close(queue)
	wg.Wait()
	sort.Ints(res.Failed)
	if err := ctx.Err(); err != nil {
		return res, err
	}
	if len(res.Failed) > 0 {
		var lines []string
		for k, i := range res.Failed {
			if k == maxCellErrors {
				lines = append(lines, fmt.Sprintf("... and %d more", len(res.Failed)-k))
				break
			}
			lines = append(lines, errs[i].Error())
		}
		return res, fmt.Errorf("sweep: %d of %d tasks failed (records in %s):\n  %s",
			len(res.Failed), len(tasks), d.failedDirPath(), strings.Join(lines, "\n  "))
	}
	return res, nil
}

func (d *Dir) failedDirPath() string { return filepath.Join(d.Path, FailedDir) }

// TotalSystems returns the number of systems the given tasks evolve.
func (d *Dir) TotalSystems(tasks []int) int64 {
	var n int64
	for _, i := range tasks {
		if i >= 0 && i < len(d.Manifest.Tasks) {
			n += d.Manifest.Tasks[i].Systems
		}
	}
	return n
}
