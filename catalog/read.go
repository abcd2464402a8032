package catalog

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/BurntSushi/toml"
)

// Source is one parsed TOML input file together with the errors and warnings
// found while reading it. It reads values through Table so that every
// problem is recorded with its position and reading goes on: all errors of a
// file are reported in one run. Package plans reads the case file with it.
type Source struct {
	File  string
	text  string
	pos   map[string]Position
	Errs  ErrorList
	Warns []Warning
}

// Parse parses data as TOML. On a syntax error it returns a nil Source and
// an ErrorList holding one *Error with the line, column and a snippet of the
// offending line with a caret. Cost: O(len(data)).
func Parse(file string, data []byte) (*Source, *Table, error) {
	var m map[string]any
	if _, err := toml.Decode(string(data), &m); err != nil {
		return nil, nil, ErrorList{syntaxError(file, string(data), err)}
	}
	src := &Source{File: file, text: string(data), pos: scanKeyPositions(string(data))}
	return src, &Table{src: src, m: m, used: map[string]bool{}}, nil
}

// syntaxError turns the TOML decoder's error on text into an *Error.
func syntaxError(file, text string, err error) *Error {
	var pe toml.ParseError
	if !errors.As(err, &pe) {
		return &Error{File: file, Err: fmt.Errorf("%w: %v", ErrSyntax, err)}
	}
	return &Error{File: file, Line: pe.Position.Line, Col: pe.Position.Col,
		Err:     fmt.Errorf("%w: %s", ErrSyntax, pe.Message),
		Snippet: caretSnippet(text, pe.Position.Line, pe.Position.Col, pe.Position.Len)}
}

// caretSnippet renders line (1-based) of text, numbered, with carets
// under width characters from column col; tabs are expanded to stops of
// 8 so that the carets line up. It is empty when the line does not exist
// (the decoder's own rendering panics on some such positions, which
// fuzzing found).
func caretSnippet(text string, line, col, width int) string {
	lines := strings.Split(text, "\n")
	if line < 1 || line > len(lines) {
		return ""
	}
	var shown strings.Builder
	vis, indent := 0, -1 // vis: characters shown so far
	for i, r := range []rune(strings.TrimRight(lines[line-1], "\r")) {
		if i == col-1 {
			indent = vis
		}
		if r == '\t' {
			n := 8 - vis%8
			shown.WriteString(strings.Repeat(" ", n))
			vis += n
		} else {
			shown.WriteRune(r)
			vis++
		}
	}
	if indent < 0 {
		indent = vis // the position is at or past the end of the line
	}
	return fmt.Sprintf("%7d | %s\n%10s%s%s", line, shown.String(), "",
		strings.Repeat(" ", indent), strings.Repeat("^", max(width, 1)))
}

// Position returns where the key path (with array indices, "links[2].km")
// starts, or where its nearest enclosing key starts.
func (s *Source) Position(path string) Position { return lookup(s.pos, path) }

// ErrorAt records an error at a position. err should wrap a sentinel.
func (s *Source) ErrorAt(p Position, key string, err error) {
	s.Errs = append(s.Errs, &Error{File: s.File, Line: p.Line, Col: p.Col, Key: key, Err: err})
}

// WarnAt records a warning at a position.
func (s *Source) WarnAt(p Position, key, msg string) {
	s.Warns = append(s.Warns, Warning{File: s.File, Line: p.Line, Col: p.Col, Key: key, Msg: msg})
}

// Table reads one TOML table. Every getter marks its key as allowed; Done
// then reports the keys nobody asked for as unknown, with a suggestion.
type Table struct {
	src  *Source
	path string // with indices, for positions
	key  string // as the user writes it, for messages
	m    map[string]any
	used map[string]bool
}

// Source returns the file the table belongs to.
func (t *Table) Source() *Source { return t.src }

// Pos returns the position of key in the table ("" for the table itself).
func (t *Table) Pos(key string) Position {
	if key == "" {
		return t.src.Position(t.path)
	}
	return t.src.Position(join(t.path, key))
}

// Key returns the dotted display key of key in the table.
func (t *Table) Key(key string) string {
	if key == "" {
		return t.key
	}
	return join(t.key, key)
}

// Errorf records an error about key (at its position, or the table's when
// key is absent). The message wraps sentinel.
func (t *Table) Errorf(key string, sentinel error, format string, args ...any) {
	t.src.ErrorAt(t.Pos(key), t.Key(key), fmt.Errorf("%w: "+format, append([]any{sentinel}, args...)...))
}

// Warnf records a warning about key.
func (t *Table) Warnf(key string, format string, args ...any) {
	t.src.WarnAt(t.Pos(key), t.Key(key), fmt.Sprintf(format, args...))
}

// Has reports whether key is present (and marks it allowed).
func (t *Table) Has(key string) bool {
	t.used[key] = true
	_, ok := t.m[key]
	return ok
}

func (t *Table) get(key string) (any, bool) {
	t.used[key] = true
	v, ok := t.m[key]
	return v, ok
}

