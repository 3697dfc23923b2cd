// Drives the real VS Code workbench (code-server) with Playwright: opens the file with mistakes
// and reads the Problems count, hovers the field of the DM chain and reads the Zeeman energy
// (0.80227 meV: g = 1.98 at 7 T, CODATA 2018 muB), opens the preview and finds the plot.
// usage: node tests/editor/vscodeE2e.mjs <workbench-url> <screenshot-folder>
import { createRequire } from "module";
import { join } from "path";
const require = createRequire(process.env.PW_FROM || import.meta.url);
const { chromium } = require("playwright-core");
const [url, shots] = process.argv.slice(2);
const t0 = Date.now();
const log = (m) => console.log(`[${((Date.now() - t0) / 1000).toFixed(1)}s] ${m}`);
const browser = await chromium.launch({
  executablePath: "/usr/bin/chromium",
  headless: true,
  args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
});
let failures = 0;
const check = (ok, what) => {
  log(`${ok ? "PASS" : "FAIL"} ${what}`);
  if (!ok) failures++;
};
try {
  const page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
  page.on("pageerror", (e) => console.log("  [pageerror] " + String(e).slice(0, 300)));
  await page.goto(url);
  await page.waitForSelector(".monaco-workbench", { timeout: 90000 });
  log("workbench visible");
  const open = async (name) => {
    const row = page.locator(".explorer-folders-view .monaco-list-row").filter({ hasText: name }).first();
    await row.waitFor({ timeout: 60000 });
    await row.click();
    await page.locator(".part.editor .monaco-editor .view-lines").first().waitFor({ timeout: 30000 });
  };

  // 1. Diagnostics reach the Problems count in the status bar.
  await open("mistakes.spw");
  let problems = "";
  for (let i = 0; i < 60; i++) {
    problems = await page.evaluate(() => {
      const item = document.getElementById("status.problems");
      if (!item) return "";
      const labels = [item, ...item.querySelectorAll("[aria-label]")].map((e) => e.getAttribute("aria-label") || "");
      return `${labels.join(" ")} ${item.innerText}`.replace(/\s+/g, " ").trim();
    });
    if (/[1-9]\d*\s*error/i.test(problems)) break;
    await page.waitForTimeout(500);
  }
  check(/[1-9]\d*\s*error/i.test(problems), `Problems count shows errors (${problems})`);
  await page.screenshot({ path: join(shots, "1-problems.png") });

  // 2. Hover the field statement of the DM chain: the Zeeman energy.
  await open("dm-chain.spw");
  const fieldWord = page.locator(".part.editor .monaco-editor .view-lines .view-line").filter({ hasText: "field 7 T" }).locator("span span").filter({ hasText: /^field$/ }).first();
  await fieldWord.waitFor({ timeout: 30000 });
  let hover = "";
  for (let attempt = 0; attempt < 30; attempt++) {
    await page.mouse.move(5, 5);
    await page.waitForTimeout(300);
    // Monaco re-renders its view lines (new semantic tokens, a layout pass): the word can be
    // briefly absent, and then the locator finds it again on the next attempt.
    const box = await fieldWord.boundingBox().catch(() => null);
    if (!box) continue;
    await page.mouse.move(box.x + 8, box.y + box.height / 2);
    try {
      await page.waitForFunction(() => [...document.querySelectorAll(".monaco-hover")].some((e) => /E_?Z = [0-9]/.test(e.innerText)), null, { timeout: 2000 });
      hover = await page.evaluate(() => [...document.querySelectorAll(".monaco-hover")].map((e) => e.innerText).join(" | "));
      break;
    } catch {}
  }
  const ez = /E_?Z = ([0-9.]+) meV/.exec(hover);
  check(ez !== null && Math.abs(Number(ez[1]) - 0.80227) < 5e-5, `hover on the field shows the Zeeman energy 0.80227 meV (${ez ? ez[0] : JSON.stringify(hover.slice(0, 200))})`);
  await page.waitForTimeout(500);
  await page.screenshot({ path: join(shots, "2-hover.png") });

  // 3. The preview panel with the plot (command palette, as a person would).
  await page.mouse.move(5, 5);
  await page.keyboard.press("F1");
  await page.keyboard.type("Spinwright: Open Preview");
  await page.waitForTimeout(500);
  await page.keyboard.press("Enter");
  let found = false;
  for (let i = 0; i < 60 && !found; i++) {
    for (const frame of page.frames()) {
      try {
        if (await frame.evaluate(() => !!document.querySelector("#plot svg") && /branches/.test(document.body.innerText))) found = true;
      } catch {}
    }
    if (!found) await page.waitForTimeout(500);
  }
  check(found, "the preview shows the plot");
  await page.waitForTimeout(800);
  await page.screenshot({ path: join(shots, "3-preview.png") });
} catch (e) {
  console.log("ERROR", e);
  failures++;
} finally {
  await browser.close();
}
process.exit(failures === 0 ? 0 : 1);
