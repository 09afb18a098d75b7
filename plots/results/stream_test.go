package results

import (
	"bytes"
	"path/filepath"
	"testing"

	"qpoint/ac"
	"qpoint/ac/plan"
	"qpoint/ac/touchstone"
	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// TestResponseStreamSameBytes: a streamed sweep writes the same CSV,
// Touchstone file and JSON document as the whole response written at
// once, and keeps only the table's rows.
func TestResponseStreamSameBytes(t *testing.T) {
	c, err := circuit.Load(filepath.Join("..", "..", "testdata", "demo", "attenuator.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	p, err := bias.Solve(c, bias.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	nw, err := smallsignal.New(p)
	if err != nil {
		t.Fatal(err)
	}
	grid, err := plan.ResponseGrid(c, plan.Grid{})
	if err != nil {
		t.Fatal(err)
	}
	var csvOut, tsOut, jsonOut bytes.Buffer
	s, err := NewResponseStream(c, nw, grid, nil, ResponseOutputs{CSV: &csvOut, Touchstone: &tsOut, JSON: &jsonOut, Format: touchstone.FormatMA, Rows: 5})
	if err != nil {
		t.Fatal(err)
	}
	if err := s.Sweep(); err != nil {
		t.Fatal(err)
	}
	if err := s.Close(); err != nil {
		t.Fatal(err)
	}
	if got := len(s.Response().Points); got != 5 {
		t.Errorf("the stream kept %d points, want the 5 rows", got)
	}
	r, err := ac.Run(nw, grid, ac.Settings{})
	if err != nil {
		t.Fatal(err)
	}
	var csvWant, tsWant, jsonWant bytes.Buffer
	if err := WriteResponseCSV(&csvWant, r); err != nil {
		t.Fatal(err)
	}
	if err := WriteTouchstone(&tsWant, c, r, touchstone.FormatMA); err != nil {
		t.Fatal(err)
	}
	r.Stats = s.Response().Stats // the sweep's own statistics
	if err := Write(&jsonWant, ResponseOf(r, c)); err != nil {
		t.Fatal(err)
	}
	for _, k := range []struct {
		what      string
		got, want []byte
	}{{"CSV", csvOut.Bytes(), csvWant.Bytes()}, {"Touchstone", tsOut.Bytes(), tsWant.Bytes()}, {"JSON", jsonOut.Bytes(), jsonWant.Bytes()}} {
		if !bytes.Equal(k.got, k.want) {
			t.Errorf("streamed %s differs from the whole response's (%d bytes against %d)", k.what, len(k.got), len(k.want))
		}
	}
}
