package lp

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unicode"
)

// mpsInfinity: bound and right-hand-side values at least this large are
// read as infinite (common practice: 1e30).
const mpsInfinity = 1e30

// MPSFormat selects how ReadMPS splits lines into fields.
type MPSFormat int8

const (
	// MPSAuto splits on white space, and falls back to the fixed column
	// positions on a line where that gives the wrong number of fields.
	MPSAuto MPSFormat = iota
	// MPSFree splits on white space only (names without spaces).
	MPSFree
	// MPSFixed uses the fixed column positions (fields at columns 2–3,
	// 5–12, 15–22, 25–36, 40–47 and 50–61), so names may contain spaces.
	MPSFixed
)

// Errors wrapped by MPSError.
var (
	ErrMPSSection   = errors.New("unknown or misplaced section")
	ErrMPSFields    = errors.New("wrong number of fields")
	ErrMPSNumber    = errors.New("bad number")
	ErrMPSRow       = errors.New("unknown row")
	ErrMPSColumn    = errors.New("unknown column")
	ErrMPSRowType   = errors.New("unknown row type")
	ErrMPSBound     = errors.New("unknown or unsupported bound type")
	ErrMPSDuplicate = errors.New("duplicate name")
	ErrMPSMarker    = errors.New("bad integer marker")
	ErrMPSEnd       = errors.New("missing ENDATA")
	// ErrMPSUnsupported marks extensions beyond linear and integer
	// programs (SOS, quadratic and conic sections, semi-continuous bounds).
	ErrMPSUnsupported = errors.New("unsupported MPS extension")
)

// MPSError is a malformed MPS file: the 1-based line, the name involved
// (Key, may be empty) and the reason, one of the ErrMPS… errors.
type MPSError struct {
	File string
	Line int
	Key  string
	Err  error
}

func (e *MPSError) Error() string {
	loc := e.File
	if loc == "" {
		loc = "mps"
	}
	if e.Key != "" {
		return fmt.Sprintf("lp: %s:%d: %v %q", loc, e.Line, e.Err, e.Key)
	}
	return fmt.Sprintf("lp: %s:%d: %v", loc, e.Line, e.Err)
}

func (e *MPSError) Unwrap() error { return e.Err }

// ReadMPSFile reads an MPS file (format detected as for MPSAuto).
func ReadMPSFile(path string) (*Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("lp: %w", err)
	}
	defer f.Close()
	m, err := ReadMPS(f, MPSAuto)
	var me *MPSError
	if errors.As(err, &me) {
		me.File = path
	}
	return m, err
}

