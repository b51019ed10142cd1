// Real-browser check of the meeting view and film notes, driven by
// tests/meeting.rs: walk every situation with the arrow keys at 1920x1080
// and 1280x720, asserting no scrollbar, text sizes (body >= 24 px, key
// numbers >= 36 px) and text contrast >= 7:1 computed in the page; then
// write a note and start a cut-up list through the page.
// usage: node meeting.mjs BASE_URL SHOT_DIR PASSER SCREEN_KEYS(comma list)
import { chromium } from "playwright-core";

const [base, shotDir, passer, keyList] = process.argv.slice(2);
const keys = keyList.split(",");
const errors = [];
function fail(msg) {
  console.error("FAIL: " + msg);
  process.exitCode = 1;
}
const browser = await chromium.launch({
  executablePath: "/usr/bin/chromium",
  args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--no-first-run", "--disable-quic", "--disable-component-update", "--disable-sync"],
});

// In the page: every element with its own visible text, its font size and
// contrast against the first opaque background behind it (source: W3C WCAG 2.1,
// definitions of relative luminance and contrast ratio).
const measure = () => {
  function rgb(s) {
    const m = s.match(/rgba?\(([^)]+)\)/);
    if (!m) return null;
    const p = m[1].split(",").map((x) => parseFloat(x));
    return { r: p[0], g: p[1], b: p[2], a: p.length > 3 ? p[3] : 1 };
  }
  function lum(c) {
    const f = (v) => { v /= 255; return v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4); };
    return 0.2126 * f(c.r) + 0.7152 * f(c.g) + 0.0722 * f(c.b);
  }
  function background(el) {
    for (let e = el; e; e = e.parentElement) {
      const c = rgb(getComputedStyle(e).backgroundColor);
      if (c && c.a > 0.99) return c;
    }
    return { r: 255, g: 255, b: 255, a: 1 };
  }
  const out = [];
  for (const el of document.querySelectorAll("body *")) {
    const own = Array.from(el.childNodes).some((n) => n.nodeType === 3 && n.textContent.trim() !== "");
    if (!own) continue;
    const r = el.getBoundingClientRect();
    if (r.width === 0 || r.height === 0) continue;
    const cs = getComputedStyle(el);
    const fg = rgb(cs.color), bg = background(el);
    const l1 = lum(fg), l2 = lum(bg);
    const contrast = (Math.max(l1, l2) + 0.05) / (Math.min(l1, l2) + 0.05);
    out.push({ text: el.textContent.trim().slice(0, 40), size: parseFloat(cs.fontSize), contrast, key: el.classList.contains("key-number") });
  }
  // Nothing may spill out of its box (overflow hidden would hide a cut).
  const spills = [];
  for (const el of document.querySelectorAll(".metric-card, .deck-snaps, .deck-metrics, .deck")) {
    if (el.scrollHeight > el.clientHeight + 1) spills.push(el.className + " " + el.scrollHeight + ">" + el.clientHeight);
  }
  for (const el of document.querySelectorAll("body *")) {
    const r = el.getBoundingClientRect();
    if (r.width > 0 && (r.bottom > window.innerHeight + 1 || r.right > window.innerWidth + 1)) spills.push(el.tagName + "." + el.className + " ends at " + Math.round(r.bottom) + "/" + Math.round(r.right));
  }
  const d = document.documentElement;
  return { items: out, spills, scrollH: d.scrollHeight, innerH: window.innerHeight, scrollW: d.scrollWidth, innerW: window.innerWidth, screen: new URL(location.href).searchParams.get("screen") };
};

