package explore

import (
	"strings"
	"testing"
)

// TestLoopbackAddress: the server takes loopback addresses only
// (127.0.0.0/8, ::1, localhost); anything else is refused, saying what is
// accepted.
func TestLoopbackAddress(t *testing.T) {
	for _, k := range []struct {
		in, want string
	}{
		{"", "127.0.0.1:0"},
		{"127.0.0.1:8470", "127.0.0.1:8470"},
		{"127.5.6.7:0", "127.5.6.7:0"},
		{"localhost:0", "127.0.0.1:0"},
		{"[::1]:0", "[::1]:0"},
		{"0.0.0.0:8470", ""},
		{"[::]:8470", ""},
		{"192.168.1.2:80", ""},
		{"example.com:80", ""},
		{"127.0.0.1", ""},
		{"127.0.0.1:99999", ""},
		{":8470", ""},
	} {
		got, err := LoopbackAddress(k.in)
		if k.want == "" {
			if err == nil || !strings.Contains(err.Error(), "accepted: a loopback address") {
				t.Errorf("address %q: %q, %v; want refused", k.in, got, err)
			}
			continue
		}
		if err != nil || got != k.want {
			t.Errorf("address %q: %q, %v; want %q", k.in, got, err, k.want)
		}
	}
}