// ReadMPS reads a linear or mixed-integer program in MPS format: sections
// NAME, OBJSENSE (MIN/MAX, on the same or the next line), ROWS (N, E, L,
// G; the first N row is the objective, later N rows become free rows),
// COLUMNS with MARKER INTORG/INTEND integer sections, RHS, RANGES, BOUNDS
// (UP, LO, FX, FR, MI, PL, BV, LI, UI) and ENDATA. Conventions: the
// objective constant is minus the RHS of the objective row (as CLP and
// HiGHS read it); a negative UP bound on a column whose lower bound was not
// set makes the lower bound −∞; integer columns without bounds are general
// integers in [0, +∞); values of magnitude ≥ 1e30 are infinite. Malformed
// input gives an *MPSError with its line number. Cost O(file size).
func ReadMPS(r io.Reader, format MPSFormat) (*Model, error) {
	p := &mpsParser{
		format:  format,
		m:       NewModel(""),
		rowIdx:  map[string]int{},
		colIdx:  map[string]int{},
		objRow:  "",
		loSet:   map[int]bool{},
		rowType: nil,
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 16*1024*1024)
	section := ""
	ended := false
	for sc.Scan() {
		p.line++
		line := strings.TrimRightFunc(sc.Text(), unicode.IsSpace)
		if line == "" || line[0] == '*' || len(strings.Fields(line)) == 0 {
			continue
		}
		if line[0] != ' ' && line[0] != '\t' {
			// A section header.
			fields := strings.Fields(line)
			section = strings.ToUpper(fields[0])
			switch section {
			case "NAME":
				if len(fields) > 1 {
					p.m.Name = strings.TrimSpace(line[4:])
				}
			case "OBJSENSE", "OBJSENS":
				section = "OBJSENSE"
				if len(fields) > 1 {
					if err := p.sense(fields[1]); err != nil {
						return nil, err
					}
				}
			case "ROWS", "COLUMNS", "RHS", "RANGES", "BOUNDS":
			case "ENDATA":
				ended = true
			case "SOS", "QUADOBJ", "QSECTION", "QMATRIX", "QCMATRIX", "CSECTION", "INDICATORS":
				return nil, p.errf(section, ErrMPSUnsupported)
			default:
				return nil, p.errf(section, ErrMPSSection)
			}
			if ended {
				break
			}
			continue
		}
		var err error
		switch section {
		case "OBJSENSE":
			f := strings.Fields(line)
			err = p.sense(f[0])
		case "ROWS":
			err = p.row(p.fields(line, 2))
		case "COLUMNS":
			err = p.column(line)
		case "RHS":
			err = p.rhs(p.pairs(line))
		case "RANGES":
			err = p.ranges(p.pairs(line))
		case "BOUNDS":
			err = p.bound(line)
		default:
			err = p.errf("", ErrMPSSection)
		}
		if err != nil {
			return nil, err
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("lp: reading mps: %w", err)
	}
	if !ended {
		return nil, p.errf("", ErrMPSEnd)
	}
	p.finish()
	return p.m, nil
}

type mpsParser struct {
	format  MPSFormat
	m       *Model
	line    int
	rowIdx  map[string]int // model row index; −1 for the objective, −2 for dropped
	colIdx  map[string]int
	objRow  string
	rowType []byte
	rhsVal  []float64
	rngVal  []float64
	hasRng  []bool
	inInt   bool
	loSet   map[int]bool
	lastCol string
}

func (p *mpsParser) errf(key string, err error) error {
	return &MPSError{Line: p.line, Key: key, Err: err}
}

func (p *mpsParser) sense(word string) error {
	switch strings.ToUpper(word) {
	case "MAX", "MAXIMIZE", "MAXIMISE":
		p.m.Sense = Maximize
	case "MIN", "MINIMIZE", "MINIMISE":
		p.m.Sense = Minimize
	default:
		return p.errf(word, ErrMPSSection)
	}
	return nil
}

// fixedFields splits a line by the fixed MPS column positions.
func fixedFields(line string) []string {
	cuts := [][2]int{{1, 3}, {4, 12}, {14, 22}, {24, 36}, {39, 47}, {49, 61}}
	var out []string
	for _, c := range cuts {
		if c[0] >= len(line) {
			break
		}
		end := c[1]
		if end > len(line) {
			end = len(line)
		}
		out = append(out, strings.TrimSpace(line[c[0]:end]))
	}
	return out
}

// fields splits a data line into exactly want fields when possible.
func (p *mpsParser) fields(line string, want int) []string {
	if p.format == MPSFixed {
		f := fixedFields(line)
		if len(f) > want {
			f = f[:want]
		}
		return f
	}
	f := strings.Fields(line)
	if p.format == MPSAuto && len(f) != want {
		if g := fixedFields(line); len(g) >= want {
			return g[:want]
		}
	}
	return f
}

func (p *mpsParser) number(s string) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) {
		return 0, p.errf(s, ErrMPSNumber)
	}
	if v >= mpsInfinity {
		v = math.Inf(1)
	} else if v <= -mpsInfinity {
		v = math.Inf(-1)
	}
	return v, nil
}

