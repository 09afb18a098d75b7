package explore

import (
	"embed"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"mime"
	"net/http"
	"strings"
	"sync"
)

//go:embed page
var assets embed.FS

// MaxBody bounds a request's body: a move names each control once, in
// at most a few kilobytes.
const MaxBody = 64 << 10

// maxText bounds one value's text, as the circuit file bounds a value.
const maxText = 1000

// Settings configure the page's server.
type Settings struct {
	// Hosts lists the Host header values a request may carry: the
	// loopback address and port the server listens on (127.0.0.1:PORT,
	// localhost:PORT). Any other is refused, so that a page of another
	// site whose name is made to resolve to this machine (DNS rebinding)
	// cannot reach the session.
	Hosts []string
	// CircuitPath and SaveCircuit write the values as a circuit file;
	// ReportPath and SaveReport write the report at the values. The paths
	// are fixed before the server starts; no request names a path. A nil
	// function leaves its button out.
	CircuitPath string
	SaveCircuit func(data []byte) error
	ReportPath  string
	SaveReport  func(data []byte) error
}

// Handler serves the explorer's page and its requests for session s. It
// serves a fixed set of paths: the page and its script and styles,
// embedded in the binary, and the session's requests; it reads and
// writes no file but through Settings' functions.
func Handler(s *Session, set Settings) http.Handler {
	h := &handler{s: s, set: set, hosts: map[string]bool{}}
	for _, host := range set.Hosts {
		h.hosts[strings.ToLower(host)] = true
	}
	return h
}

type handler struct {
	s     *Session
	set   Settings
	hosts map[string]bool
	save  sync.Mutex // one write at a time
}

// contentSecurity lets the page load its own script and styles, draw
// figures from blob: URLs it makes itself, and talk to its own server,
// and nothing else: no request can leave for another address.
const contentSecurity = "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' blob:; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'"

func (h *handler) ServeHTTP(w http.ResponseWriter, r *http.Request) {
	hd := w.Header()
	hd.Set("Content-Security-Policy", contentSecurity)
	hd.Set("X-Content-Type-Options", "nosniff")
	hd.Set("Referrer-Policy", "no-referrer")
	hd.Set("X-Frame-Options", "DENY")
	hd.Set("Cross-Origin-Resource-Policy", "same-origin")
	hd.Set("Cache-Control", "no-store")
	if !h.hosts[strings.ToLower(r.Host)] {
		http.Error(w, "refused: this server answers only its own loopback address", http.StatusForbidden)
		return
	}
	switch r.URL.Path {
	case "/", "/index.html":
		h.asset(w, r, "page/index.html")
	case "/explore.js":
		h.asset(w, r, "page/explore.js")
	case "/explore.css":
		h.asset(w, r, "page/explore.css")
	case "/api/setup":
		if r.Method != http.MethodGet {
			methodNotAllowed(w, http.MethodGet)
			return
		}
		writeJSON(w, http.StatusOK, struct {
			Setup
			CircuitPath string `json:"circuitPath,omitempty"`
			ReportPath  string `json:"reportPath,omitempty"`
			MaxBody     int    `json:"maxBody"`
		}{h.s.Setup(), h.pathIf(h.set.CircuitPath, h.set.SaveCircuit != nil), h.pathIf(h.set.ReportPath, h.set.SaveReport != nil), MaxBody})
	case "/api/move":
		h.post(w, r, h.move)
	case "/api/check":
		h.post(w, r, h.check)
	case "/api/save-circuit":
		h.post(w, r, h.saveCircuit)
	case "/api/save-report":
		h.post(w, r, h.saveReport)
	default:
		http.NotFound(w, r)
	}
}

func (h *handler) pathIf(p string, ok bool) string {
	if ok {
		return p
	}
	return ""
}

func (h *handler) asset(w http.ResponseWriter, r *http.Request, name string) {
	if r.Method != http.MethodGet && r.Method != http.MethodHead {
		methodNotAllowed(w, http.MethodGet)
		return
	}
	b, err := assets.ReadFile(name)
	if err != nil {
		http.NotFound(w, r)
		return
	}
	ct := mime.TypeByExtension(name[strings.LastIndexByte(name, '.'):])
	if strings.HasSuffix(name, ".js") {
		ct = "text/javascript; charset=utf-8"
	}
	w.Header().Set("Content-Type", ct)
	w.Write(b)
}

func methodNotAllowed(w http.ResponseWriter, allow string) {
	w.Header().Set("Allow", allow)
	http.Error(w, "method not allowed; accepted: "+allow, http.StatusMethodNotAllowed)
}

