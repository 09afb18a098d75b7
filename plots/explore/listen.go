package explore

import (
	"context"
	"errors"
	"fmt"
	"net"
	"net/http"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"
)

// LoopbackAddress checks an address to serve on: a loopback address
// (127.0.0.0/8, ::1 or localhost) and a port, 127.0.0.1 and a free port
// when s is empty. The explorer serves this computer only; its errors say
// what is accepted.
func LoopbackAddress(s string) (string, error) {
	const accepted = "accepted: a loopback address and port such as 127.0.0.1:8470, [::1]:8470 or localhost:8470 (port 0 picks a free one)"
	if s == "" {
		return "127.0.0.1:0", nil
	}
	host, port, err := net.SplitHostPort(s)
	if err != nil {
		return "", fmt.Errorf("%q is not HOST:PORT; %s", s, accepted)
	}
	if p, err := strconv.Atoi(port); err != nil || p < 0 || p > 65535 {
		return "", fmt.Errorf("port %q is not a number from 0 to 65535; %s", port, accepted)
	}
	if strings.EqualFold(host, "localhost") {
		host = "127.0.0.1"
	}
	ip := net.ParseIP(host)
	if ip == nil || !ip.IsLoopback() {
		return "", fmt.Errorf("%q is not a loopback address; the explorer serves this computer only; %s", host, accepted)
	}
	return net.JoinHostPort(ip.String(), port), nil
}

// Hosts are the Host headers the page is served under when the server
// listens on bound (host:port): bound itself and localhost at its port.
func Hosts(bound string) []string {
	_, port, _ := net.SplitHostPort(bound)
	return []string{bound, "localhost:" + port}
}

// OpenBrowser asks the desktop to open url in the user's browser.
func OpenBrowser(url string) error {
	var c *exec.Cmd
	switch runtime.GOOS {
	case "darwin":
		c = exec.Command("open", url)
	case "windows":
		c = exec.Command("rundll32", "url.dll,FileProtocolHandler", url)
	default:
		c = exec.Command("xdg-open", url)
	}
	if err := c.Start(); err != nil {
		return err
	}
	go c.Wait()
	return nil
}

// ErrStopped is the error of a server that stopped by itself.
var ErrStopped = errors.New("the server stopped")

// Serve serves h on ln until ctx is done, then shuts the server down,
// letting requests in flight finish for up to five seconds. A server that
// stops by itself returns ErrStopped, wrapped with the cause. Headers
// must come within ten seconds and 16 kB.
func Serve(ctx context.Context, ln net.Listener, h http.Handler) error {
	srv := &http.Server{Handler: h, ReadHeaderTimeout: 10 * time.Second, MaxHeaderBytes: 16 << 10}
	served := make(chan error, 1)
	go func() { served <- srv.Serve(ln) }()
	select {
	case err := <-served:
		return fmt.Errorf("%w: %w", ErrStopped, err)
	case <-ctx.Done():
	}
	stop, cancel := context.WithTimeout(context.Background(), 5*time.Second)
	defer cancel()
	return srv.Shutdown(stop)
}

// SavePaths are the files the save buttons write unless told otherwise:
// the circuit file's name with .explored.yaml and .explored.html, beside
// it and never the file itself.
func SavePaths(file string) (circuitPath, reportPath string) {
	stem := strings.TrimSuffix(file, filepath.Ext(file))
	return stem + ".explored.yaml", stem + ".explored.html"
}
