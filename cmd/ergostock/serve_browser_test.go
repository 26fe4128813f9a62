package main

import (
	"bytes"
	"context"
	"encoding/json"
	"net/http/httptest"
	"os"
	"os/exec"
	"sort"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/cdp"
	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/chromedp"

	"ergostock/cmd/ergostock/whatif"
	"ergostock/policies/batch"
)

// chromiumPath finds a Chromium to drive: $ERGOSTOCK_CHROMIUM, or the
// Debian package's binary.
func chromiumPath() string {
	if p := os.Getenv("ERGOSTOCK_CHROMIUM"); p != "" {
		return p
	}
	for _, name := range []string{"/usr/bin/chromium", "chromium", "chromium-browser", "google-chrome"} {
		if p, err := exec.LookPath(name); err == nil {
			return p
		}
	}
	return ""
}

// TestServeBrowser drives the page in headless Chromium: open an item,
// type a new order-up-to level, wait for the figures of those levels,
// check them against evaluate for the same inputs, record an override and
// read it back from the decisions file.
func TestServeBrowser(t *testing.T) {
	exe := chromiumPath()
	if exe == "" {
		t.Skip("no Chromium installed (Debian: apt-get install chromium); the browser test needs one")
	}
	srv, _, decisions := newServeHandler(t)
	ts := httptest.NewServer(srv) // a free port on 127.0.0.1
	defer ts.Close()

	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(exe),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
	}
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	defer cancelAlloc()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	defer cancelT()

	const sku = "BRAKE-PAD-X"
	ready := func(level string) chromedp.Action[chromedp.Void] {
		return chromedp.Poll[chromedp.Void](`(() => { const f = document.getElementById('figures');
			if (f.dataset.state !== 'ready') return false;
			return JSON.parse(f.dataset.request).order_up_to === '`+level+`'; })()`, chromedp.WithPollingTimeout(30*time.Second))
	}
	button := chromedp.CSS(`#items tbody button[data-sku="` + sku + `"]`)
	err := chromedp.Do(ctx,
		chromedp.Navigate(ts.URL+"/"),
		chromedp.WaitVisible(button),
		chromedp.Click(button),
		chromedp.Poll[chromedp.Void](`document.getElementById('figures').dataset.state === 'ready'`, chromedp.WithPollingTimeout(30*time.Second)),
	)
	if err != nil {
		t.Fatalf("opening the item: %v", err)
	}
	initial, err := chromedp.Run(ctx, chromedp.Value(chromedp.ID("in-order_up_to")))
	if err != nil {
		t.Fatal(err)
	}
	level := "31"
	if initial == level {
		level = "32"
	}
	// Type the level as a planner would: select the field's text, type.
	err = chromedp.Do(ctx,
		chromedp.Focus(chromedp.ID("in-order_up_to")),
		chromedp.Evaluate[chromedp.Void](`document.getElementById('in-order_up_to').select()`),
		chromedp.SendKeys(chromedp.ID("in-order_up_to"), level),
		ready(level),
	)
	if err != nil {
		t.Fatalf("changing the level: %v", err)
	}
	type shown struct {
		Request string            `json:"request"`
		Figures map[string]string `json:"figures"`
		Bars    int               `json:"bars"`
	}
	page, err := chromedp.Run(ctx, chromedp.Evaluate[shown](`({
		request: document.getElementById('figures').dataset.request,
		figures: Object.fromEntries([...document.querySelectorAll('#figures td[id^="fig-"]')].map(e => [e.id.slice(4), e.dataset.value])),
		bars: document.querySelectorAll('#levels-chart rect').length })`))
	if err != nil {
		t.Fatalf("reading the page: %v", err)
	}
	request, figures := page.Request, page.Figures
	if page.Bars == 0 {
		t.Errorf("the stock-level chart has no bars")
	}

	// The same inputs on the command line.
	var req map[string]string
	if err := json.Unmarshal([]byte(request), &req); err != nil {
		t.Fatalf("data-request %q: %v", request, err)
	}
	if req["order_up_to"] != level {
		t.Fatalf("page evaluated %q", request)
	}
	keys := make([]string, 0, len(req))
	for k := range req {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	args := []string{"ergostock", "evaluate"}
	for _, k := range keys {
		args = append(args, "--"+strings.ReplaceAll(k, "_", "-")+"="+req[k])
	}
	var out, stderr bytes.Buffer
	if code := run(append(args, "--json"), nil, &out, &stderr); code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, stderr.String())
	}
	var want map[string]json.RawMessage
	if err := json.Unmarshal(out.Bytes(), &want); err != nil {
		t.Fatal(err)
	}
	if len(figures) != 12 {
		t.Errorf("page shows %d figures, want the 12 of evaluate", len(figures))
	}
	for f, got := range figures {
		if w := string(want[f]); w != got {
			t.Errorf("%s: page %s, evaluate %s", f, got, w)
		}
	}

	// Every control has a label; the list sorts from the keyboard.
	type access struct {
		Unlabelled []string `json:"unlabelled"`
		Sort       string   `json:"sort"`
	}
	acc, err := chromedp.Run(ctx, chromedp.Evaluate[access](`({
		unlabelled: [...document.querySelectorAll('input, select, textarea')].filter(e => !e.labels || e.labels.length === 0).map(e => e.id || e.name),
		sort: document.querySelector('#items th[aria-sort="descending"] button').dataset.sort })`))
	if err != nil {
		t.Fatal(err)
	}
	if len(acc.Unlabelled) > 0 {
		t.Errorf("controls without a label: %v", acc.Unlabelled)
	}
	err = chromedp.Do(ctx,
		chromedp.Focus(chromedp.CSS(`#items th button[data-sort="sku"]`)),
		chromedp.KeyEvent("\r"),
		chromedp.Poll[chromedp.Void](`document.querySelector('#items th[aria-sort="ascending"] button')?.dataset.sort === 'sku'`, chromedp.WithPollingTimeout(10*time.Second)),
	)
	if err != nil {
		t.Errorf("sorting by SKU from the keyboard (the list was sorted by %s): %v", acc.Sort, err)
	}
	// Printed, the page shows the item without the list and the controls.
	err = chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := cdp.Call(ctx, tg, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"})
		return err
	}))
	if err != nil {
		t.Fatal(err)
	}
	printed, err := chromedp.Run(ctx, chromedp.Evaluate[[]string](`['list', 'item', 'cheapest'].map(id => document.getElementById(id).getClientRects().length > 0 ? 'shown' : 'none')`))
	if err != nil {
		t.Fatal(err)
	}
	if len(printed) != 3 || printed[0] != "none" || printed[1] != "shown" || printed[2] != "none" {
		t.Errorf("print view: list, item, button = %v, want none, shown, none", printed)
	}
	chromedp.Do(ctx, chromedp.Func(func(ctx context.Context, tg *chromedp.Target) error {
		_, err := cdp.Call(ctx, tg, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{})
		return err
	}))

	// An override with a note, read back from the decisions file.
	err = chromedp.Do(ctx,
		chromedp.SendKeys(chromedp.ID("note"), "checked with the depot, one spare more"),
		chromedp.Click(chromedp.ID("override")),
		chromedp.Poll[chromedp.Void](`document.getElementById('decision-status').textContent.startsWith('saved')`, chromedp.WithPollingTimeout(30*time.Second)),
	)
	if err != nil {
		t.Fatalf("recording the decision: %v", err)
	}
	status, _ := chromedp.Run(ctx, chromedp.Text(chromedp.ID("decision-status")))
	f, err := os.Open(decisions)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ds, err := batch.ReadDecisions(f, decisions)
	if err != nil {
		t.Fatal(err)
	}
	if len(ds) != 1 {
		t.Fatalf("%d decisions in %s, want 1", len(ds), decisions)
	}
	d := ds[0]
	if d.SKU != sku || d.Kind != batch.Override || d.Version != 1 || d.Note != "checked with the depot, one spare more" || strconv.Itoa(d.Policy.OrderUpTo) != level {
		t.Errorf("decision read back as %+v (page said %q)", d, status)
	}
}