func (p *mpsParser) row(f []string) error {
	if len(f) != 2 {
		return p.errf("", ErrMPSFields)
	}
	typ, name := strings.ToUpper(f[0]), f[1]
	if _, dup := p.rowIdx[name]; dup || name == p.objRow && name != "" {
		return p.errf(name, ErrMPSDuplicate)
	}
	if typ == "N" && p.objRow == "" {
		p.objRow = name
		p.m.ObjName = name
		p.rowIdx[name] = -1
		return nil
	}
	var lo, up float64
	switch typ {
	case "N":
		lo, up = math.Inf(-1), math.Inf(1)
	case "E":
	case "L":
		lo = math.Inf(-1)
	case "G":
		up = math.Inf(1)
	default:
		return p.errf(f[0], ErrMPSRowType)
	}
	p.rowIdx[name] = p.m.AddRow(name, lo, up, nil, nil)
	p.rowType = append(p.rowType, typ[0])
	p.rhsVal = append(p.rhsVal, 0)
	p.rngVal = append(p.rngVal, 0)
	p.hasRng = append(p.hasRng, false)
	return nil
}

// splitData splits a COLUMNS/RHS/RANGES line into a leading name and
// (row, value) pairs; in the free form a missing leading name (RHS or
// RANGES set) is allowed.
func (p *mpsParser) splitData(line string, nameOptional bool) (name string, pairs []string, ok bool) {
	var f []string
	if p.format == MPSFixed {
		f = fixedFields(line)
		if len(f) > 0 && f[0] == "" {
			f = f[1:]
		}
	} else {
		f = strings.Fields(line)
		if p.format == MPSAuto && len(f) != 3 && len(f) != 5 && !(nameOptional && (len(f) == 2 || len(f) == 4)) {
			g := fixedFields(line)
			if len(g) > 0 {
				g = g[1:]
			}
			f = g
		}
	}
	switch {
	case len(f) == 3 || len(f) == 5:
		return f[0], f[1:], true
	case nameOptional && (len(f) == 2 || len(f) == 4):
		return "", f, true
	}
	return "", nil, false
}

func (p *mpsParser) column(line string) error {
	f := strings.Fields(line)
	if len(f) >= 3 && strings.Trim(strings.ToUpper(f[1]), "'\"") == "MARKER" {
		switch strings.Trim(strings.ToUpper(f[2]), "'\"") {
		case "INTORG":
			p.inInt = true
		case "INTEND":
			p.inInt = false
		default:
			return p.errf(f[2], ErrMPSMarker)
		}
		return nil
	}
	name, pairs, ok := p.splitData(line, false)
	if !ok {
		return p.errf("", ErrMPSFields)
	}
	j, seen := p.colIdx[name]
	if !seen {
		j = p.m.AddCol(name, 0, 0, math.Inf(1))
		p.colIdx[name] = j
		p.m.Integer[j] = p.inInt
	}
	for k := 0; k+1 < len(pairs); k += 2 {
		v, err := p.number(pairs[k+1])
		if err != nil {
			return err
		}
		if math.IsInf(v, 0) {
			return p.errf(pairs[k+1], ErrMPSNumber)
		}
		i, ok := p.rowIdx[pairs[k]]
		if !ok {
			return p.errf(pairs[k], ErrMPSRow)
		}
		if i == -1 {
			p.m.Obj[j] += v
			continue
		}
		p.m.SetCoef(i, j, v)
	}
	return nil
}

// pairs returns the (row, value) pairs of an RHS or RANGES line, or nil.
func (p *mpsParser) pairs(line string) []string {
	_, pairs, ok := p.splitData(line, true)
	if !ok {
		return nil
	}
	return pairs
}

