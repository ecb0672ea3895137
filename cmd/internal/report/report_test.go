package report

import (
	"bytes"
	"context"
	"database/sql"
	"html"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/plumb-sql/plumb/cmd/internal/demodata"
	"github.com/plumb-sql/plumb/cmd/internal/diagnosis"
	"github.com/plumb-sql/plumb/udf"
)

// demoReport renders the report for the demo's shop data.
func demoReport(t *testing.T) (string, []Row, *sql.Conn) {
	t.Helper()
	ctx := context.Background()
	sets, err := demodata.Generate(1, demodata.DefaultSizes)
	if err != nil {
		t.Fatal(err)
	}
	db, err := udf.Open(ctx, udf.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { db.Close() })
	dir := t.TempDir()
	if _, err := demodata.Write(ctx, db, dir, sets); err != nil {
		t.Fatal(err)
	}
	conn, err := db.Conn(ctx)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { conn.Close() })
	spec := diagnosis.Spec{Source: filepath.Join(dir, "shops.parquet"), By: []string{"shop", "product"}, At: "day", Value: "units", Period: 7}
	var b bytes.Buffer
	rows, err := Render(ctx, conn, spec, Options{Top: 8}, &b)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(dir, "report.html")
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return path, rows, conn
}

// TestReportStructure: every top group has its four plots, the ranked
// table's numbers equal diagnose's, and the file names no external address.
func TestReportStructure(t *testing.T) {
	path, rows, conn := demoReport(t)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	html := string(b)
	if len(rows) != 8 {
		t.Fatalf("%d ranked rows, want 8", len(rows))
	}
	panels := strings.Split(html, `<div class="panel"`)[1:]
	if len(panels) != 8 {
		t.Fatalf("%d panels, want 8", len(panels))
	}
	for i, p := range panels {
		for _, class := range []string{"plot series", "plot transformed", "plot acf", "plot forecast"} {
			re := regexp.MustCompile(`<div class="` + class + `">\s*<svg`)
			if !re.MatchString(p) {
				t.Errorf("panel %d has no %q picture", i+1, class)
			}
		}
		for _, label := range []string{">day<", ">units<", ">lag<"} {
			if !strings.Contains(p, label) {
				t.Errorf("panel %d lacks the axis label %s", i+1, label)
			}
		}
	}
	// The table against diagnose, queried here independently.
	q := `SELECT rank, concat_ws(', ', 'shop=' || shop, 'product=' || product), n, status, array_to_string(violations, ', '),
		` + diagnosis.CausesSQL + `, differences, seasonal_differences, box_cox_lambda, cured, score, adf_p_value, kpss_p_value, mean_p_value, spread_p_value, kpss_q_value
		FROM plumb_report_diagnosis ORDER BY rank, 2 LIMIT 8`
	res, err := conn.QueryContext(context.Background(), q)
	if err != nil {
		t.Fatal(err)
	}
	defer res.Close()
	for i := 0; res.Next(); i++ {
		var rank int64
		var group string
		vals := make([]any, len(Columns))
		ptrs := []any{&rank, &group}
		for j := range vals {
			ptrs = append(ptrs, &vals[j])
		}
		if err := res.Scan(ptrs...); err != nil {
			t.Fatal(err)
		}
		if rows[i].Rank != rank || rows[i].Group != group {
			t.Errorf("row %d: %d %s, want %d %s", i, rows[i].Rank, rows[i].Group, rank, group)
		}
		for j, v := range vals {
			cell := FormatCell(v)
			if rows[i].Cells[j] != cell {
				t.Errorf("row %d %s: %s, want %s", i, Columns[j], rows[i].Cells[j], cell)
			}
			if !strings.Contains(html, "<td>"+template_escape(cell)+"</td>") {
				t.Errorf("row %d %s: %s is not in the HTML", i, Columns[j], cell)
			}
		}
	}
	// Each panel says the group's verdict in words: diagnose's reason.
	reasons, err := conn.QueryContext(context.Background(), `SELECT reason FROM plumb_report_diagnosis ORDER BY rank, concat_ws(', ', 'shop=' || shop, 'product=' || product) LIMIT 8`)
	if err != nil {
		t.Fatal(err)
	}
	defer reasons.Close()
	for i := 0; reasons.Next(); i++ {
		var reason string
		if err := reasons.Scan(&reason); err != nil {
			t.Fatal(err)
		}
		if reason == "" || !strings.Contains(panels[i], `<p class="verdict">`+template_escape(reason)+`</p>`) {
			t.Errorf("panel %d does not say its reason %q", i+1, reason)
		}
	}
	// The ±2 SD band and the forecast interval are translucent fills; each
	// must be drawn in bandColor's own light orange (within 2 per channel,
	// and light: relative luminance above 0.5), not the dark colour an
	// invalid premultiplied value (channels above its alpha) turns into.
	for i, p := range panels {
		for _, class := range []string{"plot series", "plot forecast"} {
			_, picture, _ := strings.Cut(p, `<div class="`+class+`">`)
			picture, _, _ = strings.Cut(picture, "</svg>")
			fills := translucentFill.FindAllStringSubmatch(picture, -1)
			if len(fills) == 0 {
				t.Errorf("panel %d %s: no translucent band", i+1, class)
			}
			for _, f := range fills {
				r, g, b := hexByte(f[1]), hexByte(f[2]), hexByte(f[3])
				luminance := (0.2126*float64(r) + 0.7152*float64(g) + 0.0722*float64(b)) / 255
				if absInt(r-int(bandColor.R)) > 2 || absInt(g-int(bandColor.G)) > 2 || absInt(b-int(bandColor.B)) > 2 || luminance < 0.5 {
					t.Errorf("panel %d %s: band fill #%s%s%s (luminance %.2f), want bandColor's light orange", i+1, class, f[1], f[2], f[3], luminance)
				}
			}
		}
	}
	for _, bad := range []string{"http:", "https:", "url(", "src=", "<script", "@import"} {
		if strings.Contains(html, bad) {
			t.Errorf("the report contains %q", bad)
		}
	}
}

