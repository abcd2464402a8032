package catalog

import (
	"strconv"
	"strings"
)

// Position is a place in an input file; Line and Col count from 1.
type Position struct {
	Line, Col int
}

// keyScanner finds where each key of a TOML document starts. The TOML
// decoder does not expose key positions for elements of arrays of tables, so
// the source is scanned once more after it parsed cleanly. Paths are the
// dotted keys with array indices: "links[3].on_order[0].gbps".
//
// The scanner only ever runs on text that the decoder accepted, but it must
// still never panic or loop on any input: every step advances i.
type keyScanner struct {
	src       string
	i         int
	line, col int
	pos       map[string]Position
	count     map[string]int // array-of-tables path → number of elements so far
}

// scanKeyPositions returns the position of every key path in src. Cost:
// O(len(src)).
func scanKeyPositions(src string) map[string]Position {
	s := &keyScanner{src: src, line: 1, col: 1, pos: map[string]Position{}, count: map[string]int{}}
	s.document()
	return s.pos
}

func (s *keyScanner) eof() bool { return s.i >= len(s.src) }

func (s *keyScanner) peek() byte {
	if s.eof() {
		return 0
	}
	return s.src[s.i]
}

func (s *keyScanner) advance() {
	if s.eof() {
		return
	}
	if s.src[s.i] == '\n' {
		s.line++
		s.col = 1
	} else if s.src[s.i]&0xC0 != 0x80 { // count runes, not UTF-8 continuation bytes
		s.col++
	}
	s.i++
}

func (s *keyScanner) here() Position { return Position{s.line, s.col} }

func (s *keyScanner) record(path string, p Position) {
	if _, ok := s.pos[path]; !ok {
		s.pos[path] = p
	}
}

func (s *keyScanner) skipSpaces() {
	for c := s.peek(); c == ' ' || c == '\t' || c == '\r'; c = s.peek() {
		s.advance()
	}
}

// skipBlank skips spaces, newlines and comments (inside arrays).
func (s *keyScanner) skipBlank() {
	for !s.eof() {
		switch s.peek() {
		case ' ', '\t', '\r', '\n':
			s.advance()
		case '#':
			s.skipLine()
		default:
			return
		}
	}
}

func (s *keyScanner) skipLine() {
	for !s.eof() && s.peek() != '\n' {
		s.advance()
	}
}

func (s *keyScanner) document() {
	table := ""
	for !s.eof() {
		s.skipBlank()
		if s.eof() {
			return
		}
		start := s.i
		if s.peek() == '[' {
			table = s.header()
		} else {
			s.keyValue(table)
		}
		if s.i == start { // not understood: skip the character
			s.advance()
		}
	}
}

// header reads [a.b] or [[a.b]] and returns the resolved table path.
func (s *keyScanner) header() string {
	p := s.here()
	s.advance()
	array := s.peek() == '['
	if array {
		s.advance()
	}
	segs := s.keyPath()
	for !s.eof() && s.peek() != '\n' && s.peek() != ']' {
		s.advance()
	}
	for s.peek() == ']' {
		s.advance()
	}
	s.skipLine()
	path := ""
	for j, seg := range segs {
		base := join(path, seg)
		if j == len(segs)-1 {
			if array {
				n := s.count[base]
				s.count[base] = n + 1
				s.record(base, p)
				base += "[" + strconv.Itoa(n) + "]"
			}
		} else if n, ok := s.count[base]; ok {
			base += "[" + strconv.Itoa(n-1) + "]"
		}
		path = base
		s.record(path, p)
	}
	return path
}

func join(prefix, key string) string {
	if prefix == "" {
		return key
	}
	return prefix + "." + key
}

