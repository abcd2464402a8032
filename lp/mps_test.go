package lp

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand"
	"strings"
	"testing"
)

var inf = math.Inf(1)

// sameModel reports the first difference between two models (row bounds
// within 1e-12 relative, since RANGES store a difference).
func sameModel(a, b *Model) error {
	if a.NumRows() != b.NumRows() || a.NumCols() != b.NumCols() {
		return fmt.Errorf("size %d×%d vs %d×%d", a.NumRows(), a.NumCols(), b.NumRows(), b.NumCols())
	}
	if a.Sense != b.Sense || a.Constant != b.Constant {
		return fmt.Errorf("sense/constant %v %v vs %v %v", a.Sense, a.Constant, b.Sense, b.Constant)
	}
	for j := range a.Obj {
		if a.ColName[j] != b.ColName[j] || a.Obj[j] != b.Obj[j] || a.ColLower[j] != b.ColLower[j] ||
			a.ColUpper[j] != b.ColUpper[j] || a.Integer[j] != b.Integer[j] {
			return fmt.Errorf("column %d: %q %v [%v,%v] %v vs %q %v [%v,%v] %v", j,
				a.ColName[j], a.Obj[j], a.ColLower[j], a.ColUpper[j], a.Integer[j],
				b.ColName[j], b.Obj[j], b.ColLower[j], b.ColUpper[j], b.Integer[j])
		}
	}
	for i := range a.RowLower {
		if a.RowName[i] != b.RowName[i] || !sameBound(a.RowLower[i], b.RowLower[i]) || !sameBound(a.RowUpper[i], b.RowUpper[i]) {
			return fmt.Errorf("row %d: %q [%v,%v] vs %q [%v,%v]", i, a.RowName[i], a.RowLower[i], a.RowUpper[i],
				b.RowName[i], b.RowLower[i], b.RowUpper[i])
		}
	}
	ca, cb := a.Columns(), b.Columns()
	if len(ca.Value) != len(cb.Value) {
		return fmt.Errorf("%d vs %d nonzeros", len(ca.Value), len(cb.Value))
	}
	for p := range ca.Value {
		if ca.Index[p] != cb.Index[p] || ca.Value[p] != cb.Value[p] {
			return fmt.Errorf("entry %d: row %d %v vs row %d %v", p, ca.Index[p], ca.Value[p], cb.Index[p], cb.Value[p])
		}
	}
	return nil
}

func sameBound(a, b float64) bool {
	return a == b || math.Abs(a-b) <= 1e-12*math.Max(math.Abs(a), math.Abs(b))
}

func roundTrip(m *Model) (*Model, error) {
	var buf bytes.Buffer
	if err := WriteMPS(&buf, m); err != nil {
		return nil, err
	}
	return ReadMPS(&buf, MPSFree)
}

func TestMPSRoundTripSamples(t *testing.T) {
	for _, name := range []string{"afiro", "brandy", "e226", "finnis", "exmip1", "p0033", "lseu"} {
		t.Run(name, func(t *testing.T) {
			m := readSample(t, name)
			back, err := roundTrip(m)
			if err != nil {
				t.Fatal(err)
			}
			if err := sameModel(m, back); err != nil {
				t.Fatal(err)
			}
		})
	}
}

func TestMPSRoundTripRandom(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	for k := 0; k < 100; k++ {
		m := randomModel(rng, k%2 == 0)
		for j := range m.Integer {
			m.Integer[j] = rng.Intn(3) == 0
			m.ColName[j] = fmt.Sprintf("x%d", j)
		}
		for i := range m.RowName {
			m.RowName[i] = fmt.Sprintf("r%d", i)
		}
		m.Constant = float64(rng.Intn(7) - 3)
		back, err := roundTrip(m)
		if err != nil {
			t.Fatal(err)
		}
		if err := sameModel(m, back); err != nil {
			t.Fatalf("case %d: %v", k, err)
		}
	}
}