// TestServeBrowserByLocation drives the page over a run by (sku,
// location): the list names each pair, opening one at a depot shows that
// depot's item, and accepting its recommendation writes a decision with
// the location to the decisions file.
func TestServeBrowserByLocation(t *testing.T) {
	exe := chromiumPath()
	if exe == "" {
		t.Skip("no Chromium installed (Debian: apt-get install chromium); the browser test needs one")
	}
	dir, items, hist, cols := locationDemo(t, 2)
	results := dir + "/r.csv"
	if code, stderr := runBatchCmd(t, append([]string{"--items", items, "--history", hist, "--out", results}, cols...)...); code != 0 {
		t.Fatalf("batch: exit %d: %s", code, stderr)
	}
	_, rows := readResults(t, results)
	sku := rows[1][0]
	decisions := dir + "/d.csv"
	cfg, err := serveConfigWith(context.Background(), results, items, hist, decisions, locationReaders(t))
	if err != nil {
		t.Fatal(err)
	}
	srv, err := whatif.New(cfg)
	if err != nil {
		t.Fatal(err)
	}
	ts := httptest.NewServer(srv)
	defer ts.Close()
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), chromedp.ExecPath(exe), chromedp.Headless,
		chromedp.NoSandbox, chromedp.DisableGPU, chromedp.NoFirstRun, chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-background-networking", true), chromedp.UserDataDir(t.TempDir()))
	defer cancelAlloc()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()
	ctx, cancelT := context.WithTimeout(ctx, 90*time.Second)
	defer cancelT()
	button := chromedp.CSS(`#items tbody button[data-sku="` + sku + `"][data-location="millbeck"]`)
	err = chromedp.Do(ctx,
		chromedp.Navigate(ts.URL+"/"),
		chromedp.WaitVisible(button),
		chromedp.Click(button),
		chromedp.Poll[chromedp.Void](`document.getElementById('figures').dataset.state === 'ready'`, chromedp.WithPollingTimeout(30*time.Second)),
	)
	if err != nil {
		t.Fatalf("opening the item: %v", err)
	}
	title, _ := chromedp.Run(ctx, chromedp.Text(chromedp.ID("item-title")))
	head, _ := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(`#items th button[data-sort="sku"]`)))
	if title != sku+" @ millbeck" || head != "SKU @ location" {
		t.Errorf("title %q, list header %q", title, head)
	}
	err = chromedp.Do(ctx,
		chromedp.Click(chromedp.ID("accept")),
		chromedp.Poll[chromedp.Void](`document.getElementById('decision-status').textContent.startsWith('saved')`, chromedp.WithPollingTimeout(30*time.Second)),
	)
	if err != nil {
		t.Fatalf("recording the decision: %v", err)
	}
	f, err := os.Open(decisions)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := batch.ReadDecisions(f, decisions)
	f.Close()
	if err != nil || len(ds) != 1 || ds[0].SKU != sku || ds[0].Location != "millbeck" || ds[0].Kind != batch.Accept {
		t.Errorf("decisions %+v, %v; want one accept of %s at millbeck", ds, err, sku)
	}
}
