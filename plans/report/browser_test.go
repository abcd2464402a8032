package report

import (
	"context"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// browserTimeout bounds one headless chromium run; a cold start on a busy
// CI machine takes a few seconds.
const browserTimeout = 90 * time.Second

// minLumaStdDev is the least standard deviation of pixel brightness (0–255)
// a rendered report must show. A blank or single-colour page has 0; text,
// tables and charts on white give well above 20. 10 is a safe floor
// (common practice for "not blank" checks, chosen by us).
const minLumaStdDev = 10

// minInkShare is the least share of pixels that are not near-white.
const minInkShare = 0.02

// findChromium returns the path of Debian's chromium (or chromium-browser).
func findChromium() string {
	for _, name := range []string{"chromium", "chromium-browser"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// TestBrowserRender renders the demo report in headless chromium, checks
// that the screenshot is not blank, and that the page has the report's
// sections in order and at least four SVG charts.
func TestBrowserRender(t *testing.T) {
	bin := findChromium()
	if bin == "" {
		t.Skip("chromium is not installed (apt-get install -y chromium; .ci/run installs it): browser rendering not checked")
	}
	if testing.Short() {
		t.Skip("browser rendering takes tens of seconds; it runs in the full suite (go test without -short)")
	}
	c, r := solvedDemo(t)
	page := render(t, c, r, HTML)
	checkSections(t, page, sectionIDs)
	if n := strings.Count(page, "<svg"); n < 4 {
		t.Errorf("html has %d <svg> charts, want at least 4", n)
	}

	img := screenshot(t, bin, page, 3000)
	// The charts must have drawn colour: the utilisation ramp's darkest
	// blue or the ceiling orange must appear somewhere.
	if !hasColour(img) {
		t.Error("screenshot has no chart colours: the SVG charts did not render")
	}

	// A report with a tornado (a small synthetic case, whose page is
	// shorter than the window): not blank, and both ends' bars painted.
	c, r, bars := solvedTornado(t)
	page = renderWith(t, c, r, HTML, Options{Tornado: bars})
	img = screenshot(t, bin, page, 6000)
	for _, end := range []struct {
		name string
		c    color.RGBA
	}{{"low", tornadoLowColor}, {"high", tornadoHighColor}} {
		// A bar half-row is at least 15 × 5 px at this width, even the
		// shortest (the hairline of an end that does not move is not
		// counted; this case moves every factor).
		if n := countColour(img, end.c); n < 75*len(bars)/2 {
			t.Errorf("screenshot has %d pixels of the tornado's %s-end colour, want at least %d: the tornado chart did not render", n, end.name, 75*len(bars)/2)
		} else {
			t.Logf("tornado %s-end bars: %d pixels", end.name, n)
		}
	}
}

// screenshot renders page in headless chromium in a window 1100 px wide
// and height px tall, checks that it is not blank and returns the image.
func screenshot(t *testing.T, bin, page string, height int) image.Image {
	t.Helper()
	dir := t.TempDir()
	htmlPath := filepath.Join(dir, "report.html")
	if err := os.WriteFile(htmlPath, []byte(page), 0o644); err != nil {
		t.Fatal(err)
	}
	shot := filepath.Join(dir, "report.png")
	out := chromium(t, bin, dir, "--window-size=1100,"+strconv.Itoa(height), "--screenshot="+shot, "file://"+htmlPath)
	f, err := os.Open(shot)
	if err != nil {
		t.Fatalf("chromium wrote no screenshot: %v\n%s", err, out)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	std, ink := lumaStats(img)
	t.Logf("screenshot %v: brightness standard deviation %.1f, ink share %.3f", img.Bounds().Size(), std, ink)
	if std < minLumaStdDev {
		t.Errorf("screenshot brightness standard deviation %.2f < %d: the page looks blank", std, minLumaStdDev)
	}
	if ink < minInkShare {
		t.Errorf("only %.3f of the screenshot is not white, want at least %.2f", ink, minInkShare)
	}
	return img
}

// colourTolerance is how far (per 8-bit channel) a rendered pixel may be
// from the colour it was drawn in: browsers paint sRGB SVG fills exactly,
// give or take rounding.
const colourTolerance = 3

// countColour counts the pixels within colourTolerance of c.
func countColour(img image.Image, c color.RGBA) int {
	b := img.Bounds()
	n := 0
	near := func(a uint32, b uint8) bool {
		d := int(a>>8) - int(b)
		return d >= -colourTolerance && d <= colourTolerance
	}
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			if near(r, c.R) && near(g, c.G) && near(bl, c.B) {
				n++
			}
		}
	}
	return n
}

// chromium runs headless chromium with a fresh profile under dir and
// returns its output.
func chromium(t *testing.T, bin, dir string, args ...string) []byte {
	t.Helper()
	profile, err := os.MkdirTemp(dir, "profile-")
	if err != nil {
		t.Fatal(err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), browserTimeout)
	defer cancel()
	base := []string{"--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
		"--disable-background-networking", "--disable-component-update",
		"--disable-sync", "--disable-quic", "--hide-scrollbars", "--user-data-dir=" + profile}
	out, err := exec.CommandContext(ctx, bin, append(base, args...)...).CombinedOutput()
	if err != nil {
		t.Fatalf("chromium: %v\n%s", err, out)
	}
	return out
}

// Page sizes in PostScript points (ISO 216 A4 is 210 × 297 mm, US Letter
// 8.5 × 11 in; 1 pt = 1/72 in).
var paperSizes = []struct {
	name          string
	width, height float64
}{
	{"A4", 595.28, 841.89},
	{"letter", 612, 792},
}

// mediaBoxRE reads the page boxes of the PDF that chromium writes (its
// page objects are not compressed).
var mediaBoxRE = regexp.MustCompile(`/MediaBox\s*\[\s*0\s+0\s+([0-9.]+)\s+([0-9.]+)\s*\]`)

// maxDemoPages bounds the printed demo report: about one page of text and
// one per chart, plus the tables. More means a chart or table spilled.
const maxDemoPages = 14

// TestBrowserPrint prints the demo report to PDF on A4 and on Letter and
// checks the page size and a sensible page count.
func TestBrowserPrint(t *testing.T) {
	bin := findChromium()
	if bin == "" {
		t.Skip("chromium is not installed (apt-get install -y chromium; .ci/run installs it): printing not checked")
	}
	if testing.Short() {
		t.Skip("printing in chromium takes tens of seconds; it runs in the full suite (go test without -short)")
	}
	c, r := solvedDemo(t)
	page := render(t, c, r, HTML)
	if !strings.Contains(page, "@page { size:auto;") {
		t.Fatal("html has no @page rule with size:auto to set the paper in")
	}
	dir := t.TempDir()
	for _, paper := range paperSizes {
		t.Run(paper.name, func(t *testing.T) {
			// The paper a reader's printer uses, set as a print dialog would.
			src := filepath.Join(dir, paper.name+".html")
			sized := strings.Replace(page, "@page { size:auto;", "@page { size:"+paper.name+";", 1)
			if err := os.WriteFile(src, []byte(sized), 0o644); err != nil {
				t.Fatal(err)
			}
			pdf := filepath.Join(dir, paper.name+".pdf")
			chromium(t, bin, dir, "--no-pdf-header-footer", "--print-to-pdf="+pdf, "file://"+src)
			data, err := os.ReadFile(pdf)
			if err != nil {
				t.Fatalf("chromium wrote no PDF: %v", err)
			}
			boxes := mediaBoxRE.FindAllStringSubmatch(string(data), -1)
			if len(boxes) < 2 {
				t.Fatalf("PDF has %d pages, want several", len(boxes))
			}
			if len(boxes) > maxDemoPages {
				t.Errorf("PDF has %d pages, want at most %d", len(boxes), maxDemoPages)
			}
			for _, b := range boxes {
				w, _ := strconv.ParseFloat(b[1], 64)
				h, _ := strconv.ParseFloat(b[2], 64)
				if math.Abs(w-paper.width) > 1 || math.Abs(h-paper.height) > 1 {
					t.Fatalf("PDF page is %.1f × %.1f pt, want %s %.1f × %.1f", w, h, paper.name, paper.width, paper.height)
				}
			}
			t.Logf("%s: %d pages", paper.name, len(boxes))
		})
	}
}

// lumaStats returns the standard deviation of pixel brightness and the
// share of pixels darker than near-white.
func lumaStats(img image.Image) (std, ink float64) {
	b := img.Bounds()
	var sum, sum2 float64
	n, dark := 0, 0
	for y := b.Min.Y; y < b.Max.Y; y += 2 {
		for x := b.Min.X; x < b.Max.X; x += 2 {
			r, g, bl, _ := img.At(x, y).RGBA()
			l := (0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(bl)) / 257
			sum += l
			sum2 += l * l
			n++
			if l < 235 {
				dark++
			}
		}
	}
	mean := sum / float64(n)
	v := sum2/float64(n) - mean*mean
	if v < 0 {
		v = 0
	}
	return math.Sqrt(v), float64(dark) / float64(n)
}

// hasColour reports whether the image contains clearly saturated pixels
// (the report's text and tables are grey; only the charts are coloured).
func hasColour(img image.Image) bool {
	b := img.Bounds()
	count := 0
	for y := b.Min.Y; y < b.Max.Y; y += 3 {
		for x := b.Min.X; x < b.Max.X; x += 3 {
			r, g, bl, _ := img.At(x, y).RGBA()
			hi := max(r, g, bl) >> 8
			lo := min(r, g, bl) >> 8
			if hi-lo > 60 {
				count++
			}
		}
	}
	return count > 500
}
