package explorer

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	cdpbrowser "github.com/chromedp/cdproto/browser"
	"github.com/chromedp/chromedp"
)

// shotsDir is where the browser test leaves its screenshots.
const shotsDir = "/tmp/shots-24"

// chromiumPath finds Debian's chromium (CI installs it).
func chromiumPath() string {
	for _, p := range []string{"/usr/bin/chromium", "/usr/bin/chromium-browser"} {
		if _, err := os.Stat(p); err == nil {
			return p
		}
	}
	p, _ := exec.LookPath("chromium")
	return p
}

// TestBrowserWalkThrough drives real headless Chromium through the page:
// log in, pick the demo shops, filter to level shifts, open a group, step
// to the next with the keyboard, download its history as CSV, log out.
func TestBrowserWalkThrough(t *testing.T) {
	exe := chromiumPath()
	if exe == "" {
		t.Skip("needs Chromium (/usr/bin/chromium, Debian's chromium package)")
	}
	data, _ := dataWithShops(t)
	ts := newTestServer(t, data, false, false, nil)
	downloads := t.TempDir()
	if err := os.MkdirAll(shotsDir, 0o755); err != nil {
		t.Fatal(err)
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(exe),
		chromedp.Flag("headless", true),
		chromedp.NoSandbox, // CI runs as root
		chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true),
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("no-proxy-server", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1180, 1000),
	}
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	defer cancelAlloc()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()
	// Start the browser on a context without a timeout (a timeout on the
	// first call would bound the whole browser), then limit each step.
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("start Chromium: %v", err)
	}
	completed := make(chan string, 4)
	go func() {
		for ev, err := range chromedp.BrowserEvents(ctx, cdpbrowser.DownloadProgress) {
			if err != nil {
				return
			}
			if ev.State == cdpbrowser.DownloadProgressStateCompleted {
				completed <- ev.GUID
			}
		}
	}()
	shot := func(name string) chromedp.Action[chromedp.Void] {
		return chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			png, err := chromedp.CaptureScreenshot()(ctx, tg)
			if err != nil {
				return err
			}
			return os.WriteFile(filepath.Join(shotsDir, name), png, 0o644)
		})
	}
	run := func(step string, actions ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		sctx, cancel := context.WithTimeout(ctx, 20*time.Second)
		defer cancel()
		for i, a := range actions {
			if err := chromedp.Do(sctx, a); err != nil {
				body, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`document.location.href + "\n" + document.body.innerText`))
				chromedp.Do(ctx, shot("failed.png"))
				t.Fatalf("%s, action %d: %v; the page:\n%.600s", step, i+1, err, body)
			}
		}
	}
	get := func(step string, a chromedp.Action[string]) string {
		t.Helper()
		sctx, cancel := context.WithTimeout(ctx, 30*time.Second)
		defer cancel()
		v, err := chromedp.Run(sctx, a)
		if err != nil {
			t.Fatalf("%s: %v", step, err)
		}
		return v
	}
	css := func(s string) chromedp.CSS { return chromedp.CSS(s) }
	allowDownloads := chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := chromedp.CallBrowser(ctx, cdpbrowser.SetDownloadBehavior, cdpbrowser.SetDownloadBehaviorParams{
			Behavior: cdpbrowser.SetDownloadBehaviorBehaviorAllowAndName, DownloadPath: downloads, EventsEnabled: new(true)})
		return err
	})

	run("log in",
		allowDownloads,
		chromedp.Navigate(ts.URL+"/"),
		chromedp.WaitVisible(css("#login")),
		shot("1-login.png"),
		chromedp.SendKeys(css("#user"), "ana"),
		chromedp.SendKeys(css("#password"), testUsers["ana"]),
		chromedp.Click(css("#login button")),
		chromedp.WaitVisible(css("#source")),
	)
	run("pick the demo shops",
		chromedp.SetValue(css("#source"), "shops.parquet"),
		chromedp.Click(css("#show-columns")),
		chromedp.WaitVisible(css("#diagnose")),
		chromedp.SetValue(css("#period"), "7"),
		shot("2-columns.png"),
		chromedp.Click(css("#run")),
		chromedp.WaitVisible(css("#counts")),
	)
	if text := get("list heading", chromedp.Text(css("h1"))); text != "shops.parquet: 96 groups" {
		t.Errorf("list heading %q, want the 96 demo shop series", text)
	}
	run("filter to level shifts",
		chromedp.Click(css("#count-level-shift")),
		chromedp.WaitVisible(css("#f-mean_cause")),
		shot("3-level-shifts.png"),
	)
	shown, selected := get("shown", chromedp.Text(css("#shown"))), get("filter", chromedp.Value(css("#f-mean_cause")))
	if selected != "level_shift" || !strings.Contains(shown, "groups match") {
		t.Errorf("after the level-shift count: filter %q, %q", selected, shown)
	}
	causes, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`Array.from(document.querySelectorAll("#groups tbody tr")).map(r => r.cells[6].textContent)`))
	if err != nil {
		t.Fatal(err)
	}
	if len(causes) < 2 {
		t.Fatalf("want at least two level shifts in the demo, got %d", len(causes))
	}
	for _, c := range causes {
		if !strings.Contains(c, "mean: level shift") {
			t.Errorf("a filtered row's causes are %q", c)
		}
	}
	run("open a group",
		chromedp.Click(css("#groups tbody tr:first-child td.group a")),
		chromedp.WaitVisible(css("#group-title")),
		shot("4-group.png"),
	)
	first, reason, position := get("title", chromedp.Text(css("#group-title"))), get("reason", chromedp.Text(css("#reason"))), get("position", chromedp.Text(css("#nav small")))
	if !strings.HasPrefix(first, "shop=") || !strings.Contains(reason, "jumps") || !strings.Contains(position, "group 1 of") {
		t.Errorf("group page: %q, %q, %q", first, reason, position)
	}
	svgs, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll(".plots svg").length`))
	if err != nil || svgs != 5 {
		t.Errorf("the group page has %d pictures, want 5 (%v)", svgs, err)
	}
	run("step to the next with the keyboard",
		chromedp.KeyEvent("j"),
		chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
			// The key loads another page; evaluating while it loads may
			// fail, so ask again until the new page says where it stands.
			for ctx.Err() == nil {
				ok, err := chromedp.Evaluate[bool](`!!document.querySelector("#nav small") && document.querySelector("#nav small").textContent.includes("group 2 of")`)(ctx, tg)
				if err == nil && ok {
					return nil
				}
				time.Sleep(100 * time.Millisecond)
			}
			return ctx.Err()
		}),
		chromedp.WaitVisible(css("#group-title")),
		shot("5-next-group.png"),
	)
	second, reason := get("title", chromedp.Text(css("#group-title"))), get("reason", chromedp.Text(css("#reason")))
	if second == first || !strings.Contains(reason, "jumps") {
		t.Errorf("next group: %q after %q, reason %q", second, first, reason)
	}
	run("download its history", chromedp.Click(css("#dl-history")))
	var guid string
	select {
	case guid = <-completed:
	case <-time.After(30 * time.Second):
		t.Fatal("the history download did not complete")
	}
	csv, err := os.ReadFile(filepath.Join(downloads, guid))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(csv)), "\n")
	// demodata.DefaultSizes: 730 days a shop series.
	if lines[0] != "shop,product,day,units" || len(lines) != 731 {
		t.Errorf("history CSV: header %q, %d lines, want 731", lines[0], len(lines))
	}
	key := strings.NewReplacer("shop=", "", ", product=", ",").Replace(second)
	if !strings.HasPrefix(lines[1], key+",") {
		t.Errorf("history CSV of %q starts %q", second, lines[1])
	}
	run("log out",
		chromedp.Click(css("#logout")),
		chromedp.WaitVisible(css("#login")),
		shot("6-logged-out.png"),
	)
	if after := get("message", chromedp.Text(css("#message"))); after != "logged out" {
		t.Errorf("after logout: %q", after)
	}
	run("the list after logout", chromedp.Navigate(ts.URL+"/runs/1/groups"), chromedp.WaitVisible(css("#login")))
	leaked, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`document.body.textContent.includes("Kiln") || !!document.querySelector("#groups")`))
	if err != nil || leaked {
		t.Errorf("the list is shown after logging out (%v)", err)
	}
}