func (p *mpsParser) rhs(pairs []string) error {
	if pairs == nil {
		return p.errf("", ErrMPSFields)
	}
	for k := 0; k+1 < len(pairs); k += 2 {
		v, err := p.number(pairs[k+1])
		if err != nil {
			return err
		}
		i, ok := p.rowIdx[pairs[k]]
		if !ok {
			return p.errf(pairs[k], ErrMPSRow)
		}
		if i == -1 {
			p.m.Constant = -v
			continue
		}
		p.rhsVal[i] = v
	}
	return nil
}

func (p *mpsParser) ranges(pairs []string) error {
	if pairs == nil {
		return p.errf("", ErrMPSFields)
	}
	for k := 0; k+1 < len(pairs); k += 2 {
		v, err := p.number(pairs[k+1])
		if err != nil {
			return err
		}
		i, ok := p.rowIdx[pairs[k]]
		if !ok || i < 0 {
			return p.errf(pairs[k], ErrMPSRow)
		}
		p.rngVal[i] = v
		p.hasRng[i] = true
	}
	return nil
}

func (p *mpsParser) bound(line string) error {
	var f []string
	if p.format == MPSFixed {
		f = fixedFields(line)
		if len(f) >= 4 && f[1] == "" {
			f = append(f[:1], f[2:]...)
		}
	} else {
		f = strings.Fields(line)
	}
	if len(f) < 2 {
		return p.errf("", ErrMPSFields)
	}
	typ := strings.ToUpper(f[0])
	needsValue := false
	switch typ {
	case "UP", "LO", "FX", "LI", "UI":
		needsValue = true
	case "FR", "MI", "PL", "BV":
	case "SC":
		return p.errf(f[0], ErrMPSUnsupported)
	default:
		return p.errf(f[0], ErrMPSBound)
	}
	// Fields after the type: [set] column [value].
	rest := f[1:]
	var colName, valStr string
	switch {
	case needsValue && len(rest) == 3, !needsValue && len(rest) == 3:
		colName, valStr = rest[1], rest[2]
	case needsValue && len(rest) == 2:
		colName, valStr = rest[0], rest[1]
	case !needsValue && len(rest) == 2:
		// "set column" or "column value" (BV with a value, no set).
		if _, isCol := p.colIdx[rest[1]]; isCol {
			colName = rest[1]
		} else {
			colName, valStr = rest[0], rest[1]
		}
	case !needsValue && len(rest) == 1:
		colName = rest[0]
	default:
		if p.format == MPSAuto {
			g := fixedFields(line)
			if len(g) >= 4 {
				colName, valStr = g[2], g[3]
				break
			}
			if len(g) == 3 && !needsValue {
				colName = g[2]
				break
			}
		}
		return p.errf("", ErrMPSFields)
	}
	j, ok := p.colIdx[colName]
	if !ok {
		return p.errf(colName, ErrMPSColumn)
	}
	var v float64
	if valStr != "" {
		var err error
		if v, err = p.number(valStr); err != nil {
			return err
		}
	}
	m := p.m
	// An upper bound of −∞ or a lower bound of +∞ leaves no value at all.
	if (math.IsInf(v, -1) && (typ == "UP" || typ == "UI")) || (math.IsInf(v, 1) && (typ == "LO" || typ == "LI")) {
		return p.errf(valStr, ErrMPSNumber)
	}
	switch typ {
	case "UP", "UI":
		m.ColUpper[j] = v
		if v < 0 && !p.loSet[j] && m.ColLower[j] == 0 {
			m.ColLower[j] = math.Inf(-1)
		}
		if typ == "UI" {
			m.Integer[j] = true
		}
	case "LO", "LI":
		m.ColLower[j] = v
		p.loSet[j] = true
		if typ == "LI" {
			m.Integer[j] = true
		}
	case "FX":
		if math.IsInf(v, 0) {
			return p.errf(valStr, ErrMPSNumber)
		}
		m.ColLower[j], m.ColUpper[j] = v, v
		p.loSet[j] = true
	case "FR":
		m.ColLower[j], m.ColUpper[j] = math.Inf(-1), math.Inf(1)
		p.loSet[j] = true
	case "MI":
		m.ColLower[j] = math.Inf(-1)
		p.loSet[j] = true
	case "PL":
		m.ColUpper[j] = math.Inf(1)
	case "BV":
		m.ColLower[j], m.ColUpper[j] = 0, 1
		m.Integer[j] = true
		p.loSet[j] = true
	}
	return nil
}

