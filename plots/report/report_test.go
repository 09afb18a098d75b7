package report

import (
	"bytes"
	"encoding/xml"
	"strings"
	"testing"
)

func TestWriteSelfContained(t *testing.T) {
	svg := []byte(`<?xml version="1.0"?>
<!-- Generated -->
<svg width="480pt" height="420pt" viewBox="0 0 480 420"
	xmlns="http://www.w3.org/2000/svg"><path d="M0,0L1,1"/></svg>`)
	d := &Document{
		Title: "Detector <bias>", Subtitle: "file & temperature",
		Cards:    []Card{{"D1 current", "10 µA", "at 27 °C"}},
		Cautions: []string{"D1: rating exceeded"},
		Sections: []Section{{ID: "op", Title: "Operating point", Blocks: []Block{
			{Table: &Table{Caption: "Nodes", Header: []string{"node", "voltage"}, Rows: [][]string{{"vcc", "3.3 V"}}, Align: []bool{false, true}}},
			{Figure: &Figure{Caption: "gain", SVG: svg}},
			{Note: "a note"},
		}}},
		Footer: []string{"model estimates"},
	}
	var b bytes.Buffer
	if err := Write(&b, d); err != nil {
		t.Fatal(err)
	}
	html := b.String()
	for _, want := range []string{"Detector &lt;bias&gt;", `<svg class="fig"`, `viewBox="0 0 480 420"`, "rating exceeded", `class="num"`, "model estimates"} {
		if !strings.Contains(html, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	for _, bad := range []string{"<?xml", "<script", "http://", "https://"} {
		if strings.Contains(strings.ReplaceAll(html, `xmlns="http://www.w3.org/2000/svg"`, ""), bad) {
			t.Errorf("page contains %q: it must be self-contained", bad)
		}
	}
	// The page is well-formed enough for an XML reader once the doctype is dropped.
	dec := xml.NewDecoder(strings.NewReader(strings.TrimPrefix(html, "<!DOCTYPE html>\n")))
	dec.Strict = false
	dec.AutoClose = xml.HTMLAutoClose
	dec.Entity = xml.HTMLEntity
	for {
		_, err := dec.Token()
		if err != nil {
			if err.Error() != "EOF" {
				t.Errorf("HTML does not parse: %v", err)
			}
			break
		}
	}
}
