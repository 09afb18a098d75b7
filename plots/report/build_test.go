package report

import (
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"qpoint/bias"
	"qpoint/bias/circuit"
	"qpoint/smallsignal"
)

// TestBiasCards: the report's headline has a card per diode up to six,
// and one card with the count and current range beyond.
func TestBiasCards(t *testing.T) {
	p := &bias.Point{}
	for k := 0; k < 3; k++ {
		p.Diodes = append(p.Diodes, bias.QPoint{Name: "D" + strconv.Itoa(k+1), Current: 1e-3})
	}
	if cards := biasCards(p); len(cards) != 3 || cards[0].Label != "D1 bias" {
		t.Errorf("three diodes: %+v", cards)
	}
	for k := 3; k < 9; k++ {
		p.Diodes = append(p.Diodes, bias.QPoint{Name: "D" + strconv.Itoa(k+1), Current: 1e-3 * float64(k)})
	}
	cards := biasCards(p)
	if len(cards) != 1 || cards[0].Label != "bias of 9 diodes" || cards[0].Value != "1 mA to 8 mA" || !strings.HasPrefix(cards[0].Detail, "D1 to D9") {
		t.Errorf("nine diodes: %+v", cards)
	}
}

// TestNoiseSection checks the report's noise section for the detector.
func TestNoiseSection(t *testing.T) {
	c, err := circuit.Load(filepath.Join("..", "..", "testdata", "demo", "detector.yaml"))
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
	sec, cards, err := noiseSection(c, nw)
	if err != nil {
		t.Fatal(err)
	}
	if sec.ID != "noise" || len(sec.Blocks) < 4 {
		t.Errorf("section %q with %d blocks", sec.ID, len(sec.Blocks))
	}
	var labels []string
	for _, k := range cards {
		labels = append(labels, k.Label)
	}
	if got := strings.Join(labels, ", "); got != "noise-equivalent power, tangential sensitivity" {
		t.Errorf("cards %q", got)
	}
}