// Need records a missing-key error unless key is present.
func (t *Table) Need(key string) bool {
	if t.Has(key) {
		return true
	}
	t.src.ErrorAt(t.Pos(""), t.Key(key), fmt.Errorf("%w %q", ErrMissing, key))
	return false
}

func typeName(v any) string {
	switch v.(type) {
	case string:
		return "string"
	case int64:
		return "integer"
	case float64:
		return "float"
	case bool:
		return "boolean"
	case time.Time:
		return "date"
	case []any:
		return "array"
	case []map[string]any:
		return "array of tables"
	case map[string]any:
		return "table"
	}
	return fmt.Sprintf("%T", v)
}

func (t *Table) wrongType(key, want string, v any) {
	t.Errorf(key, ErrType, "want %s, got %s", want, typeName(v))
}

// String returns the string value of key; ok is false when absent or of the
// wrong type (then an error is recorded).
func (t *Table) String(key string) (string, bool) {
	v, ok := t.get(key)
	if !ok {
		return "", false
	}
	s, ok := v.(string)
	if !ok {
		t.wrongType(key, "a string", v)
	}
	return s, ok
}

// number converts a TOML integer or float; non-finite values are errors.
func (t *Table) number(key string, v any) (float64, bool) {
	var f float64
	switch x := v.(type) {
	case int64:
		f = float64(x)
	case float64:
		f = x
	default:
		t.wrongType(key, "a number", v)
		return 0, false
	}
	if math.IsNaN(f) || math.IsInf(f, 0) {
		t.Errorf(key, ErrRange, "%v is not a finite number", f)
		return 0, false
	}
	return f, true
}

// Float returns the number at key (integer or float, finite).
func (t *Table) Float(key string) (float64, bool) {
	v, ok := t.get(key)
	if !ok {
		return 0, false
	}
	return t.number(key, v)
}

// maxInt bounds integers read from files (years, months, slots, units), so
// that later arithmetic cannot overflow.
const maxInt = 1 << 30

// Int returns the integer at key (a float with an integral value is
// accepted).
func (t *Table) Int(key string) (int, bool) {
	v, ok := t.get(key)
	if !ok {
		return 0, false
	}
	var n float64
	switch x := v.(type) {
	case int64:
		n = float64(x)
	case float64:
		if x != math.Trunc(x) {
			t.Errorf(key, ErrType, "want a whole number, got %v", x)
			return 0, false
		}
		n = x
	default:
		t.wrongType(key, "an integer", v)
		return 0, false
	}
	if math.Abs(n) > maxInt {
		t.Errorf(key, ErrRange, "%v is too large", n)
		return 0, false
	}
	return int(n), true
}

// Bool returns the boolean at key.
func (t *Table) Bool(key string) (bool, bool) {
	v, ok := t.get(key)
	if !ok {
		return false, false
	}
	b, ok := v.(bool)
	if !ok {
		t.wrongType(key, "true or false", v)
	}
	return b, ok
}

// Date returns the date at key: a TOML date or a "YYYY-MM-DD" string.
func (t *Table) Date(key string) (time.Time, bool) {
	v, ok := t.get(key)
	if !ok {
		return time.Time{}, false
	}
	switch x := v.(type) {
	case time.Time:
		return time.Date(x.Year(), x.Month(), x.Day(), 0, 0, 0, 0, time.UTC), true
	case string:
		d, err := time.Parse(time.DateOnly, x)
		if err != nil {
			t.Errorf(key, ErrType, "want a date like 2027-03-31, got %q", x)
			return time.Time{}, false
		}
		return d, true
	}
	t.wrongType(key, "a date", v)
	return time.Time{}, false
}

// Strings returns the array of strings at key.
func (t *Table) Strings(key string) ([]string, bool) {
	v, ok := t.get(key)
	if !ok {
		return nil, false
	}
	a, ok := v.([]any)
	if !ok {
		t.wrongType(key, "an array of strings", v)
		return nil, false
	}
	out := make([]string, 0, len(a))
	for i, e := range a {
		s, ok := e.(string)
		if !ok {
			t.src.ErrorAt(t.src.Position(join(t.path, key)+"["+strconv.Itoa(i)+"]"), t.Key(key),
				fmt.Errorf("%w: element %d: want a string, got %s", ErrType, i+1, typeName(e)))
			return nil, false
		}
		out = append(out, s)
	}
	return out, true
}

// Floats returns the array of numbers at key.
func (t *Table) Floats(key string) ([]float64, bool) {
	v, ok := t.get(key)
	if !ok {
		return nil, false
	}
	return t.floats(key, v)
}

func (t *Table) floats(key string, v any) ([]float64, bool) {
	a, ok := v.([]any)
	if !ok {
		t.wrongType(key, "an array of numbers", v)
		return nil, false
	}
	out := make([]float64, len(a))
	good := true
	for i, e := range a {
		var f float64
		switch x := e.(type) {
		case int64:
			f = float64(x)
		case float64:
			f = x
		default:
			t.src.ErrorAt(t.src.Position(join(t.path, key)+"["+strconv.Itoa(i)+"]"), t.Key(key),
				fmt.Errorf("%w: element %d: want a number, got %s", ErrType, i+1, typeName(e)))
			good = false
			continue
		}
		if math.IsNaN(f) || math.IsInf(f, 0) {
			t.src.ErrorAt(t.src.Position(join(t.path, key)+"["+strconv.Itoa(i)+"]"), t.Key(key),
				fmt.Errorf("%w: element %d: %v is not a finite number", ErrRange, i+1, f))
			good = false
		}
		out[i] = f
	}
	return out, good
}

