package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"net/url"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/chromedp"
	"github.com/chromedp/chromedp/kb"

	"qpoint/bias/circuit"
)

// chromium returns Debian's chromium, or "" when it is not installed.
func chromium() string {
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// TestExploreInBrowser drives the explorer in headless Chromium on the
// detector demo as a user would: it moves the Rbias slider with the
// keyboard, waits for the page to redraw, and checks that the Q-point
// current the page shows is what `qpoint bias --set Rbias.value=...`
// prints for the value the slider wrote; it types a value the file would
// refuse and finds the loader's message under the box; it saves the
// values and the report. Every request the page makes must stay on the
// server's loopback address, and every move must redraw within its
// deadline, or the test fails.
//
// It skips when chromium is not installed, unless QPOINT_BROWSER_TEST is
// "require" (as .ci/run sets it, after installing chromium). With
// QPOINT_SCREENSHOTS=DIR it writes full-page screenshots at 1280 px and
// 390 px wide there.
func TestExploreInBrowser(t *testing.T) {
	browser := chromium()
	if browser == "" {
		if os.Getenv("QPOINT_BROWSER_TEST") == "require" {
			t.Fatal("chromium is not installed, and QPOINT_BROWSER_TEST=require asks for the browser test")
		}
		t.Skip("chromium is not installed (Debian: apt-get install chromium); the browser test needs it")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 90*time.Second)
	defer cancel()

	dir := t.TempDir()
	file := filepath.Join("..", "..", "testdata", "demo", "detector.yaml")
	saved, reported := filepath.Join(dir, "saved.yaml"), filepath.Join(dir, "report.html")
	ready := make(chan string, 1)
	served := make(chan error, 1)
	serveCtx, stopServing := context.WithCancel(ctx)
	go func() {
		served <- runExplore(serveCtx, &fileGuard{}, io.Discard, io.Discard, exploreOptions{file: file, circuitOut: saved, reportOut: reported}, func(u string) { ready <- u })
	}()
	defer func() {
		stopServing()
		if err := <-served; err != nil {
			t.Errorf("server: %v", err)
		}
	}()
	var page string
	select {
	case page = <-ready:
	case err := <-served:
		t.Fatalf("the explorer did not start: %v", err)
	}
	home, err := url.Parse(page)
	if err != nil {
		t.Fatal(err)
	}

	alloc, cancelAlloc := chromedp.NewExecAllocator(ctx,
		chromedp.ExecPath(browser),
		chromedp.Headless,
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("no-sandbox", true),
		chromedp.Flag("disable-gpu", true),
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(filepath.Join(dir, "profile")),
		chromedp.WindowSize(1280, 900),
	)
	defer cancelAlloc()
	bctx, cancelBrowser := chromedp.NewContext(alloc)
	defer cancelBrowser()

	// The first Do opens the tab; the listener then sees every request
	// of the page, the first load included.
	if err := chromedp.Do(bctx); err != nil {
		t.Fatal(err)
	}
	var mu sync.Mutex
	var requests []string
	if err := chromedp.Listen(bctx, func(ev any) {
		if e, ok := ev.(*network.EventRequestWillBeSent); ok {
			mu.Lock()
			requests = append(requests, e.Request.URL)
			mu.Unlock()
		}
	}); err != nil {
		t.Fatal(err)
	}

	redraws := 0
	// waitRedraw waits until the page has drawn an answer to the values
	// as they stand, after the redraw count it had.
	waitRedraw := func(what string) {
		t.Helper()
		deadline := time.Now().Add(15 * time.Second)
		for {
			n, err := chromedp.Run(bctx, chromedp.Evaluate[int](`Number(document.body.dataset.redraws || 0)`))
			if err != nil {
				t.Fatalf("%s: %v", what, err)
			}
			current, err := chromedp.Run(bctx, chromedp.Evaluate[string](`document.body.dataset.current || ''`))
			if err != nil {
				t.Fatalf("%s: %v", what, err)
			}
			if n > redraws && current == "1" {
				redraws = n
				return
			}
			if time.Now().After(deadline) {
				t.Fatalf("%s: the page did not redraw within 15 s (redraws %d, current %q)", what, n, current)
			}
			time.Sleep(30 * time.Millisecond)
		}
	}
	// Typing replaces the box's text as a user selecting it all would.
	clearBox := chromedp.Evaluate[chromedp.Void](`document.querySelector('.control[data-name="Rbias.value"] input[type=text]').value = ''`)
	slider := chromedp.CSS(`.control[data-name="Rbias.value"] input[type=range]`)
	box := chromedp.CSS(`.control[data-name="Rbias.value"] input[type=text]`)
	cell := chromedp.CSS(`#table-qpoints tr[data-row="current"] td[data-column="D1"]`)

	if err := chromedp.Do(bctx, chromedp.Navigate(page), chromedp.WaitVisible(slider)); err != nil {
		t.Fatal(err)
	}
	waitRedraw("the first view")

	// Drag the slider with the keyboard: each arrow press is an input
	// event, as a drag's steps are; the page sends what it can and the
	// newest values win.
	for round, presses := range []int{40, 25, 60} {
		key := kb.ArrowLeft
		if round == 1 {
			key = kb.ArrowRight
		}
		if err := chromedp.Do(bctx, chromedp.Focus(slider), chromedp.KeyEvent(strings.Repeat(key, presses))); err != nil {
			t.Fatal(err)
		}
		waitRedraw(fmt.Sprintf("slider round %d", round+1))
		value, err := chromedp.Run(bctx, chromedp.Value(box))
		if err != nil {
			t.Fatal(err)
		}
		shown, err := chromedp.Run(bctx, chromedp.Text(cell))
		if err != nil {
			t.Fatal(err)
		}
		want := biasCurrent(t, file, "Rbias.value="+value)
		if shown != want {
			t.Errorf("round %d, Rbias %s: the page shows a D1 current of %q; qpoint bias --set prints %q", round+1, value, shown, want)
		} else {
			t.Logf("round %d: Rbias %s, D1 current %s on the page and from qpoint bias", round+1, value, shown)
		}
	}

	// A typed value the file would refuse: the loader's message, under
	// the box, and nothing analysed.
	if err := chromedp.Do(bctx, clearBox, chromedp.SendKeys(box, "-5k"+kb.Enter)); err != nil {
		t.Fatal(err)
	}
	waitRedraw("a refused value")
	msg, err := chromedp.Run(bctx, chromedp.Text(chromedp.CSS(`.control[data-name="Rbias.value"] .msg`)))
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(msg, "is not above zero; accepted: a positive resistance") {
		t.Errorf("typed -5k: the page says %q", msg)
	}
	if err := chromedp.Do(bctx, clearBox, chromedp.SendKeys(box, "150k"+kb.Enter)); err != nil {
		t.Fatal(err)
	}
	waitRedraw("a typed value")
	shown, err := chromedp.Run(bctx, chromedp.Text(cell))
	if err != nil {
		t.Fatal(err)
	}
	if want := biasCurrent(t, file, "Rbias.value=150k"); shown != want {
		t.Errorf("typed 150k: the page shows %q, qpoint bias %q", shown, want)
	}

	// The waveform check, on request, shows its progress and then the
	// waveform beside the estimate.
	if err := chromedp.Do(bctx, chromedp.Click(chromedp.ID("check"))); err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	for deadline := time.Now().Add(30 * time.Second); ; time.Sleep(20 * time.Millisecond) {
		status, err := chromedp.Run(bctx, chromedp.Evaluate[string](`document.getElementById('check-status').textContent`))
		if err != nil {
			t.Fatal(err)
		}
		seen[status] = true
		if strings.HasPrefix(status, "done in") {
			break
		}
		if strings.HasPrefix(status, "The check failed") || strings.HasPrefix(status, "Stopped") || time.Now().After(deadline) {
			t.Fatalf("the waveform check: %q", status)
		}
	}
	progress := 0
	for s := range seen {
		if strings.Contains(s, "waveform solves") {
			progress++
		}
	}
	if progress < 2 {
		t.Errorf("the check showed %d progress states: %v", progress, seen)
	}
	if n, err := chromedp.Run(bctx, chromedp.Evaluate[int](`document.querySelectorAll('#check-tables table, #check-figures img').length`)); err != nil || n < 5 {
		t.Errorf("the check drew %d tables and figures (%v)", n, err)
	}

	// Keep what was found: the circuit file and the report.
	if err := chromedp.Do(bctx, chromedp.Click(chromedp.ID("save-circuit")), chromedp.Click(chromedp.ID("save-report"))); err != nil {
		t.Fatal(err)
	}
	waitFile(t, saved)
	waitFile(t, reported)
	c, err := circuit.Load(saved)
	if err != nil {
		t.Fatalf("the saved circuit file does not load: %v", err)
	}
	if c.Parts[1].Name != "Rbias" || c.Parts[1].Value != 150e3 {
		t.Errorf("the saved file has %s = %g, want Rbias 150 kΩ", c.Parts[1].Name, c.Parts[1].Value)
	}

	if shots := os.Getenv("QPOINT_SCREENSHOTS"); shots != "" {
		screenshots(t, bctx, shots)
	}

	mu.Lock()
	defer mu.Unlock()
	if len(requests) < 5 {
		t.Errorf("only %d requests seen: %v", len(requests), requests)
	}
	for _, r := range requests {
		u, err := url.Parse(r)
		if err != nil {
			t.Errorf("request to %q", r)
			continue
		}
		switch {
		case u.Scheme == "http" && u.Host == home.Host:
		case u.Scheme == "blob" && strings.HasPrefix(u.Opaque, "http://"+home.Host+"/"):
		case u.Scheme == "data", r == "about:blank":
		default:
			t.Errorf("the page made a request off its loopback server: %s", r)
		}
	}
}

// biasCurrent runs `qpoint bias FILE --set SET` and returns the D1
// current its Q-point table prints.
func biasCurrent(t *testing.T, file, set string) string {
	t.Helper()
	var out, errb bytes.Buffer
	if code := run([]string{"bias", file, "--set", set}, &out, &errb); code != 0 {
		t.Fatalf("qpoint bias --set %s: exit %d: %s", set, code, errb.String())
	}
	for _, line := range strings.Split(out.String(), "\n") {
		if f := strings.TrimSpace(line); strings.HasPrefix(f, "current ") {
			return strings.TrimSpace(strings.TrimPrefix(f, "current"))
		}
	}
	t.Fatalf("qpoint bias printed no current:\n%s", out.String())
	return ""
}

// waitFile waits for a file the page asked the server to write.
func waitFile(t *testing.T, path string) {
	t.Helper()
	for deadline := time.Now().Add(20 * time.Second); time.Now().Before(deadline); time.Sleep(50 * time.Millisecond) {
		if st, err := os.Stat(path); err == nil && st.Size() > 0 {
			return
		}
	}
	t.Fatalf("%s was not written", path)
}

// screenshots writes what screens 1280 px and 390 px wide show of the
// page, at its top and scrolled down, and the whole page at 1280 px.
func screenshots(t *testing.T, ctx context.Context, dir string) {
	t.Helper()
	save := func(name string, png []byte) {
		if err := os.WriteFile(filepath.Join(dir, name), png, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	for _, width := range []int64{1280, 390} {
		if err := chromedp.Do(ctx, chromedp.EmulateViewport(width, 844), chromedp.Sleep(300*time.Millisecond)); err != nil {
			t.Fatal(err)
		}
		if width == 1280 {
			png, err := chromedp.Run(ctx, chromedp.FullScreenshot(100))
			if err != nil {
				t.Fatal(err)
			}
			save("explore-1280-page.png", png)
		}
		for _, y := range []int{0, 700} {
			if err := chromedp.Do(ctx, chromedp.Evaluate[chromedp.Void](fmt.Sprintf("window.scrollTo(0, %d)", y)), chromedp.Sleep(200*time.Millisecond)); err != nil {
				t.Fatal(err)
			}
			png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
			if err != nil {
				t.Fatal(err)
			}
			save(fmt.Sprintf("explore-%d-at-%d.png", width, y), png)
		}
	}
}
