package explore

import (
	"bufio"
	"encoding/json"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"
)

// serve starts the handler for the detector demo; written collects what
// the save buttons would write.
func serve(t *testing.T) (*httptest.Server, map[string][]byte) {
	t.Helper()
	s := newSession(t, "detector")
	written := map[string][]byte{}
	srv := httptest.NewUnstartedServer(nil)
	host := srv.Listener.Addr().String()
	srv.Config.Handler = Handler(s, Settings{
		Hosts:       []string{host},
		CircuitPath: "saved.yaml",
		SaveCircuit: func(b []byte) error { written["circuit"] = b; return nil },
		ReportPath:  "report.html",
		SaveReport:  func(b []byte) error { written["report"] = b; return nil },
	})
	srv.Start()
	t.Cleanup(srv.Close)
	return srv, written
}

func do(t *testing.T, srv *httptest.Server, method, path, body string, header map[string]string) *http.Response {
	t.Helper()
	req, err := http.NewRequest(method, srv.URL+path, strings.NewReader(body))
	if err != nil {
		t.Fatal(err)
	}
	if body != "" {
		req.Header.Set("Content-Type", "application/json")
	}
	for k, v := range header {
		if k == "Host" {
			req.Host = v
			continue
		}
		req.Header.Set(k, v)
	}
	r, err := srv.Client().Do(req)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { r.Body.Close() })
	return r
}

// TestServerRefuses: the server answers only its own host, only its own
// paths, POSTs of JSON from its own page within the size bound; every
// answer carries the policy that keeps the page from reaching anywhere
// else.
func TestServerRefuses(t *testing.T) {
	srv, _ := serve(t)
	move := `{"values":{"Rbias.value":"100k"}}`
	cases := []struct {
		name         string
		method, path string
		body         string
		header       map[string]string
		status       int
	}{
		{"the page", "GET", "/", "", nil, 200},
		{"its script", "GET", "/explore.js", "", nil, 200},
		{"another host name (DNS rebinding)", "GET", "/", "", map[string]string{"Host": "attacker.example:80"}, 403},
		{"localhost not listed", "GET", "/api/setup", "", map[string]string{"Host": "localhost"}, 403},
		{"a path outside the page", "GET", "/../../etc/passwd", "", nil, 404},
		{"a file of the package", "GET", "/page/index.html", "", nil, 404},
		{"the embedded folder", "GET", "/page/", "", nil, 404},
		{"a move by GET", "GET", "/api/move", "", nil, 405},
		{"a move as a form", "POST", "/api/move", move, map[string]string{"Content-Type": "application/x-www-form-urlencoded"}, 415},
		{"a move from another page", "POST", "/api/move", move, map[string]string{"Origin": "http://attacker.example"}, 403},
		{"a move from another site", "POST", "/api/move", move, map[string]string{"Sec-Fetch-Site": "cross-site"}, 403},
		{"a body over the bound", "POST", "/api/move", `{"values":{"Rbias.value":"` + strings.Repeat("1", MaxBody) + `"}}`, nil, 413},
		{"an unknown field", "POST", "/api/move", `{"path":"/etc/passwd"}`, nil, 400},
		{"two requests in one body", "POST", "/api/move", move + move, nil, 400},
		{"a value over 1000 characters", "POST", "/api/move", `{"values":{"Rbias.value":"` + strings.Repeat("1", 1001) + `"}}`, nil, 400},
		{"a move", "POST", "/api/move", move, nil, 200},
	}
	for _, k := range cases {
		r := do(t, srv, k.method, k.path, k.body, k.header)
		if r.StatusCode != k.status {
			t.Errorf("%s: status %d, want %d", k.name, r.StatusCode, k.status)
		}
		if csp := r.Header.Get("Content-Security-Policy"); !strings.Contains(csp, "default-src 'none'") || !strings.Contains(csp, "connect-src 'self'") {
			t.Errorf("%s: policy %q", k.name, csp)
		}
	}
}

// TestServerSaves: the save buttons write through the functions given,
// to the paths fixed at the start; a refused value writes nothing.
func TestServerSaves(t *testing.T) {
	srv, written := serve(t)
	r := do(t, srv, "POST", "/api/save-circuit", `{"values":{"Rbias.value":"100k"}}`, nil)
	var ans struct{ Written, Error string }
	json.NewDecoder(r.Body).Decode(&ans)
	if r.StatusCode != 200 || ans.Written != "saved.yaml" || !strings.Contains(string(written["circuit"]), "value: 100k}") {
		t.Errorf("save: %d %+v\n%s", r.StatusCode, ans, written["circuit"])
	}
	delete(written, "circuit")
	r = do(t, srv, "POST", "/api/save-circuit", `{"values":{"Rbias.value":"-1"}}`, nil)
	if r.StatusCode != 400 || written["circuit"] != nil {
		t.Errorf("a refused value: status %d, wrote %q", r.StatusCode, written["circuit"])
	}
	r = do(t, srv, "POST", "/api/save-report", `{"values":{}}`, nil)
	if r.StatusCode != 200 || !strings.Contains(string(written["report"]), "<title>Low-barrier detector with bias resistor</title>") {
		t.Errorf("report: %d %.200q", r.StatusCode, written["report"])
	}
}

// TestServerCheckStreams: the waveform check answers in lines, progress
// first and the result last.
func TestServerCheckStreams(t *testing.T) {
	if testing.Short() {
		t.Skip("the waveform check solves about 60 waveforms")
	}
	srv, _ := serve(t)
	r := do(t, srv, "POST", "/api/check", `{"values":{}}`, nil)
	sc := bufio.NewScanner(r.Body)
	sc.Buffer(nil, 16<<20)
	var progress int
	var last map[string]json.RawMessage
	for sc.Scan() {
		last = nil
		if err := json.Unmarshal(sc.Bytes(), &last); err != nil {
			t.Fatal(err)
		}
		if _, ok := last["progress"]; ok {
			progress++
		}
	}
	if _, ok := last["result"]; !ok || progress < 10 {
		t.Errorf("%d progress lines, last line %v", progress, last)
	}
}