// post checks a request that acts on the session — POST, JSON, from the
// page itself, within MaxBody — reads its Request and hands it on.
func (h *handler) post(w http.ResponseWriter, r *http.Request, next func(http.ResponseWriter, *http.Request, Request)) {
	if r.Method != http.MethodPost {
		methodNotAllowed(w, http.MethodPost)
		return
	}
	if ct, _, _ := mime.ParseMediaType(r.Header.Get("Content-Type")); ct != "application/json" {
		writeJSON(w, http.StatusUnsupportedMediaType, problem{"the body must be application/json"})
		return
	}
	// A browser names the page a request comes from; the page's own
	// origin is the only one accepted.
	if o := r.Header.Get("Origin"); o != "" && !h.hosts[strings.ToLower(strings.TrimPrefix(o, "http://"))] {
		writeJSON(w, http.StatusForbidden, problem{"refused: a request from another page"})
		return
	}
	if site := r.Header.Get("Sec-Fetch-Site"); site != "" && site != "same-origin" && site != "none" {
		writeJSON(w, http.StatusForbidden, problem{"refused: a request from another site"})
		return
	}
	req, err := readRequest(http.MaxBytesReader(w, r.Body, MaxBody), len(h.s.controls))
	if err != nil {
		status := http.StatusBadRequest
		var tooBig *http.MaxBytesError
		if errors.As(err, &tooBig) {
			status = http.StatusRequestEntityTooLarge
			err = fmt.Errorf("the body is over %d bytes", MaxBody)
		}
		writeJSON(w, status, problem{err.Error()})
		return
	}
	next(w, r, req)
}

// readRequest decodes one Request and nothing after it, with at most
// controls+1 values of at most maxText characters each.
func readRequest(body io.Reader, controls int) (Request, error) {
	var req Request
	dec := json.NewDecoder(body)
	dec.DisallowUnknownFields()
	if err := dec.Decode(&req); err != nil {
		return req, fmt.Errorf("the body is not a request: %w", err)
	}
	if _, err := dec.Token(); err != io.EOF {
		return req, fmt.Errorf("the body holds more than one request")
	}
	if len(req.Values) > controls+1 {
		return req, fmt.Errorf("%d values; the circuit has %d", len(req.Values), controls)
	}
	for k, v := range req.Values {
		if len(k) > maxText || len(v) > maxText {
			return req, fmt.Errorf("a value or its name is over %d characters", maxText)
		}
	}
	return req, nil
}

type problem struct {
	Error string `json:"error"`
}

func writeJSON(w http.ResponseWriter, status int, v any) {
	b, err := json.Marshal(v)
	if err != nil {
		status, b = http.StatusInternalServerError, []byte(`{"error":"the answer could not be written as JSON"}`)
	}
	w.Header().Set("Content-Type", "application/json")
	w.WriteHeader(status)
	w.Write(b)
}

// staleAnswer is the answer to a move or check a newer one cancelled.
var staleAnswer = struct {
	Stale bool `json:"stale"`
}{true}

func (h *handler) move(w http.ResponseWriter, r *http.Request, req Request) {
	v, err := h.s.Move(r.Context(), req)
	if err != nil {
		writeJSON(w, http.StatusConflict, staleAnswer)
		return
	}
	writeJSON(w, http.StatusOK, v)
}

// check streams the waveform check as lines of JSON: {"progress": ...}
// after each waveform solve, then {"result": ...} (or {"stale": true}).
func (h *handler) check(w http.ResponseWriter, r *http.Request, req Request) {
	w.Header().Set("Content-Type", "application/x-ndjson")
	w.WriteHeader(http.StatusOK)
	flusher, _ := w.(http.Flusher)
	var mu sync.Mutex
	line := func(v any) {
		b, err := json.Marshal(v)
		if err != nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		w.Write(append(b, '\n'))
		if flusher != nil {
			flusher.Flush()
		}
	}
	res, err := h.s.Check(r.Context(), req, func(p Progress) {
		line(struct {
			Progress Progress `json:"progress"`
		}{p})
	})
	if err != nil {
		line(staleAnswer)
		return
	}
	line(struct {
		Result *CheckView `json:"result"`
	}{res})
}

func (h *handler) saveCircuit(w http.ResponseWriter, r *http.Request, req Request) {
	if h.set.SaveCircuit == nil {
		http.NotFound(w, r)
		return
	}
	data, err := h.s.CircuitFile(req)
	if err != nil {
		writeJSON(w, http.StatusBadRequest, problem{err.Error()})
		return
	}
	h.save.Lock()
	err = h.set.SaveCircuit(data)
	h.save.Unlock()
	if err != nil {
		writeJSON(w, http.StatusInternalServerError, problem{err.Error()})
		return
	}
	writeJSON(w, http.StatusOK, written{h.set.CircuitPath})
}

func (h *handler) saveReport(w http.ResponseWriter, r *http.Request, req Request) {
	if h.set.SaveReport == nil {
		http.NotFound(w, r)
		return
	}
	data, err := h.s.ReportFile(req)
	if err != nil {
		writeJSON(w, http.StatusBadRequest, problem{err.Error()})
		return
	}
	h.save.Lock()
	err = h.set.SaveReport(data)
	h.save.Unlock()
	if err != nil {
		writeJSON(w, http.StatusInternalServerError, problem{err.Error()})
		return
	}
	writeJSON(w, http.StatusOK, written{h.set.ReportPath})
}

type written struct {
	Written string `json:"written"`
}
