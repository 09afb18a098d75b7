package circuit

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strings"
	"testing"
	"time"
)

const hostileDir = "../../testdata/hostile"

// hostileWants gives, for every file in testdata/hostile, the place and a
// phrase of the first problem reported. Each file stands for one way a
// file written by hand or by a script can go wrong; none may load, and
// each must be answered in well under a second.
var hostileWants = map[string]struct {
	at, phrase string
}{
	"alias_bomb.yaml":        {"2:4", "anchors and aliases are not accepted"},
	"merge_key.yaml":         {"2:7", "anchors and aliases are not accepted"},
	"deep_nesting.yaml":      {"2:1", "exceeded max depth"},
	"deep_mapping.yaml":      {"3:5", "has no `type`"},
	"invalid_utf8_name.yaml": {"3:45", "not valid UTF-8"},
	"binary.yaml":            {"1:1", "not valid UTF-8"},
	"utf16.yaml":             {"1:1", "not valid UTF-8"},
	"nul_byte.yaml":          {"2:60", "control character U+0000"},
	"control_chars.yaml":     {"2:29", "control character U+0007"},
	"nan_inf.yaml":           {"2:14", "not a finite number"},
	"huge_values.yaml":       {"2:14", "beyond the largest temperature"},
	"huge_voltage.yaml":      {"5:66", "beyond the largest voltage"},
	"tiny_values.yaml":       {"3:53", "below the smallest resistance"},
	"overflow_prefix.yaml":   {"3:66", "too large for a float64"},
	"zero_negative.yaml":     {"2:14", "at or below absolute zero"},
	"empty.yaml":             {"1:1", "the file is empty"},
	"blank.yaml":             {"1:1", "the file is empty"},
	"bom_only.yaml":          {"1:1", "only comments"},
	"comments_only.yaml":     {"1:1", "only comments"},
	"null_document.yaml":     {"1:1", "not a mapping"},
	"separator_only.yaml":    {"2:1", "not a mapping"},
	"duplicate_keys.yaml":    {"3:1", "key `name` appears twice"},
	"gnd_collisions.yaml":    {"3:3", "may not be called `gnd`"},
	"gnd_lookalike.yaml":     {"2:1", "node `GND` is an ordinary node"},
	"long_value.yaml":        {"3:58", "5000 characters long"},
	"long_celsius.yaml":      {"2:14", "20003 characters long"},
	"many_problems.yaml":     {"3:58", "not above zero"},
	"huge_counts.yaml":       {"5:48", "out of range"},
	"odd_numbers.yaml":       {"3:58", "hexadecimal"},
	"tabs.yaml":              {"2:1", "not valid YAML"},
	"two_documents.yaml":     {"4:1", "a second YAML document"},
	"unterminated.yaml":      {"2:1", "not valid YAML"},
	"key_types.yaml":         {"2:3", "a key in the circuit file is a list"},
}

// placed is the form of every line of a load error.
var placed = regexp.MustCompile(`^.+\.yaml:\d+:\d+: .+; .+`)

// TestHostileFiles loads every file in testdata/hostile: each is refused
// with FILE:LINE:COL problems saying what is accepted, the first at the
// place the table gives, in under a second.
func TestHostileFiles(t *testing.T) {
	paths, err := filepath.Glob(filepath.Join(hostileDir, "*.yaml"))
	if err != nil || len(paths) < len(hostileWants) {
		t.Fatalf("found %d hostile files, want %d: %v", len(paths), len(hostileWants), err)
	}
	for _, path := range paths {
		name := filepath.Base(path)
		t.Run(name, func(t *testing.T) {
			want, ok := hostileWants[name]
			if !ok {
				t.Fatalf("%s has no entry in hostileWants: add the place and phrase of its first problem", name)
			}
			start := time.Now()
			c, err := Load(path)
			took := time.Since(start)
			if err == nil {
				t.Fatalf("Load(%s) succeeded with %d parts", path, len(c.Parts))
			}
			if took > time.Second {
				t.Errorf("Load took %v, want under a second", took)
			}
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 || len(list) > MaxErrors+1 {
				t.Fatalf("error is %T with %d problems, want an ErrorList of 1 to %d: %v", err, len(list), MaxErrors+1, err)
			}
			for _, line := range strings.Split(err.Error(), "\n") {
				if !placed.MatchString(line) || !strings.HasPrefix(line, path+":") {
					t.Errorf("%q is not `FILE:LINE:COL: what is wrong; what is accepted`", line)
				}
				if len(line) > 2*MaxScalarLength {
					t.Errorf("a message of %d characters: %.200s...", len(line), line)
				}
			}
			first := list[0]
			if got := strings.TrimPrefix(first.Error(), path+":"); !strings.HasPrefix(got, want.at+": ") || !strings.Contains(got, want.phrase) {
				t.Errorf("first problem %q; want it at %s and containing %q", first.Error(), want.at, want.phrase)
			}
		})
	}
}

