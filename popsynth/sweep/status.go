package sweep

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"sort"
)

// State is where a task stands.
type State uint8

const (
	// Pending tasks have not run, or were stopped before they wrote anything.
	Pending State = iota
	// Done tasks have a part and a done-record whose checksum matches it.
	Done
	// Failed tasks have a failure record, a part without a valid done-record, or a part whose
	// checksum does not match its done-record (corrupt).
	Failed
)

// String returns "pending", "done" or "failed".
func (s State) String() string {
	switch s {
	case Pending:
		return "pending"
	case Done:
		return "done"
	case Failed:
		return "failed"
	}
	return fmt.Sprintf("State(%d)", uint8(s))
}

// Status counts a sweep's tasks by state. Corrupt tasks count among the failed.
type Status struct {
	Tasks   int `json:"tasks"`
	Done    int `json:"done"`
	Pending int `json:"pending"`
	Failed  int `json:"failed"`
	Corrupt int `json:"corrupt"`
	// PendingTasks and FailedTasks list the tasks that are not done, by index.
	PendingTasks []int     `json:"pending_tasks"`
	FailedTasks  []Problem `json:"failed_tasks"`
}

// Problem says why a task is failed.
type Problem struct {
	Index   int    `json:"index"`
	Corrupt bool   `json:"corrupt"`
	Reason  string `json:"reason"`
}

// Unfinished returns the indices of the tasks that are not done (pending and failed), sorted.
func (s Status) Unfinished() []int {
	out := append([]int(nil), s.PendingTasks...)
	for _, p := range s.FailedTasks {
		out = append(out, p.Index)
	}
	sort.Ints(out)
	return out
}

type taskCheck struct {
	state   State
	corrupt bool
	reason  string
	rec     *DoneRecord
}

// check finds the state of task t, verifying the checksum of its part.
func (d *Dir) check(t *Task) taskCheck {
	part := d.PartPath(t)
	_, perr := os.Stat(part)
	partExists := perr == nil
	rec, rerr := d.readDone(t.Index)
	switch {
	case rerr == nil:
		if rec.Index != t.Index || rec.Part != t.Part || rec.Seed != t.Seed || rec.ConfigSHA256 != textSHA256(t.Config) {
			return taskCheck{state: Failed, reason: "its done-record belongs to another plan or task; rerun it"}
		}
		if !partExists {
			return taskCheck{state: Failed, corrupt: true, reason: fmt.Sprintf("its done-record is present but the part %s is missing", t.Part)}
		}
		sum, size, err := fileSHA256(part)
		if err != nil {
			return taskCheck{state: Failed, corrupt: true, reason: fmt.Sprintf("its part cannot be read: %v", err)}
		}
		if sum != rec.SHA256 || size != rec.Bytes {
			return taskCheck{state: Failed, corrupt: true, reason: fmt.Sprintf("the checksum of its part %s does not match its done-record (%d bytes, sha256 %.12s..., recorded %d bytes, %.12s...)",
				t.Part, size, sum, rec.Bytes, rec.SHA256)}
		}
		return taskCheck{state: Done, rec: rec}
	case !errors.Is(rerr, fs.ErrNotExist):
		return taskCheck{state: Failed, reason: rerr.Error()}
	}
	if fr, err := d.readFailure(t.Index); err == nil {
		reason := fr.Error
		if fr.Interrupted {
			reason = "interrupted: " + reason
		}
		return taskCheck{state: Failed, reason: reason}
	}
	if partExists {
		return taskCheck{state: Failed, reason: fmt.Sprintf("its part %s exists without a done-record (the task stopped after writing it?)", t.Part)}
	}
	return taskCheck{state: Pending}
}

// Status checks every task, reading each part to verify its checksum.
func (d *Dir) Status() Status {
	s, _ := d.scan()
	return s
}

// scan checks every task and returns the status and the done-records of the done tasks.
func (d *Dir) scan() (Status, []*DoneRecord) {
	s := Status{Tasks: len(d.Manifest.Tasks), PendingTasks: []int{}, FailedTasks: []Problem{}}
	recs := make([]*DoneRecord, len(d.Manifest.Tasks))
	for i := range d.Manifest.Tasks {
		c := d.check(&d.Manifest.Tasks[i])
		switch c.state {
		case Done:
			s.Done++
			recs[i] = c.rec
		case Pending:
			s.Pending++
			s.PendingTasks = append(s.PendingTasks, i)
		case Failed:
			s.Failed++
			if c.corrupt {
				s.Corrupt++
			}
			s.FailedTasks = append(s.FailedTasks, Problem{Index: i, Corrupt: c.corrupt, Reason: c.reason})
		}
	}
	return s, recs
}

// TaskState returns the state of task i and, for a failed task, why.
func (d *Dir) TaskState(i int) (State, string, error) {
	t, err := d.Task(i)
	if err != nil {
		return Pending, "", err
	}
	c := d.check(t)
	return c.state, c.reason, nil
}