try {
  const page = await browser.newPage();
  page.on("console", (m) => { if (m.type() === "error") errors.push(m.text()); });
  page.on("pageerror", (e) => errors.push(String(e)));
  for (const [w, h] of [[1920, 1080], [1280, 720]]) {
    await page.setViewportSize({ width: w, height: h });
    await page.goto(base + "/meeting?passer=" + encodeURIComponent(passer), { waitUntil: "load" });
    for (let i = 0; i < keys.length; i++) {
      const m = await page.evaluate(measure);
      const where = `${w}x${h} screen ${i + 1} (${m.screen})`;
      if (i > 0 && m.screen !== keys[i]) fail(`${where}: address says screen ${m.screen}, expected ${keys[i]}`);
      if (m.scrollH > m.innerH + 1) fail(`${where}: page scrolls vertically (${m.scrollH} > ${m.innerH})`);
      if (m.scrollW > m.innerW + 1) fail(`${where}: page scrolls sideways (${m.scrollW} > ${m.innerW})`);
      for (const sp of m.spills.slice(0, 3)) fail(`${where}: ${sp}`);
      for (const it of m.items) {
        if (it.size < 24) fail(`${where}: "${it.text}" is ${it.size} px`);
        if (it.key && it.size < 36) fail(`${where}: key number "${it.text}" is ${it.size} px`);
        if (it.contrast < 7) fail(`${where}: "${it.text}" has contrast ${it.contrast.toFixed(2)}:1`);
      }
      if (m.items.filter((x) => x.key).length < 3) fail(`${where}: fewer than 3 key numbers`);
      await page.screenshot({ path: `${shotDir}/meeting-${w}x${h}-${i + 1}.png` });
      await Promise.all([page.waitForNavigation({ waitUntil: "load" }), page.keyboard.press("ArrowRight")]);
    }
    const back = await page.evaluate(() => new URL(location.href).searchParams.get("screen"));
    if (back !== keys[0]) fail(`${w}x${h}: after the last screen the arrow went to ${back}, not back to ${keys[0]}`);
    await Promise.all([page.waitForNavigation({ waitUntil: "load" }), page.keyboard.press("ArrowLeft")]);
    const left = await page.evaluate(() => new URL(location.href).searchParams.get("screen"));
    if (left !== keys[keys.length - 1]) fail(`${w}x${h}: left arrow from the first screen went to ${left}`);
  }

  // A note and a new cut-up list through the page.
  await page.setViewportSize({ width: 1920, height: 1080 });
  await page.goto(base + "/meeting?passer=" + encodeURIComponent(passer), { waitUntil: "load" });
  const open = page.locator("button.note-open").first();
  await open.waitFor({ timeout: 10000 });
  await open.click();
  await page.locator("textarea.note-text").fill("Held the ball: watch the left side");
  await page.locator("select.note-list-choice").selectOption("new");
  await page.locator("input.note-new-list").fill("Meeting cut-up");
  await page.locator("button.note-save").click();
  await page.locator(".note-status", { hasText: "Saved." }).waitFor({ timeout: 10000 });
  const label = await open.textContent();
  if (label !== "1 note") fail("note button says " + label + " after saving");
  await page.screenshot({ path: `${shotDir}/meeting-note.png` });
  const game = await page.locator("tr[data-game]").first().getAttribute("data-game");
  // The lists page and a game review, laptop and projector.
  for (const [size, w, h, view] of [["laptop", 1366, 768, ""], ["projector", 1920, 1080, "&view=projector"]]) {
    await page.setViewportSize({ width: w, height: h });
    for (const [name, path] of [["cutups", "/cutups?season=2020..2025"], ["review", "/review?game=" + encodeURIComponent(game)]]) {
      const resp = await page.goto(base + path + view, { waitUntil: "load" });
      if (!resp || resp.status() !== 200) fail(name + " answered " + (resp && resp.status()));
      await page.screenshot({ path: `${shotDir}/${name}-${size}.png` });
      if (name === "cutups") {
        const listed = await page.locator("section.cutup h2").first().textContent();
        if (!listed || !listed.includes("Meeting cut-up")) fail("the lists page does not show the new list: " + listed);
      }
    }
  }
} finally {
  await browser.close();
}
if (errors.length) fail("console errors: " + errors.join(" | "));
if (!process.exitCode) console.log("meeting check passed");