// TestLoadOversize: a file over MaxFileSize is refused from its size alone,
// quickly and without being read: a 50 MB file costs no more memory than a
// small one. A stream without a size (a device) is read only up to the
// limit.
func TestLoadOversize(t *testing.T) {
	dir := t.TempDir()
	justOver := filepath.Join(dir, "just_over.yaml")
	body := "parts:\n" + strings.Repeat("  - {type: resistor, name: R, between: [a, gnd], value: 1k}\n", MaxFileSize/60+1)
	if err := os.WriteFile(justOver, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	huge := filepath.Join(dir, "fifty_megabytes.yaml")
	f, err := os.Create(huge)
	if err != nil {
		t.Fatal(err)
	}
	// A sparse file: 50 MB long, no disk needed.
	if err := f.Truncate(50 << 20); err != nil {
		t.Fatal(err)
	}
	f.Close()
	cases := []struct {
		path     string
		maxAlloc uint64 // bytes Load may allocate
	}{
		{justOver, 1 << 20},
		{huge, 1 << 20},
	}
	if _, err := os.Stat("/dev/zero"); err == nil {
		// Endless, and its size is unknown: read up to the limit only.
		cases = append(cases, struct {
			path     string
			maxAlloc uint64
		}{"/dev/zero", 8 * MaxFileSize})
	}
	for _, c := range cases {
		var before, after runtime.MemStats
		runtime.GC()
		runtime.ReadMemStats(&before)
		start := time.Now()
		_, err := Load(c.path)
		took := time.Since(start)
		runtime.ReadMemStats(&after)
		if err == nil {
			t.Fatalf("Load(%s) succeeded", c.path)
		}
		var list ErrorList
		if !errors.As(err, &list) || list[0].Line != 1 || list[0].Col != 1 || !strings.Contains(err.Error(), "too large for a circuit file; accepted: up to 1048576 bytes") {
			t.Errorf("Load(%s): %v; want a 1:1 problem naming the size limit", c.path, err)
		}
		if took > time.Second {
			t.Errorf("Load(%s) took %v, want under a second", c.path, took)
		}
		if alloc := after.TotalAlloc - before.TotalAlloc; alloc > c.maxAlloc {
			t.Errorf("Load(%s) allocated %d bytes, want at most %d", c.path, alloc, c.maxAlloc)
		}
		t.Logf("%s: refused in %v, %d bytes allocated", filepath.Base(c.path), took, after.TotalAlloc-before.TotalAlloc)
	}
}

// TestWiringWarnings: names that differ from gnd only by case, spaces or
// invisible characters, and nodes with one terminal, load (they are
// legal) but are warned about at their FILE:LINE:COL (issue 13, item 4).
// The demos and the hard circuits draw no such warning.
func TestWiringWarnings(t *testing.T) {
	const head = "diode_models:\n  m: {saturation_current: 1e-14}\nparts:\n  - {type: voltage_source, name: V1, plus: a, minus: gnd, value: 1}\n  - {type: resistor, name: R1, between: [a, k], value: 1k}\n  - {type: resistor, name: R3, between: [k, gnd], value: 1k}\n"
	cases := []struct {
		line  string // the sixth line of the file
		kinds []WarningKind
		at    string
	}{
		{`  - {type: diode, name: D1, anode: k, cathode: GND, model: m}`, []WarningKind{GroundLookalike, Dangling}, "7:48"},
		{`  - {type: diode, name: D1, anode: k, cathode: "gnd ", model: m}`, []WarningKind{GroundLookalike, Dangling}, "7:48"},
		{`  - {type: diode, name: D1, anode: k, cathode: "gnd\u200b", model: m}`, []WarningKind{GroundLookalike, Dangling}, "7:48"},
		{`  - {type: diode, name: D1, anode: k, cathode: "g\u00adnd", model: m}`, []WarningKind{GroundLookalike, Dangling}, "7:48"},
		{`  - {type: diode, name: D1, anode: k, cathode: kk, model: m}`, []WarningKind{Dangling}, "7:48"},
		{`  - {type: diode, name: D1, anode: k, cathode: gnd, model: m}`, nil, ""},
	}
	for _, c := range cases {
		cir, err := Parse("w.yaml", []byte(head+c.line+"\n"))
		if err != nil {
			t.Fatalf("%s: %v", c.line, err)
		}
		var kinds []WarningKind
		for _, w := range cir.Warnings {
			kinds = append(kinds, w.Kind)
			if got := fmt.Sprintf("%d:%d", w.Line, w.Col); got != c.at {
				t.Errorf("%s: warning at %s, want %s: %v", c.line, got, c.at, w)
			}
		}
		if fmt.Sprint(kinds) != fmt.Sprint(c.kinds) {
			t.Errorf("%s: warnings %v, want %v (%v)", c.line, kinds, c.kinds, cir.Warnings)
		}
	}
	paths, _ := filepath.Glob("../../testdata/demo/*.yaml")
	hard, _ := filepath.Glob("../../testdata/hard/*.yaml")
	for _, path := range append(paths, hard...) {
		cir, err := Load(path)
		if err != nil {
			t.Fatal(err)
		}
		if len(cir.Warnings) > 0 {
			t.Errorf("%s: %v", path, cir.Warnings)
		}
	}
}
