// The worker wrapper against the bundled dist/edWorker.js (built by `npm test` before vitest
// runs; `node scripts/build.mjs` by hand). Skipped, with a message, only if the bundle is missing.
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { CancelledError, EdSizeError } from "./errors";
import { runExactInWorker } from "./runInWorker";
import { solveExact } from "./solve";
import { heisenbergRing } from "./clusters.testutil";

const workerPath = fileURLToPath(new URL("../../../../dist/edWorker.js", import.meta.url));
const present = existsSync(workerPath);
if (!present) console.warn(`worker tests skipped: ${workerPath} missing (run \`node scripts/build.mjs\` first)`);

describe.skipIf(!present)("runExactInWorker (dist/edWorker.js)", () => {
  it("returns the same result as the in-process solver and forwards progress", async () => {
    const c = heisenbergRing(12, 1, 0.2, 0.9);
    const progress: [number, string][] = [];
    const r = await runExactInWorker(c, { conservedAxis: [0, 0, 1] }, { workerPath, onProgress: (f, s) => progress.push([f, s]) });
    const local = solveExact(c, { conservedAxis: [0, 0, 1] });
    expect(Math.abs(r.groundEnergyMeV - local.groundEnergyMeV)).toBeLessThan(1e-12);
    expect(r.larmor?.singlePole).toBe(true);
    expect(progress.length).toBeGreaterThan(0);
    expect(progress[progress.length - 1]).toEqual([1, "done"]);
  });

  it("an AbortSignal terminates the worker and rejects with CancelledError", async () => {
    const ac = new AbortController();
    const t0 = performance.now();
    const p = runExactInWorker(heisenbergRing(22, 1, 0.1, 0.3), { conservedAxis: [0, 0, 1] }, {
      workerPath,
      signal: ac.signal,
      onProgress: () => ac.abort(),
    });
    await expect(p).rejects.toBeInstanceOf(CancelledError);
    expect(performance.now() - t0).toBeLessThan(10_000);
    const pre = new AbortController();
    pre.abort();
    await expect(runExactInWorker(heisenbergRing(8, 1), {}, { workerPath, signal: pre.signal })).rejects.toBeInstanceOf(
      CancelledError,
    );
  });

  it("rejects with the size error from the worker and with a clear error for a missing bundle", async () => {
    const p = runExactInWorker(heisenbergRing(16, 1), { conservedAxis: [0, 0, 1], sz: [0], maxStates: 100 }, { workerPath });
    await expect(p).rejects.toBeInstanceOf(EdSizeError);
    await expect(p).rejects.toThrow(/states and would need about/);
    await expect(runExactInWorker(heisenbergRing(8, 1), {}, { workerPath: "/nonexistent/edWorker.js" })).rejects.toThrow(
      /worker not found/,
    );
  });
});
