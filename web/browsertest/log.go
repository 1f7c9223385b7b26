package browsertest

import (
	"bytes"
	"fmt"
	"io"
	"strings"
	"sync"
	"testing"
)

// logBuffer keeps the last lines of chromedp's log and the browser's output,
// so that a failed test can show them and a passing test stays quiet
// (Chromium logs harmless dbus errors on every start).
type logBuffer struct {
	mu      sync.Mutex
	max     int
	lines   []string
	dropped int                      // oldest lines dropped to keep max
	dbus    int                      // harmless dbus lines left out
	partial map[string]*bytes.Buffer // unfinished line per writer prefix
}

func newLogBuffer(max int) *logBuffer {
	return &logBuffer{max: max, partial: map[string]*bytes.Buffer{}}
}

func (l *logBuffer) add(line string) {
	l.mu.Lock()
	defer l.mu.Unlock()
	l.addLocked(line)
}

func (l *logBuffer) addLocked(line string) {
	l.lines = append(l.lines, line)
	if len(l.lines) > l.max {
		n := len(l.lines) - l.max
		l.lines = append(l.lines[:0], l.lines[n:]...)
		l.dropped += n
	}
}

// printf returns a logf func, as chromedp.WithLogf takes, that adds lines
// starting with prefix.
func (l *logBuffer) printf(prefix string) func(string, ...any) {
	return func(format string, args ...any) {
		l.add(prefix + fmt.Sprintf(format, args...))
	}
}

// writer returns an io.Writer that adds each line written to it with prefix.
func (l *logBuffer) writer(prefix string) io.Writer {
	return writerFunc(func(p []byte) (int, error) {
		l.mu.Lock()
		defer l.mu.Unlock()
		buf := l.partial[prefix]
		if buf == nil {
			buf = new(bytes.Buffer)
			l.partial[prefix] = buf
		}
		buf.Write(p)
		for {
			line, err := buf.ReadString('\n')
			if err != nil { // no newline yet: keep the rest for the next write
				rest := line
				buf.Reset()
				buf.WriteString(rest)
				break
			}
			if strings.Contains(line, ":ERROR:dbus/") {
				l.dbus++ // a headless browser has no session bus: harmless
				continue
			}
			l.addLocked(prefix + strings.TrimRight(line, "\r\n"))
		}
		return len(p), nil
	})
}

// dump prints the kept lines with t.Logf.
func (l *logBuffer) dump(t testing.TB) {
	l.mu.Lock()
	defer l.mu.Unlock()
	for prefix, buf := range l.partial {
		if buf.Len() > 0 {
			l.addLocked(prefix + buf.String())
			buf.Reset()
		}
	}
	if len(l.lines) == 0 {
		return
	}
	var sb strings.Builder
	if l.dbus > 0 {
		fmt.Fprintf(&sb, "(%d harmless dbus lines left out)\n", l.dbus)
	}
	if l.dropped > 0 {
		fmt.Fprintf(&sb, "(%d earlier lines dropped)\n", l.dropped)
	}
	for _, line := range l.lines {
		sb.WriteString(line)
		sb.WriteByte('\n')
	}
	t.Logf("browsertest: browser log of the failed test:\n%s", sb.String())
}

type writerFunc func([]byte) (int, error)

func (f writerFunc) Write(p []byte) (int, error) { return f(p) }
