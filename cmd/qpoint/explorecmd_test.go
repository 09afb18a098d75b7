package main

import (
	"bytes"
	"context"
	"io"
	"net/http"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestExploreListenLoopbackOnly: --listen takes loopback addresses only
// (explore.LoopbackAddress); anything else is refused as bad input before
// a socket is opened.
func TestExploreListenLoopbackOnly(t *testing.T) {
	var out, errb bytes.Buffer
	if code := run([]string{"explore", demoFile("detector"), "--listen", "0.0.0.0:0"}, &out, &errb); code != exitInput {
		t.Errorf("--listen 0.0.0.0:0: exit %d, want %d: %s", code, exitInput, errb.String())
	}
}

func demoFile(name string) string { return filepath.Join("..", "..", "testdata", "demo", name+".yaml") }

// TestExploreNeverOverInput: the save buttons' files may not be the
// circuit file itself; the command refuses before serving.
func TestExploreNeverOverInput(t *testing.T) {
	for _, flag := range []string{"--circuit-out", "--report-out"} {
		var out, errb bytes.Buffer
		file := demoFile("detector")
		if code := run([]string{"explore", file, flag, file}, &out, &errb); code != exitInput || !strings.Contains(errb.String(), "refusing") {
			t.Errorf("%s FILE: exit %d: %s", flag, code, errb.String())
		}
	}
}

// TestExploreServes: the command prints its URL and serves the page
// there until it is stopped.
func TestExploreServes(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	ready := make(chan string, 1)
	done := make(chan error, 1)
	var out bytes.Buffer
	dir := t.TempDir()
	go func() {
		done <- runExplore(ctx, &fileGuard{}, &out, io.Discard, exploreOptions{file: demoFile("limiter"),
			circuitOut: filepath.Join(dir, "a.yaml"), reportOut: filepath.Join(dir, "a.html")}, func(u string) { ready <- u })
	}()
	var url string
	select {
	case url = <-ready:
	case err := <-done:
		t.Fatal(err)
	case <-time.After(20 * time.Second):
		t.Fatal("not serving after 20 s")
	}
	r, err := http.Get(url + "api/setup")
	if err != nil {
		t.Fatal(err)
	}
	body, _ := io.ReadAll(r.Body)
	r.Body.Close()
	if r.StatusCode != 200 || !strings.Contains(string(body), `"title":"Anti-parallel diode limiter"`) {
		t.Errorf("setup: %d %s", r.StatusCode, body[:min(len(body), 200)])
	}
	if !strings.Contains(out.String(), url) {
		t.Errorf("the command did not print %s:\n%s", url, out.String())
	}
	cancel()
	if err := <-done; err != nil {
		t.Errorf("stopping: %v", err)
	}
}