// finish applies right-hand sides and ranges to the rows.
func (p *mpsParser) finish() {
	m := p.m
	for i, typ := range p.rowType {
		b := p.rhsVal[i]
		r := p.rngVal[i]
		switch typ {
		case 'E':
			m.RowLower[i], m.RowUpper[i] = b, b
			if p.hasRng[i] {
				if r > 0 {
					m.RowUpper[i] = b + r
				} else {
					m.RowLower[i] = b + r
				}
			}
		case 'L':
			m.RowUpper[i] = b
			if p.hasRng[i] {
				m.RowLower[i] = b - math.Abs(r)
			}
		case 'G':
			m.RowLower[i] = b
			if p.hasRng[i] {
				m.RowUpper[i] = b + math.Abs(r)
			}
		}
	}
}

// card writes one data line with its fields at the fixed-format columns
// (2, 5, 15, 25 and 40) where the names allow, so that readers which guess
// between fixed and free format see the same fields either way. Numbers may
// run past column 36; free readers and the common fixed readers accept it.
func card(w *bufio.Writer, typ, name1, name2, value, marker string) {
	line := fmt.Sprintf(" %-2s %-8s  %-8s  %s", typ, name1, name2, value)
	if marker != "" {
		line = fmt.Sprintf("%-39s%s", line, marker)
	}
	w.WriteString(strings.TrimRight(line, " "))
	w.WriteByte('\n')
}

// mpsPlainName reports whether a name reads back as one free-format field:
// not empty, no white space of any kind (strings.Fields splits on every
// Unicode space, vertical tab included), and not the word the reader takes
// for an integer marker.
func mpsPlainName(n string) bool {
	return n != "" && strings.IndexFunc(n, unicode.IsSpace) < 0 &&
		strings.Trim(strings.ToUpper(n), "'\"") != "MARKER"
}

// mpsNames returns names that the free reader gives back one for one. The
// first use of each plain name is kept (taken holds names reserved
// beforehand); any other name becomes prefix<index>, with a further _<n>
// when even that is in use.
func mpsNames(names []string, prefix string, taken map[string]bool) []string {
	if taken == nil {
		taken = map[string]bool{}
	}
	out := make([]string, len(names))
	for i, n := range names {
		if mpsPlainName(n) && !taken[n] {
			taken[n] = true
			out[i] = n
		}
	}
	for i := range out {
		if out[i] != "" {
			continue
		}
		n := prefix + strconv.Itoa(i)
		for k := 1; taken[n]; k++ {
			n = prefix + strconv.Itoa(i) + "_" + strconv.Itoa(k)
		}
		taken[n] = true
		out[i] = n
	}
	return out
}