// translucentFill matches an SVG fill with an opacity, as gonum's vgsvg
// writes it: fill:#RRGGBB (optionally AA);fill-opacity:x.
var translucentFill = regexp.MustCompile(`fill:#([0-9A-Fa-f]{2})([0-9A-Fa-f]{2})([0-9A-Fa-f]{2})(?:[0-9A-Fa-f]{2})?;fill-opacity:0?\.[0-9]+`)

func absInt(a int) int {
	if a < 0 {
		return -a
	}
	return a
}

func hexByte(h string) int {
	v, _ := strconv.ParseUint(h, 16, 8)
	return int(v)
}

// bandPixels counts the screenshot's pixels within 14 per channel of the
// band's colour as drawn on white: bandColor (230, 150, 90) at alpha
// 110/255 over (255, 255, 255) is (244, 210, 184).
func bandPixels(t *testing.T, path string) int {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	near := func(v uint32, want int) bool { d := int(v>>8) - want; return d >= -14 && d <= 14 }
	n := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, _ := img.At(x, y).RGBA()
			if near(r, 244) && near(g, 210) && near(bl, 184) {
				n++
			}
		}
	}
	return n
}

func template_escape(s string) string {
	r := strings.NewReplacer("&", "&amp;", "<", "&lt;", ">", "&gt;", `"`, "&#34;", "'", "&#39;")
	return r.Replace(s)
}

// TestReportInChromium opens the report in headless Chromium (Debian's
// chromium package) at a window 1400 px wide, with layoutCheck added to a
// copy of it: the page must load with no console errors, every plot must
// take at least 45% of its panel's width (two a row), no text of a plot
// may be cut at its edge or overlap another (a legend on a title, a date
// tick on the axis label), and no cell of the ranked table but the group
// and its causes may wrap (a p-value broken as "3.9e-" / "06").
// Skipped where chromium is absent, except in CI (CI=true), which installs it.
func TestReportInChromium(t *testing.T) {
	chromium := chromiumPath(t)
	path, _, _ := demoReport(t)
	page, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	checked := filepath.Join(t.TempDir(), "checked.html")
	if err := os.WriteFile(checked, bytes.Replace(page, []byte("</body>"), []byte("<script>"+layoutCheck+"</script></body>"), 1), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+t.TempDir(), "--window-size=1400,2000", "--dump-dom",
		"--enable-logging=stderr", "--v=0", "file://"+checked)
	var dom, logs bytes.Buffer
	cmd.Stdout, cmd.Stderr = &dom, &logs
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, logs.String())
	}
	for _, line := range strings.Split(logs.String(), "\n") {
		if strings.Contains(line, "CONSOLE") && (strings.Contains(line, "ERROR") || strings.Contains(line, "Uncaught")) {
			t.Errorf("console error: %s", line)
		}
	}
	_, result, found := strings.Cut(dom.String(), `<pre id="layout-check">`)
	result, _, _ = strings.Cut(result, "</pre>")
	if !found {
		t.Fatalf("the layout check did not run; chromium printed:\n%s", logs.String())
	}
	if result != "layout ok" {
		t.Errorf("the report's layout at 1400 px:\n%s", html.UnescapeString(result))
	}
}