// TestReadExmip1 checks the reading of exmip1 against the problem stated in
// the file's own header comment (source: exmip1.mps header, COIN-OR sample).
func TestReadExmip1(t *testing.T) {
	m := readSample(t, "exmip1")
	wantRows := [][2]float64{{2.5, inf}, {-inf, 2.1}, {4, 4}, {1.8, 5}, {3, 15}}
	for i, w := range wantRows {
		if m.RowLower[i] != w[0] || m.RowUpper[i] != w[1] {
			t.Errorf("row %d: [%v, %v], want %v", i, m.RowLower[i], m.RowUpper[i], w)
		}
	}
	wantCols := [][2]float64{{2.5, inf}, {0, 4.1}, {0, inf}, {0, inf}, {0.5, 4}, {0, inf}, {0, inf}, {0, 4.3}}
	for j, w := range wantCols {
		if m.ColLower[j] != w[0] || m.ColUpper[j] != w[1] {
			t.Errorf("column %d: [%v, %v], want %v", j, m.ColLower[j], m.ColUpper[j], w)
		}
		if want := j == 2 || j == 3; m.Integer[j] != want {
			t.Errorf("column %d: integer %v, want %v", j, m.Integer[j], want)
		}
	}
	r, err := Solve(context.Background(), m, Settings{})
	if err != nil {
		t.Fatal(err)
	}
	if err := verifyOptimal(m, r); err != nil {
		t.Fatal(err)
	}
}

const featuresMPS = `* every feature in free format
NAME features test
OBJSENSE
    MAX
ROWS
 N cost
 E eqpos
 E eqneg
 L le
 G ge
 N spare
COLUMNS
 a cost 1 eqpos 1
 a le 2
 MARKER 'MARKER' 'INTORG'
 b cost 2 eqneg 1
 MARKER 'MARKER' 'INTEND'
 c ge 1 spare 3
 d cost -1
 e le 1
 f ge 1
 g le 1
 h le 1
 i le 1
 k ge 1
RHS
 cost -5
 eqpos 3 eqneg 4
 le 10
 ge 1
RANGES
 eqpos 2 eqneg -3
 le 4
 ge -2
BOUNDS
 UP BND a 4
 UP BND b -2
 MI c
 FR BND d
 BV BND e
 LI BND f -3
 UI BND f 7
 FX BND g 1.5
 LO BND h -1
 UP BND h -0.5
 PL BND i
 UP BND k 1e30
ENDATA
`

func TestReadMPSFeatures(t *testing.T) {
	m, err := ReadMPS(strings.NewReader(featuresMPS), MPSAuto)
	if err != nil {
		t.Fatal(err)
	}
	if m.Name != "features test" || m.Sense != Maximize || m.Constant != 5 || m.ObjName != "cost" {
		t.Errorf("header: name %q sense %v constant %v objective %q", m.Name, m.Sense, m.Constant, m.ObjName)
	}
	rows := []struct {
		name   string
		lo, up float64
	}{
		{"eqpos", 3, 5}, {"eqneg", 1, 4}, {"le", 6, 10}, {"ge", 1, 3}, {"spare", -inf, inf},
	}
	for i, w := range rows {
		if m.RowName[i] != w.name || m.RowLower[i] != w.lo || m.RowUpper[i] != w.up {
			t.Errorf("row %d: %q [%v, %v], want %q [%v, %v]", i, m.RowName[i], m.RowLower[i], m.RowUpper[i], w.name, w.lo, w.up)
		}
	}
	cols := []struct {
		name    string
		obj     float64
		lo, up  float64
		integer bool
	}{
		{"a", 1, 0, 4, false},
		{"b", 2, -inf, -2, true}, // negative UP with default lower: lower −∞
		{"c", 0, -inf, inf, false},
		{"d", -1, -inf, inf, false},
		{"e", 0, 0, 1, true},
		{"f", 0, -3, 7, true},
		{"g", 0, 1.5, 1.5, false},
		{"h", 0, -1, -0.5, false}, // lower set explicitly: kept
		{"i", 0, 0, inf, false},
		{"k", 0, 0, inf, false},
	}
	for j, w := range cols {
		if m.ColName[j] != w.name || m.Obj[j] != w.obj || m.ColLower[j] != w.lo || m.ColUpper[j] != w.up || m.Integer[j] != w.integer {
			t.Errorf("column %d: got %q %v [%v, %v] %v, want %+v", j, m.ColName[j], m.Obj[j], m.ColLower[j], m.ColUpper[j], m.Integer[j], w)
		}
	}
	back, err := roundTrip(m)
	if err != nil {
		t.Fatal(err)
	}
	if err := sameModel(m, back); err != nil {
		t.Fatal(err)
	}
}

