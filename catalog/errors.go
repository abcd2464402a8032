package catalog

import (
	"errors"
	"fmt"
	"sort"
	"strings"
)

// Sentinel errors wrapped by Error, so that callers can tell kinds of bad
// input apart with errors.Is.
var (
	ErrSyntax     = errors.New("syntax error")
	ErrUnknownKey = errors.New("unknown key")
	ErrMissing    = errors.New("missing key")
	ErrType       = errors.New("wrong type")
	ErrRange      = errors.New("value out of range")
	ErrDuplicate  = errors.New("duplicate id")
	ErrReference  = errors.New("unknown reference")
	ErrLength     = errors.New("wrong list length")
	ErrExpired    = errors.New("quote expired")
	ErrCurrency   = errors.New("no exchange rate")
	ErrUnused     = errors.New("fits nothing")
	ErrNoPath     = errors.New("no possible path")
)

// Error is one problem in an input file: where it is and what is wrong. Line
// and Col count from 1 (0 when unknown); Key is the dotted TOML key as
// written in the file, without array indices ("links.km"). Err wraps one of
// the sentinel errors of this package.
type Error struct {
	File string
	Line int
	Col  int
	Key  string
	Err  error
	// Snippet is set for syntax errors: the offending line with a caret
	// under the column.
	Snippet string
}

// Error formats e as "file:line:col: key: message", followed by the
// snippet on its own lines for syntax errors.
func (e *Error) Error() string {
	var b strings.Builder
	writeLocation(&b, e.File, e.Line, e.Col)
	writeKey(&b, e.Key)
	b.WriteString(e.Err.Error())
	if e.Snippet != "" {
		b.WriteString("\n")
		b.WriteString(strings.TrimRight(e.Snippet, "\n"))
	}
	return b.String()
}

// Unwrap returns the underlying error.
func (e *Error) Unwrap() error { return e.Err }

// ErrorList is every error found in one run, sorted by file, line and
// column. It is returned as a single error; errors.As finds the list and
// errors.Is looks through all its members.
type ErrorList []*Error

// Error joins the members' messages, one per line.
func (l ErrorList) Error() string {
	s := make([]string, len(l))
	for i, e := range l {
		s[i] = e.Error()
	}
	return strings.Join(s, "\n")
}

// Unwrap returns the members, for errors.Is and errors.As.
func (l ErrorList) Unwrap() []error {
	out := make([]error, len(l))
	for i, e := range l {
		out[i] = e
	}
	return out
}

// Sort orders the list by file, line, column and message, so that output is
// the same from run to run.
func (l ErrorList) Sort() {
	sort.SliceStable(l, func(i, j int) bool {
		a, b := l[i], l[j]
		if a.File != b.File {
			return a.File < b.File
		}
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		if a.Col != b.Col {
			return a.Col < b.Col
		}
		return a.Err.Error() < b.Err.Error()
	})
}

// Err returns nil for an empty list and the sorted list otherwise.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	l.Sort()
	return l
}

// Warning is a legal but suspicious value: reported, never fatal.
type Warning struct {
	File string
	Line int // 0 when the warning is about the whole case
	Col  int
	Key  string
	Msg  string
}

// String formats w like an Error: "file:line:col: key: message".
func (w Warning) String() string {
	var b strings.Builder
	if w.File != "" {
		writeLocation(&b, w.File, w.Line, w.Col)
	}
	writeKey(&b, w.Key)
	b.WriteString(w.Msg)
	return b.String()
}

// SortWarnings orders warnings by file, line, column and message.
func SortWarnings(ws []Warning) {
	sort.SliceStable(ws, func(i, j int) bool {
		a, b := ws[i], ws[j]
		if a.File != b.File {
			return a.File < b.File
		}
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		if a.Col != b.Col {
			return a.Col < b.Col
		}
		return a.Msg < b.Msg
	})
}

// writeLocation writes "file:line:col: ", leaving out a line or column of 0.
func writeLocation(b *strings.Builder, file string, line, col int) {
	b.WriteString(file)
	if line > 0 {
		fmt.Fprintf(b, ":%d", line)
		if col > 0 {
			fmt.Fprintf(b, ":%d", col)
		}
	}
	b.WriteString(": ")
}

// writeKey writes "key: " when key is not empty.
func writeKey(b *strings.Builder, key string) {
	if key != "" {
		b.WriteString(key)
		b.WriteString(": ")
	}
}
