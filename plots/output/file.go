package output

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sync"
)

// A PathError refuses an output's path before anything is written to it:
// a directory, a socket, a dangling link, a folder that cannot be made.
// It says what is accepted instead.
type PathError struct{ Err error }

func (e *PathError) Error() string { return e.Err.Error() }
func (e *PathError) Unwrap() error { return e.Err }

func pathErr(format string, args ...any) error {
	return &PathError{Err: fmt.Errorf(format, args...)}
}

// Partials are the temporary files of outputs still being written. The
// zero value is ready to use, from any goroutine.
type Partials struct {
	mu    sync.Mutex
	names map[string]bool
}

func (p *Partials) add(name string) {
	if p == nil {
		return
	}
	p.mu.Lock()
	if p.names == nil {
		p.names = map[string]bool{}
	}
	p.names[name] = true
	p.mu.Unlock()
}

func (p *Partials) drop(name string) {
	if p == nil {
		return
	}
	p.mu.Lock()
	delete(p.names, name)
	p.mu.Unlock()
}

// Remove deletes every temporary file still being written and returns
// how many it removed. A write still going fails at its rename.
func (p *Partials) Remove() int {
	p.mu.Lock()
	defer p.mu.Unlock()
	n := 0
	for name := range p.names {
		if os.Remove(name) == nil {
			n++
		}
		delete(p.names, name)
	}
	return n
}

// WriteFile writes a whole file or nothing: the content goes to a
// temporary file in the same directory, which is synced and renamed over
// path only when write succeeded. A write that fails or panics leaves any
// old file at path untouched and removes the temporary file; partials,
// when not nil, knows the temporary file while it is written. A file
// replaced keeps its permission bits; a new one gets 0644.
//
// Only a regular file is ever replaced. A symbolic link is followed and
// its target written (atomically, when the target is a regular file); a
// character device or a named pipe (/dev/null, /dev/stdout, a FIFO) is
// written through, as a stream that cannot be whole or nothing; anything
// else (a directory, a socket, a block device, a dangling link) is
// refused (Target).
func WriteFile(path string, partials *Partials, write func(w io.Writer) error) (err error) {
	target, through, err := Target(path)
	if err != nil {
		return err
	}
	if through {
		return writeThrough(path, target, write)
	}
	mode := os.FileMode(0o644)
	if st, err := os.Stat(target); err == nil {
		mode = st.Mode().Perm()
	}
	dir := filepath.Dir(target)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(target)+".*.partial")
	if err != nil {
		return pathErr("cannot write %s: %w", path, err)
	}
	partials.add(tmp.Name())
	defer partials.drop(tmp.Name())
	// Until the rename, the temporary file goes away on every way out,
	// a panic in write included.
	renamed := false
	defer func() {
		if !renamed {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriter(tmp)
	if err := write(bw); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Sync(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Chmod(tmp.Name(), mode); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := os.Rename(tmp.Name(), target); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	renamed = true
	return nil
}

// Target returns the file an output named path goes to: path itself,
// or the target of the symbolic link it names, and whether that is a
// device or pipe to write through rather than replace. It refuses, with
// a *PathError, what may not be written.
func Target(path string) (target string, through bool, err error) {
	st, err := os.Lstat(path)
	if errors.Is(err, os.ErrNotExist) {
		return path, false, nil
	}
	if err != nil {
		return "", false, pathErr("cannot write %s: %w", path, err)
	}
	target = path
	if st.Mode()&os.ModeSymlink != 0 {
		resolved, err := filepath.EvalSymlinks(path)
		if err != nil {
			return "", false, pathErr("refusing to write %s: it is a symbolic link whose target cannot be reached (%v); accepted: a regular file, a link to one, or a device such as /dev/null", path, err)
		}
		target = resolved
		if st, err = os.Stat(resolved); err != nil {
			return "", false, pathErr("cannot write %s: %w", path, err)
		}
	}
	switch m := st.Mode(); {
	case m.IsRegular():
		return target, false, nil
	case m&os.ModeCharDevice != 0, m&os.ModeNamedPipe != 0:
		return target, true, nil
	case m.IsDir():
		return "", false, pathErr("refusing to write %s: it is a directory; accepted: a file name", path)
	default:
		return "", false, pathErr("refusing to write %s: it is a %v, not a regular file; accepted: a regular file, a link to one, or a character device or named pipe to write through", path, m.Type())
	}
}

// writeThrough writes to an existing device or named pipe as a stream.
func writeThrough(path, target string, write func(w io.Writer) error) error {
	f, err := os.OpenFile(target, os.O_WRONLY, 0)
	if err != nil {
		return fmt.Errorf("cannot write %s: %w", path, err)
	}
	bw := bufio.NewWriter(f)
	err = write(bw)
	if err == nil {
		err = bw.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	return nil
}

// Check checks, before anything is written, the outputs a run will write
// (empty names are skipped): each may be written (Target), into a folder
// that may hold it (CheckFolder), and no two name the same file, through
// links or different spellings. It returns the first refusal as a
// *PathError.
func Check(paths ...string) error {
	seen := map[string]string{}
	for _, p := range paths {
		if p == "" {
			continue
		}
		target, _, err := Target(p)
		if err != nil {
			return err
		}
		key, err := filepath.Abs(target)
		if err != nil {
			key = filepath.Clean(target)
		}
		if first, ok := seen[key]; ok {
			if first == p {
				return pathErr("refusing to write %s twice: two outputs (a flag and a figure, or two flags) name it; choose different output names", p)
			}
			return pathErr("refusing to write %s twice: %s and %s name the same file; choose different output names", target, first, p)
		}
		seen[key] = p
		if err := CheckFolder(filepath.Dir(target), p); err != nil {
			return err
		}
	}
	return nil
}

// CheckFolder fails, with a *PathError, when dir, the folder output goes
// to, exists as something other than a folder, or lies under such a
// thing. A folder not yet there is fine: WriteFile's caller makes it.
func CheckFolder(dir, output string) error {
	for d := dir; ; d = filepath.Dir(d) {
		st, err := os.Stat(d)
		if err == nil {
			if !st.IsDir() {
				return pathErr("cannot write %s: %s is not a directory", output, d)
			}
			return nil
		}
		if !errors.Is(err, os.ErrNotExist) {
			return pathErr("cannot write %s: %w", output, err)
		}
		if parent := filepath.Dir(d); parent == d {
			return nil
		}
	}
}