// TestReadMPSFixedNames reads a fixed-format line whose names hold spaces.
func TestReadMPSFixedNames(t *testing.T) {
	src := "NAME          FIXED\nROWS\n N  OBJ\n L  ROW ONE\nCOLUMNS\n    COL A     OBJ       1.0            ROW ONE   2.0\nRHS\n    RHS       ROW ONE   4.0\nBOUNDS\n UP BND       COL A     3.0\nENDATA\n"
	m, err := ReadMPS(strings.NewReader(src), MPSFixed)
	if err != nil {
		t.Fatal(err)
	}
	if m.ColName[0] != "COL A" || m.RowName[0] != "ROW ONE" || m.RowUpper[0] != 4 || m.ColUpper[0] != 3 {
		t.Fatalf("got %q %q %v %v", m.ColName[0], m.RowName[0], m.RowUpper[0], m.ColUpper[0])
	}
	cols := m.Columns()
	if len(cols.Value) != 1 || cols.Value[0] != 2 || m.Obj[0] != 1 {
		t.Fatalf("matrix %v obj %v", cols.Value, m.Obj)
	}
}

// TestWriteMPSAwkwardNames writes names the free reader would split or
// confuse (any Unicode space, a repeat, the objective's name, the marker
// word) and checks that the model reads back whole, with the plain names
// kept and each replacement unique. The vertical tab case was found by
// FuzzReadMPS: fixed format reads "00\v0" as one name.
func TestWriteMPSAwkwardNames(t *testing.T) {
	m := NewModel("a\vb")
	m.ObjName = "cost"
	x := m.AddCol("x\vy", 1, 0, 4)
	dup := m.AddCol("C0", 2, 0, 4) // the name x's replacement would take
	z := m.AddIntCol("x", 0, 0, 3)
	w := m.AddCol("x", 1, 0, 2)                            // a repeat
	m.AddRow("cost", 0, 5, []int{x, dup}, []float64{1, 1}) // the objective's name
	m.AddRow("'MARKER'", -1, 5, []int{z}, []float64{1})
	m.AddRow("r\u00a0s", 1, 1, []int{x, w}, []float64{1, -1})
	m.AddRow("ok", 0, 9, []int{dup, z}, []float64{3, 1})
	back, err := roundTrip(m)
	if err != nil {
		t.Fatal(err)
	}
	if back.NumRows() != m.NumRows() || back.NumCols() != m.NumCols() {
		t.Fatalf("size %d×%d, want %d×%d", back.NumRows(), back.NumCols(), m.NumRows(), m.NumCols())
	}
	if back.ColName[1] != "C0" || back.ColName[2] != "x" || back.RowName[3] != "ok" {
		t.Fatalf("plain names not kept: %q %q", back.ColName, back.RowName)
	}
	for _, names := range [][]string{back.ColName, append([]string{back.ObjName}, back.RowName...)} {
		seen := map[string]bool{}
		for _, n := range names {
			if seen[n] || n == "" {
				t.Fatalf("name %q repeated or empty in %q", n, names)
			}
			seen[n] = true
		}
	}
	// Everything but the names must come back as written.
	copy(back.ColName, m.ColName)
	copy(back.RowName, m.RowName)
	if err := sameModel(m, back); err != nil {
		t.Fatal(err)
	}
}