// keyPath reads a dotted key (bare or quoted parts).
func (s *keyScanner) keyPath() []string {
	var segs []string
	for !s.eof() {
		s.skipSpaces()
		var seg string
		switch c := s.peek(); {
		case c == '"' || c == '\'':
			s.advance()
			var b strings.Builder
			for !s.eof() && s.peek() != c && s.peek() != '\n' {
				if c == '"' && s.peek() == '\\' {
					s.advance()
				}
				b.WriteByte(s.peek())
				s.advance()
			}
			s.advance()
			seg = b.String()
		case isBare(c):
			st := s.i
			for isBare(s.peek()) {
				s.advance()
			}
			seg = s.src[st:s.i]
		default:
			return segs
		}
		segs = append(segs, seg)
		s.skipSpaces()
		if s.peek() != '.' {
			return segs
		}
		s.advance()
	}
	return segs
}

func isBare(c byte) bool {
	return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_' || c == '-'
}

func (s *keyScanner) keyValue(table string) {
	p := s.here()
	segs := s.keyPath()
	if len(segs) == 0 {
		s.skipLine()
		return
	}
	path := table
	for _, seg := range segs {
		path = join(path, seg)
		s.record(path, p)
	}
	s.skipSpaces()
	if s.peek() != '=' {
		s.skipLine()
		return
	}
	s.advance()
	s.value(path, 0)
}

// maxDepth bounds nesting so that hostile input cannot exhaust the stack.
const maxDepth = 64

func (s *keyScanner) value(path string, depth int) {
	s.skipSpaces()
	if depth > maxDepth {
		s.skipLine()
		return
	}
	switch c := s.peek(); c {
	case '"', '\'':
		s.str(c)
	case '[':
		s.advance()
		for n := 0; !s.eof(); n++ {
			s.skipBlank()
			if s.peek() == ']' {
				break
			}
			elem := path + "[" + strconv.Itoa(n) + "]"
			s.record(elem, s.here())
			st := s.i
			s.value(elem, depth+1)
			s.skipBlank()
			if s.peek() == ',' {
				s.advance()
				continue
			}
			if s.i == st {
				s.advance()
			}
			if s.peek() == ']' {
				break
			}
		}
		s.advance()
	case '{':
		s.advance()
		for !s.eof() {
			s.skipSpaces()
			if s.peek() == '}' {
				break
			}
			p := s.here()
			segs := s.keyPath()
			if len(segs) == 0 {
				s.advance()
				continue
			}
			key := path
			for _, seg := range segs {
				key = join(key, seg)
				s.record(key, p)
			}
			s.skipSpaces()
			if s.peek() == '=' {
				s.advance()
			}
			s.value(key, depth+1)
			s.skipSpaces()
			if s.peek() == ',' {
				s.advance()
			}
			if s.peek() == '\n' {
				break
			}
		}
		s.advance()
	default:
		for !s.eof() {
			switch s.peek() {
			case ',', ']', '}', '\n', '#':
				return
			}
			s.advance()
		}
	}
}

// str skips a basic or literal string, single- or multi-line.
func (s *keyScanner) str(q byte) {
	triple := strings.HasPrefix(s.src[s.i:], strings.Repeat(string(q), 3))
	if triple {
		s.advance()
		s.advance()
		s.advance()
		for !s.eof() {
			if strings.HasPrefix(s.src[s.i:], strings.Repeat(string(q), 3)) {
				s.advance()
				s.advance()
				s.advance()
				for s.peek() == q { // up to two quotes may close the content
					s.advance()
				}
				return
			}
			if q == '"' && s.peek() == '\\' {
				s.advance()
			}
			s.advance()
		}
		return
	}
	s.advance()
	for !s.eof() && s.peek() != '\n' {
		c := s.peek()
		if q == '"' && c == '\\' {
			s.advance()
			s.advance()
			continue
		}
		s.advance()
		if c == q {
			return
		}
	}
}

// lookup returns the position of path, or of its nearest enclosing key that
// has one.
func lookup(pos map[string]Position, path string) Position {
	for path != "" {
		if p, ok := pos[path]; ok {
			return p
		}
		cut := strings.LastIndexAny(path, ".[")
		if cut < 0 {
			break
		}
		path = path[:cut]
	}
	return Position{}
}