// WriteMPS writes m in free MPS format, with fields placed at the fixed
// columns when names have at most 8 characters. Names that are empty,
// contain white space or repeat an earlier name are replaced by C<j> or
// R<i> (see mpsNames). Every integer column gets
// explicit bounds (other readers take unbounded integer markers as
// binaries). Ranged rows are written as G rows with a RANGES entry. Numbers
// are written with 17 significant digits, so ReadMPS gives back the same
// model. Cost O(nonzeros).
func WriteMPS(w io.Writer, m *Model) error {
	bw := bufio.NewWriter(w)
	name := m.Name
	if !mpsPlainName(name) {
		name = "model"
	}
	obj := m.ObjName
	if !mpsPlainName(obj) {
		obj = "obj"
	}
	colNames := mpsNames(m.ColName, "C", nil)
	rowNames := mpsNames(m.RowName, "R", map[string]bool{obj: true})
	num := func(v float64) string {
		switch {
		case math.IsInf(v, 1):
			return "1e30"
		case math.IsInf(v, -1):
			return "-1e30"
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	fmt.Fprintf(bw, "NAME %s\n", name)
	if m.Sense == Maximize {
		fmt.Fprintf(bw, "OBJSENSE\n    MAX\n")
	}
	fmt.Fprintf(bw, "ROWS\n N  %s\n", obj)
	for i := range m.RowLower {
		lo, up := m.RowLower[i], m.RowUpper[i]
		typ := "G"
		switch {
		case lo == up:
			typ = "E"
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			typ = "N"
		case math.IsInf(lo, -1):
			typ = "L"
		}
		fmt.Fprintf(bw, " %s  %s\n", typ, rowNames[i])
	}
	fmt.Fprintf(bw, "COLUMNS\n")
	cols := m.Columns()
	inInt := false
	marker := 0
	for j := range m.Obj {
		if m.Integer[j] != inInt {
			kind := "INTORG"
			if inInt {
				kind = "INTEND"
			}
			card(bw, "", fmt.Sprintf("MARKER%d", marker), "'MARKER'", "", "'"+kind+"'")
			marker++
			inInt = m.Integer[j]
		}
		cn := colNames[j]
		wrote := false
		if m.Obj[j] != 0 {
			card(bw, "", cn, obj, num(m.Obj[j]), "")
			wrote = true
		}
		for p := cols.Start[j]; p < cols.Start[j+1]; p++ {
			card(bw, "", cn, rowNames[cols.Index[p]], num(cols.Value[p]), "")
			wrote = true
		}
		if !wrote {
			// Keep empty columns: a zero objective entry declares them.
			card(bw, "", cn, obj, "0", "")
		}
	}
	if inInt {
		card(bw, "", fmt.Sprintf("MARKER%d", marker), "'MARKER'", "", "'INTEND'")
	}
	fmt.Fprintf(bw, "RHS\n")
	if m.Constant != 0 {
		card(bw, "", "RHS", obj, num(-m.Constant), "")
	}
	var ranged []int
	for i := range m.RowLower {
		lo, up := m.RowLower[i], m.RowUpper[i]
		var b float64
		switch {
		case lo == up, math.IsInf(up, 1):
			b = lo
		case math.IsInf(lo, -1):
			b = up
		default:
			b = lo
			ranged = append(ranged, i)
		}
		if b != 0 && !math.IsInf(b, 0) {
			card(bw, "", "RHS", rowNames[i], num(b), "")
		}
	}
	if len(ranged) > 0 {
		fmt.Fprintf(bw, "RANGES\n")
		for _, i := range ranged {
			card(bw, "", "RNG", rowNames[i], num(m.RowUpper[i]-m.RowLower[i]), "")
		}
	}
	fmt.Fprintf(bw, "BOUNDS\n")
	for j := range m.Obj {
		cn := colNames[j]
		lo, up := m.ColLower[j], m.ColUpper[j]
		switch {
		case lo == up:
			card(bw, "FX", "BND", cn, num(lo), "")
			continue
		case math.IsInf(lo, -1) && math.IsInf(up, 1):
			card(bw, "FR", "BND", cn, "", "")
			continue
		}
		if math.IsInf(lo, -1) {
			card(bw, "MI", "BND", cn, "", "")
		} else if lo != 0 || m.Integer[j] || up < 0 {
			card(bw, "LO", "BND", cn, num(lo), "")
		}
		if math.IsInf(up, 1) {
			if m.Integer[j] {
				card(bw, "PL", "BND", cn, "", "")
			}
		} else {
			card(bw, "UP", "BND", cn, num(up), "")
		}
	}
	fmt.Fprintf(bw, "ENDATA\n")
	return bw.Flush()
}