// layoutCheck is a script that measures the report as laid out and writes
// what it finds wrong (or "layout ok") into <pre id="layout-check">. A text's
// box may pass the plot's edge by 30% of its thickness, and two boxes may
// overlap by a pixel (a font's ascent and descent are in its box), except
// the title's (the topmost text): nothing may touch it.
const layoutCheck = `window.addEventListener('load', function () {
  var out = [];
  function name(t) { return JSON.stringify(t.textContent); }
  document.querySelectorAll('.plots').forEach(function (p, pi) {
    var w = p.getBoundingClientRect().width;
    p.querySelectorAll('svg').forEach(function (s, si) {
      var where = 'panel ' + (pi + 1) + ' plot ' + (si + 1) + ': ';
      var sr = s.getBoundingClientRect();
      if (sr.width < 0.45 * w) out.push(where + 'the plot is ' + Math.round(sr.width) + ' px wide of ' + Math.round(w));
      var texts = Array.prototype.slice.call(s.querySelectorAll('text'));
      var boxes = texts.map(function (t) { return t.getBoundingClientRect(); });
      var title = 0;
      boxes.forEach(function (b, i) { if (b.top < boxes[title].top) title = i; });
      texts.forEach(function (t, i) {
        var b = boxes[i];
        var tol = 0.3 * Math.min(b.width, b.height);
        if (b.left < sr.left - tol || b.right > sr.right + tol || b.top < sr.top - tol || b.bottom > sr.bottom + tol) out.push(where + 'cut at the edge: ' + name(t));
        for (var j = 0; j < i; j++) {
          var c = boxes[j];
          var dx = Math.min(b.right, c.right) - Math.max(b.left, c.left), dy = Math.min(b.bottom, c.bottom) - Math.max(b.top, c.top);
          var slack = (i === title || j === title) ? 0 : 1;
          if (dx > 1 && dy > slack) out.push(where + name(t) + ' overlaps ' + name(texts[j]));
        }
      });
    });
  });
  document.querySelectorAll('#ranked td').forEach(function (td) {
    if (td.classList.contains('group') || td.cellIndex === 5) return;
    var r = document.createRange(); r.selectNodeContents(td);
    if (r.getClientRects().length > 1) out.push('wrapped cell: ' + JSON.stringify(td.textContent));
  });
  var pre = document.createElement('pre'); pre.id = 'layout-check';
  pre.textContent = out.length ? out.join('\n') : 'layout ok';
  document.body.appendChild(pre);
});`

// chromiumPath finds Debian's chromium, or skips the test saying how to get
// it; under CI its absence is a failure, since .ci/run installs it.
func chromiumPath(t *testing.T) string {
	t.Helper()
	chromium, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatal("chromium is not installed; .ci/run installs Debian's chromium package")
		}
		t.Skip("needs chromium: apt-get install chromium (.ci/run installs it)")
	}
	return chromium
}

// TestReportBandInChromium renders the demo's report in headless Chromium
// and counts the screenshot's pixels of the ±2 SD band's light colour.
func TestReportBandInChromium(t *testing.T) {
	chromium := chromiumPath(t)
	path, _, _ := demoReport(t)
	shot := filepath.Join(t.TempDir(), "report.png")
	cmd := exec.Command(chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync",
		"--user-data-dir="+t.TempDir(), "--window-size=1400,2000", "--screenshot="+shot,
		"--enable-logging=stderr", "--v=0", "file://"+path)
	var logs bytes.Buffer
	cmd.Stderr = &logs
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium: %v\n%s", err, logs.String())
	}
	st, err := os.Stat(shot)
	if err != nil || st.Size() < 20000 {
		t.Fatalf("no screenshot (%v)", err)
	}
	// The first panels' bands must show in their light colour: thousands of
	// pixels of it (tens of thousands in a 1400x2000 screenshot of the
	// demo's report; a dark band, as an invalid premultiplied colour gives,
	// leaves a few dozen).
	if n := bandPixels(t, shot); n < 5000 {
		t.Errorf("the screenshot has %d pixels of the band's light colour, want at least 5,000", n)
	}
	t.Logf("screenshot %s, %d bytes", shot, st.Size())
}