func TestReadMPSErrors(t *testing.T) {
	head := "NAME t\nROWS\n N obj\n L r\nCOLUMNS\n"
	for _, tc := range []struct {
		name string
		src  string
		line int
		err  error
	}{
		{"unknown section", "NAME t\nFOO\nENDATA\n", 2, ErrMPSSection},
		{"row type", "NAME t\nROWS\n X r\nENDATA\n", 3, ErrMPSRowType},
		{"duplicate row", "NAME t\nROWS\n N obj\n L r\n G r\nENDATA\n", 5, ErrMPSDuplicate},
		{"unknown row", head + " x q 1\nENDATA\n", 6, ErrMPSRow},
		{"bad number", head + " x r 1.2.3\nENDATA\n", 6, ErrMPSNumber},
		{"fields", head + " x r\nENDATA\n", 6, ErrMPSFields},
		{"nan", head + " x r NaN\nENDATA\n", 6, ErrMPSNumber},
		{"marker", head + " M 'MARKER' 'SOSORG'\nENDATA\n", 6, ErrMPSMarker},
		{"bound type", head + " x r 1\nBOUNDS\n XX BND x 3\nENDATA\n", 8, ErrMPSBound},
		{"semi-continuous", head + " x r 1\nBOUNDS\n SC BND x 3\nENDATA\n", 8, ErrMPSUnsupported},
		{"sos", head + " x r 1\nSOS\n S1 set\nENDATA\n", 7, ErrMPSUnsupported},
		{"bound column", head + " x r 1\nBOUNDS\n UP BND y 3\nENDATA\n", 8, ErrMPSColumn},
		{"rhs row", head + " x r 1\nRHS\n RHS q 3\nENDATA\n", 8, ErrMPSRow},
		{"range on objective", head + " x r 1\nRANGES\n RNG obj 3\nENDATA\n", 8, ErrMPSRow},
		{"no end", head + " x r 1\n", 6, ErrMPSEnd},
		{"form feed line is blank (fuzz regression)", "\f\nFOO\n", 2, ErrMPSSection},
		{"objsense", "NAME t\nOBJSENSE\n    UP\nENDATA\n", 3, ErrMPSSection},
		{"upper bound of minus infinity (fuzz regression)", head + " x r 1\nBOUNDS\n UP BND x -1e70\nENDATA\n", 8, ErrMPSNumber},
		{"lower bound of plus infinity", head + " x r 1\nBOUNDS\n LO BND x 1e30\nENDATA\n", 8, ErrMPSNumber},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadMPS(strings.NewReader(tc.src), MPSAuto)
			var me *MPSError
			if !errors.As(err, &me) {
				t.Fatalf("got %v, want an *MPSError", err)
			}
			if me.Line != tc.line || !errors.Is(err, tc.err) {
				t.Fatalf("got line %d %v, want line %d %v", me.Line, err, tc.line, tc.err)
			}
			if !strings.HasPrefix(err.Error(), "lp: ") {
				t.Fatalf("error %q lacks the package prefix", err)
			}
		})
	}
}

// FuzzReadMPS feeds arbitrary text to the reader: it must never panic, and
// whatever it accepts must survive a write/read round trip and be
// accepted by NewSolver unless bounds cross.
func FuzzReadMPS(f *testing.F) {
	f.Add(featuresMPS)
	f.Add("NAME t\nROWS\n N obj\n L r\nCOLUMNS\n x obj 1 r 2\nRHS\n RHS r 4\nBOUNDS\n UP BND x 3\nENDATA\n")
	f.Add("NAME          FIXED\nROWS\n N  OBJ\n L  ROW ONE\nCOLUMNS\n    COL A     OBJ       1.0            ROW ONE   2.0\nENDATA\n")
	f.Fuzz(func(t *testing.T, src string) {
		for _, format := range []MPSFormat{MPSAuto, MPSFree, MPSFixed} {
			m, err := ReadMPS(strings.NewReader(src), format)
			if err != nil {
				var me *MPSError
				if errors.As(err, &me) && me.Line < 0 {
					t.Fatalf("negative line in %v", err)
				}
				continue
			}
			if _, err := roundTrip(m); err != nil {
				t.Fatalf("written model does not read back: %v", err)
			}
			if sv, err := NewSolver(m, Settings{MaxIterations: 50}); err == nil && m.NumCols() < 50 {
				sv.Solve(context.Background())
			}
		}
	})
}
