// Real-browser check of the situation explorer, driven by tests/browser.rs:
// load the explorer in headless chromium, click a column heading, check the
// rows are re-sorted in place with aria-sort updated and no console errors,
// submit the filter form with a preset and a season (the preset's rows come
// back), and save screenshots of each page in laptop and projector sizes.
// usage: node explore.mjs BASE_URL SHOT_DIR PASSER
import { chromium } from "playwright-core";

const [base, shotDir, passer] = process.argv.slice(2);
const errors = [];
const browser = await chromium.launch({
  executablePath: "/usr/bin/chromium",
  args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--no-first-run", "--disable-quic", "--disable-component-update", "--disable-sync"],
});
function fail(msg) {
  console.error("FAIL: " + msg);
  process.exitCode = 1;
}
try {
  const page = await browser.newPage({ viewport: { width: 1366, height: 768 } });
  page.on("console", (m) => { if (m.type() === "error") errors.push(m.text()); });
  page.on("pageerror", (e) => errors.push(String(e)));
  await page.goto(base + "/explore?preset=every-snap", { waitUntil: "load" });
  const header = page.locator('#splits thead th[data-key="epa"]');
  await header.click();
  const state = await page.evaluate(() => {
    const th = document.querySelector('#splits thead th[data-key="epa"]');
    const heads = Array.from(th.parentNode.children);
    const idx = heads.indexOf(th);
    const vals = Array.from(document.querySelectorAll("#splits tbody tr")).map((r) => parseFloat(r.children[idx].getAttribute("data-sort")));
    return { aria: th.getAttribute("aria-sort"), vals, url: window.location.search };
  });
  if (state.aria !== "descending") fail("aria-sort after one click is " + state.aria);
  const v = state.vals.filter((x) => !Number.isNaN(x));
  if (v.length < 5) fail("too few rows: " + v.length);
  for (let i = 1; i < v.length; i++) if (v[i - 1] < v[i]) { fail("not descending at row " + i + ": " + v[i - 1] + " < " + v[i]); break; }
  if (!state.url.includes("sort=epa")) fail("address bar not updated: " + state.url);
  await header.click();
  const aria2 = await header.getAttribute("aria-sort");
  if (aria2 !== "ascending") fail("aria-sort after two clicks is " + aria2);
  // keyboard: focus the heading link and press Enter sorts too
  await page.locator('#splits thead th[data-key="rating"] a').focus();
  await page.keyboard.press("Enter");
  const aria3 = await page.locator('#splits thead th[data-key="rating"]').getAttribute("aria-sort");
  if (aria3 !== "descending") fail("keyboard sort gave aria-sort " + aria3);

  // The filter form keeps the preset: choose one, type a season, press Show
  // (the empty boxes are sent too) and get the preset's rows for that season.
  const summary = await (await page.request.get(base + "/api/summary")).json();
  const season = String(summary.seasons[summary.seasons.length - 1]);
  await page.goto(base + "/explore?preset=every-snap", { waitUntil: "load" });
  await page.selectOption("#f-preset", "end-of-game");
  await page.fill("#f-season", season);
  await Promise.all([page.waitForURL(/season=/), page.click(".filter-form button[type=submit]")]);
  const sent = new URL(page.url()).searchParams;
  if (sent.get("quarter") !== "" || sent.get("margin") !== "") fail("the form did not send its empty boxes: " + page.url());
  const api = await (await page.request.get(base + "/api/splits?preset=end-of-game&season=" + season)).json();
  const want = api.rows.filter((r) => r.qualified || r.passer === passer).map((r) => r.passer + " " + r.dropbacks);
  const got = await page.evaluate(() => {
    const th = document.querySelector('#splits thead th[data-key="dropbacks"]');
    const idx = Array.from(th.parentNode.children).indexOf(th);
    return {
      rows: Array.from(document.querySelectorAll("#splits tbody tr")).map((r) => r.children[0].getAttribute("data-sort") + " " + r.children[idx].getAttribute("data-sort")),
      heading: document.querySelector(".situation h2").textContent,
      chosen: document.querySelector("#f-preset").value,
    };
  });
  if (got.rows.length === 0 || JSON.stringify(got.rows) !== JSON.stringify(want)) fail("form rows differ from the preset's: " + JSON.stringify(got.rows.slice(0, 3)) + " vs " + JSON.stringify(want.slice(0, 3)) + " (" + got.rows.length + " vs " + want.length + ")");
  if (!got.heading.startsWith("End of game") || !got.heading.includes("seasons " + season)) fail("heading after the form: " + got.heading);
  if (got.chosen !== "end-of-game") fail("preset after the form: " + got.chosen);
  console.log("form with preset end-of-game and season " + season + ": " + got.rows.length + " passers, league " + api.league_dropbacks + " dropbacks");

  // the default explorer fits a 1366 px laptop without sideways scrolling
  await page.setViewportSize({ width: 1366, height: 768 });
  await page.goto(base + "/explore?preset=end-of-game", { waitUntil: "load" });
  const fit = await page.evaluate(() => {
    const w = document.querySelector(".table-wrap");
    return { table: w.scrollWidth, box: w.clientWidth, page: document.documentElement.scrollWidth, view: window.innerWidth };
  });
  if (fit.table > fit.box + 1 || fit.page > fit.view + 1) fail("explorer scrolls sideways at 1366 px: " + JSON.stringify(fit));

  const enc = encodeURIComponent(passer);
  const pages = [
    ["home", "/"],
    ["explore", "/explore?preset=end-of-game"],
    ["profile", "/passer?passer=" + enc],
    ["plays", "/plays?preset=end-of-game&passer=" + enc],
    ["calibration", "/calibration"],
    ["report", "/report?preset=end-of-game&passer=" + enc],
  ];
  for (const [size, w, h, view] of [["laptop", 1366, 768, ""], ["projector", 1920, 1080, "view=projector"]]) {
    await page.setViewportSize({ width: w, height: h });
    for (const [name, path] of pages) {
      const url = base + path + (view ? (path.includes("?") ? "&" : "?") + view : "");
      const resp = await page.goto(url, { waitUntil: "load" });
      if (!resp || resp.status() !== 200) fail(name + " answered " + (resp && resp.status()));
      await page.screenshot({ path: `${shotDir}/${name}-${size}.png`, fullPage: false });
    }
  }
  // The report: nothing cut off or run past the sheet, in either view.
  for (const view of ["", "&view=projector"]) {
    await page.goto(base + "/report?preset=end-of-game&passer=" + enc + view, { waitUntil: "load" });
    const cut = await page.evaluate(() => {
      const sheet = document.querySelector(".sheet").getBoundingClientRect();
      const out = [];
      for (const el of document.querySelectorAll(".sheet p, .sheet td, .sheet th, .sheet h1, .sheet h2")) {
        if (el.scrollWidth > el.clientWidth + 1 && getComputedStyle(el).overflow !== "visible") out.push("cut: " + el.textContent.slice(0, 40));
        const r = el.getBoundingClientRect();
        if (r.bottom > sheet.bottom + 1 || r.right > sheet.right + 1) out.push("past the sheet: " + el.textContent.slice(0, 40));
      }
      if (document.querySelector(".sheet").textContent.includes("\u2026")) out.push("an ellipsis in the text");
      const foot = document.querySelector(".foot").getBoundingClientRect();
      if (foot.bottom > sheet.bottom + 1) out.push("the glossary runs past the sheet");
      return out;
    });
    if (cut.length) fail("report" + view + ": " + cut.slice(0, 5).join(" | "));
  }
  // projector axis labels are at least 14 px
  await page.goto(base + "/passer?passer=" + enc + "&view=projector", { waitUntil: "load" });
  const tick = await page.evaluate(() => {
    const t = document.querySelector("svg .tick");
    return t ? parseFloat(getComputedStyle(t).fontSize) : 0;
  });
  if (tick < 14) fail("projector tick labels are " + tick + " px");
} finally {
  await browser.close();
}
if (errors.length) fail("console errors: " + errors.join(" | "));
if (!process.exitCode) console.log("browser check passed");
