package out

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
)

// Stage is a results folder being written. Everything goes into a hidden
// sibling folder first; Commit swaps it in place of the final folder in one
// rename, so a failed, interrupted or refused run never leaves a half-written
// folder and never touches the results of an earlier run.
type Stage struct {
	final string
	dir   string
	done  bool
}

// NewStage checks that the results folder can be written and creates the
// staging folder beside it. It fails, before any work is done, when the
// parent cannot be created or written, or when final exists and is not a
// folder.
func NewStage(final string) (*Stage, error) {
	if final == "" {
		return nil, errors.New("the results folder name is empty (set output in the plan or -out)")
	}
	final = filepath.Clean(final)
	if fi, err := os.Stat(final); err == nil && !fi.IsDir() {
		return nil, fmt.Errorf("results folder %s exists and is not a folder; choose another output", final)
	}
	parent := filepath.Dir(final)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return nil, fmt.Errorf("cannot create the folder for results %s: %w (choose another output)", final, err)
	}
	dir, err := os.MkdirTemp(parent, "."+filepath.Base(final)+".partial-")
	if err != nil {
		return nil, fmt.Errorf("cannot write results into %s: %w (choose another output, or fix its permissions)", parent, err)
	}
	return &Stage{final: final, dir: dir}, nil
}

// Dir is the staging folder to write into.
func (s *Stage) Dir() string { return s.dir }

// Final is the folder the results end up in.
func (s *Stage) Final() string { return s.final }

// Commit replaces the final folder by the staging folder. An earlier
// results folder is moved aside first and removed only once the new one is
// in place.
func (s *Stage) Commit() error {
	if s.done {
		return errors.New("out: stage already committed or abandoned")
	}
	var old string
	if _, err := os.Stat(s.final); err == nil {
		tmp, err := os.MkdirTemp(filepath.Dir(s.final), "."+filepath.Base(s.final)+".previous-")
		if err != nil {
			return fmt.Errorf("cannot replace %s: %w", s.final, err)
		}
		old = filepath.Join(tmp, "results")
		if err := os.Rename(s.final, old); err != nil {
			os.Remove(tmp)
			return fmt.Errorf("cannot replace %s: %w", s.final, err)
		}
		defer os.RemoveAll(tmp)
	}
	if err := os.Rename(s.dir, s.final); err != nil {
		if old != "" {
			os.Rename(old, s.final) // put the earlier results back
		}
		return fmt.Errorf("cannot move the results into %s: %w", s.final, err)
	}
	s.done = true
	return nil
}

// Abandon removes the staging folder unless it was committed. It is safe to
// call more than once.
func (s *Stage) Abandon() {
	if s.done {
		return
	}
	os.RemoveAll(s.dir)
	s.done = true
}