// FloatOrList returns the value at key, which may be one number or an array
// of numbers (list is non-nil in the second case).
func (t *Table) FloatOrList(key string) (v float64, list []float64, ok bool) {
	raw, present := t.get(key)
	if !present {
		return 0, nil, false
	}
	if _, isArray := raw.([]any); isArray {
		list, ok = t.floats(key, raw)
		if list == nil {
			list = []float64{}
		}
		return 0, list, ok
	}
	switch raw.(type) {
	case int64, float64:
		v, ok = t.number(key, raw)
		return v, nil, ok
	}
	t.wrongType(key, "a number or an array of numbers", raw)
	return 0, nil, false
}

// Sub returns the table at key (a [table] or an inline table).
func (t *Table) Sub(key string) (*Table, bool) {
	v, ok := t.get(key)
	if !ok {
		return nil, false
	}
	m, ok := v.(map[string]any)
	if !ok {
		t.wrongType(key, "a table", v)
		return nil, false
	}
	return &Table{src: t.src, path: join(t.path, key), key: t.Key(key), m: m, used: map[string]bool{}}, true
}

// Array returns the tables of the array of tables at key ([[key]] or an
// array of inline tables).
func (t *Table) Array(key string) ([]*Table, bool) {
	v, ok := t.get(key)
	if !ok {
		return nil, false
	}
	var ms []map[string]any
	switch x := v.(type) {
	case []map[string]any:
		ms = x
	case []any:
		for i, e := range x {
			m, ok := e.(map[string]any)
			if !ok {
				t.src.ErrorAt(t.src.Position(join(t.path, key)+"["+strconv.Itoa(i)+"]"), t.Key(key),
					fmt.Errorf("%w: element %d: want a table, got %s", ErrType, i+1, typeName(e)))
				return nil, false
			}
			ms = append(ms, m)
		}
	default:
		t.wrongType(key, "an array of tables", v)
		return nil, false
	}
	out := make([]*Table, len(ms))
	for i, m := range ms {
		out[i] = &Table{src: t.src, path: join(t.path, key) + "[" + strconv.Itoa(i) + "]",
			key: t.Key(key), m: m, used: map[string]bool{}}
	}
	return out, true
}

// Keys returns the table's keys, sorted, and marks them all allowed (for
// tables whose keys are names, such as exchange rates).
func (t *Table) Keys() []string {
	out := make([]string, 0, len(t.m))
	for k := range t.m {
		t.used[k] = true
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// Done reports every key of the table that no getter asked for as unknown,
// with the closest allowed key as a suggestion when one is close. Tables
// nested under an unknown key are not reported again (leaf keys only).
func (t *Table) Done() {
	allowed := make([]string, 0, len(t.used))
	for k := range t.used {
		allowed = append(allowed, k)
	}
	sort.Strings(allowed)
	var unknown []string
	for k := range t.m {
		if !t.used[k] {
			unknown = append(unknown, k)
		}
	}
	sort.Strings(unknown)
	for _, k := range unknown {
		if s := Suggest(k, allowed); s != "" {
			t.Errorf(k, ErrUnknownKey, "%q (did you mean %q?)", k, s)
		} else {
			t.Errorf(k, ErrUnknownKey, "%q (allowed: %s)", k, strings.Join(allowed, ", "))
		}
	}
}

// Suggest returns the candidate closest to word by edit distance when it is
// close enough to be a likely typo (at most a third of the word's length,
// and at least 1 allowed), or "".
func Suggest(word string, candidates []string) string {
	best, bestD := "", math.MaxInt
	for _, c := range candidates {
		d := editDistance(strings.ToLower(word), strings.ToLower(c))
		if d < bestD || d == bestD && c < best {
			best, bestD = c, d
		}
	}
	limit := max(1, len(word)/3)
	if bestD <= limit {
		return best
	}
	return ""
}

// editDistance is the optimal string alignment distance between a and b
// (bytes): insertions, deletions, substitutions and transpositions of two
// neighbours each cost 1, so the common typo "metor" for "metro" is one
// edit. Cost: O(len(a)·len(b)).
func editDistance(a, b string) int {
	rows := make([][]int, len(a)+1)
	for i := range rows {
		rows[i] = make([]int, len(b)+1)
		rows[i][0] = i
	}
	for j := range rows[0] {
		rows[0][j] = j
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			cost := 1
			if a[i-1] == b[j-1] {
				cost = 0
			}
			d := min(rows[i-1][j]+1, rows[i][j-1]+1, rows[i-1][j-1]+cost)
			if i > 1 && j > 1 && a[i-1] == b[j-2] && a[i-2] == b[j-1] {
				d = min(d, rows[i-2][j-2]+1)
			}
			rows[i][j] = d
		}
	}
	return rows[len(a)][len(b)]
}
