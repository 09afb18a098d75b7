package output

import (
	"fmt"
	"io"
	"unicode"
	"unicode/utf8"
)

// Checked passes writes on to W and keeps the first error, so that a
// command printing many lines with fmt.Fprintf cannot lose one unseen.
type Checked struct {
	W   io.Writer
	Err error
}

func (c *Checked) Write(p []byte) (int, error) {
	if c.Err != nil {
		return 0, c.Err
	}
	n, err := c.W.Write(p)
	if err != nil {
		c.Err = err
	}
	return n, err
}

// Escaping passes text on to W with control characters and bidirectional
// overrides written as visible escapes (\x07, \u202e): a name in a
// circuit file or a flag can hold them (YAML's "\e[2J" is an escape
// sequence), and printed raw they would act on the terminal or hide what
// a line says. Tabs and line breaks pass unchanged. A character split
// between two writes is held until the next.
type Escaping struct {
	W     io.Writer
	carry []byte
	buf   []byte
}

func (e *Escaping) Write(p []byte) (int, error) {
	data := p
	if len(e.carry) > 0 {
		data = append(e.carry, p...)
		e.carry = nil
	}
	out := e.buf[:0]
	for i := 0; i < len(data); {
		r, size := utf8.DecodeRune(data[i:])
		if r == utf8.RuneError && size <= 1 && !utf8.FullRune(data[i:]) {
			e.carry = append([]byte(nil), data[i:]...)
			break
		}
		if hidden(r) && !(size == 1 && r == utf8.RuneError && data[i] >= 0x80) {
			if r < 0x100 {
				out = fmt.Appendf(out, "\\x%02x", r)
			} else {
				out = fmt.Appendf(out, "\\u%04x", r)
			}
		} else {
			out = append(out, data[i:i+size]...)
		}
		i += size
	}
	e.buf = out
	if _, err := e.W.Write(out); err != nil {
		return 0, err
	}
	return len(p), nil
}

// hidden reports whether r is a control character other than tab and line
// feed, or a character that reorders or hides text (Unicode's format
// characters: bidirectional overrides, zero-width spaces and joiners).
func hidden(r rune) bool {
	if r == '\t' || r == '\n' {
		return false
	}
	return unicode.IsControl(r) || unicode.Is(unicode.Cf, r)
}
