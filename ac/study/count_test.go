package study

import (
	"errors"
	"testing"
)

// TestTotalAndFailed: a grid's step count is the product of its axes, and
// Failed counts the steps with an error.
func TestTotalAndFailed(t *testing.T) {
	s := Settings{Axis: Axis{Values: make([]float64, 3)}}
	if got := s.Total(); got != 3 {
		t.Errorf("one axis: Total = %d, want 3", got)
	}
	s.Second = &Axis{Values: make([]float64, 4)}
	if got := s.Total(); got != 12 {
		t.Errorf("grid: Total = %d, want 12", got)
	}
	r := &Result{Steps: []Step{{}, {Err: errors.New("no convergence")}, {}}}
	if got := r.Failed(); got != 1 {
		t.Errorf("Failed = %d, want 1", got)
	}
}
