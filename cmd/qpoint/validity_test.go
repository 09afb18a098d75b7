package main

import (
	"encoding/json"
	"math"
	"path/filepath"
	"strings"
	"testing"
)

// TestValidityNoteDrivenHigh: a small detector driven at +20 dBm, far
// above its weakly nonlinear range. The printed note and the JSON give
// the limit the search observed (the estimates hold near -26.5 dBm at
// this bias), never a default level presented as a finding.
func TestValidityNoteDrivenHigh(t *testing.T) {
	f := filepath.Join(demoDir, "detector.yaml")
	out, errs, code := runCLI(t, "distortion", f, "--level", "20dBm")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if strings.Contains(out, "over every level tried") || !strings.Contains(out, "the estimates hold within 0.5 dB up to -26.") {
		t.Errorf("the validity note does not give the observed limit:\n%s", out)
	}
	js, errs, code := runCLI(t, "distortion", f, "--level", "20dBm", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var doc struct {
		Limit *float64 `json:"validity_limit_dbm"`
		Found bool     `json:"validity_limit_found"`
		Note  string   `json:"validity_note"`
	}
	if err := json.Unmarshal([]byte(js), &doc); err != nil {
		t.Fatal(err)
	}
	if doc.Limit == nil || !doc.Found || math.Abs(*doc.Limit+26.5) > 0.5 || doc.Note != "" {
		t.Errorf("validity_limit_dbm %v, found %v, note %q; want about -26.5 dBm, found, no note", doc.Limit, doc.Found, doc.Note)
	}
}
