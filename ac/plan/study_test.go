package plan

import (
	"errors"
	"strings"
	"testing"
)

// TestParseGoal: one goal at a time, each filled in the request; two at
// once name all three settings.
func TestParseGoal(t *testing.T) {
	var r StudyRequest
	if err := ParseGoal(&r, "s21=-6dB@900MHz", "", ""); err != nil || r.Goal != Target || r.MeasureText != "s21@900MHz" || r.TargetText != "-6dB" {
		t.Errorf("target: %+v, %v", r, err)
	}
	r = StudyRequest{}
	if err := ParseGoal(&r, "", "", "nf"); err != nil || r.Goal != Minimize || r.MeasureText != "nf" {
		t.Errorf("minimize: %+v, %v", r, err)
	}
	r = StudyRequest{}
	if err := ParseGoal(&r, "", "", ""); err != nil || r.Goal != NoGoal {
		t.Errorf("none: %+v, %v", r, err)
	}
	var re *RequestError
	err := ParseGoal(&r, "s21=-6dB", "s21", "")
	if !errors.As(err, &re) || strings.Join(re.Settings, " ") != "target maximize minimize" {
		t.Errorf("two goals: %v", err)
	}
	if err := ParseGoal(&r, "s21", "", ""); !errors.As(err, &re) {
		t.Errorf("a target without =: %v", err)
	}
}
