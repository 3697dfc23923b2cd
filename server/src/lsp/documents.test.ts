// The server's analysis cache (one analysis per uri and version) and its debouncer (one job per
// document after a quiet period; a newer schedule replaces the older), with fake timers.
import { afterEach, describe, expect, it, vi } from "vitest";
import { analyzeDocument } from "../analysis/analyze";
import { AnalysisCache, Debouncer } from "./documents";

describe("AnalysisCache", () => {
  it("analyses each version once and gives each analysis a new result id", () => {
    let calls = 0;
    const cache = new AnalysisCache(
      () => undefined,
      (text) => {
        calls++;
        return analyzeDocument(text);
      },
    );
    const doc = { uri: "file:///a.spw", version: 1, getText: () => 'model "a" { lattice chain }' };
    const first = cache.get(doc);
    expect(cache.get(doc)).toBe(first);
    expect(calls).toBe(1);
    const second = cache.get({ ...doc, version: 2 });
    expect(calls).toBe(2);
    expect(second.resultId).not.toBe(first.resultId);
  });

  it("analyses each new version from the one before, with the result of a fresh analysis", () => {
    const seen: (string | null)[] = [];
    const cache = new AnalysisCache(
      () => undefined,
      (text, previous) => {
        seen.push(previous ? previous.text : null);
        return analyzeDocument(text, { previous });
      },
    );
    const v1 = 'model "a" {\n  lattice chain\n  let J = 1 K\n  exchange heisenberg(J) on shell 1\n}\n';
    const v2 = v1.replace("1 K", "12 K");
    cache.get({ uri: "file:///a.spw", version: 1, getText: () => v1 });
    const second = cache.get({ uri: "file:///a.spw", version: 2, getText: () => v2 });
    expect(seen).toEqual([null, v1]);
    const fresh = analyzeDocument(v2);
    expect(second.analysis?.parsed.ast).toEqual(fresh.parsed.ast);
    expect(second.analysis?.diagnostics).toEqual(fresh.diagnostics);
    expect(second.analysis?.model?.exchanges[0]?.scaleMeV).toBeCloseTo(fresh.model?.exchanges[0]?.scaleMeV ?? NaN, 12);
  });

  it("reports a failing analysis and answers with no analysis instead of throwing", () => {
    const errors: string[] = [];
    const cache = new AnalysisCache(
      (uri) => errors.push(uri),
      () => {
        throw new Error("boom");
      },
    );
    const entry = cache.get({ uri: "file:///b.spw", version: 1, getText: () => "" });
    expect(entry.analysis).toBeNull();
    expect(errors).toEqual(["file:///b.spw"]);
  });
});

describe("Debouncer", () => {
  afterEach(() => {
    vi.useRealTimers();
  });

  it("runs only the last job scheduled for a document, after the delay", () => {
    vi.useFakeTimers();
    const runs: number[] = [];
    const d = new Debouncer(50);
    d.schedule("u", () => runs.push(1));
    vi.advanceTimersByTime(30);
    d.schedule("u", () => runs.push(2));
    vi.advanceTimersByTime(49);
    expect(runs).toEqual([]);
    vi.advanceTimersByTime(1);
    expect(runs).toEqual([2]);
  });

  it("keeps documents apart and can cancel", () => {
    vi.useFakeTimers();
    const runs: string[] = [];
    const d = new Debouncer(50);
    d.schedule("a", () => runs.push("a"));
    d.schedule("b", () => runs.push("b"));
    d.cancel("a");
    vi.advanceTimersByTime(60);
    expect(runs).toEqual(["b"]);
  });

  it("waits for a quiet spell of the full delay however many keystrokes moved it", () => {
    vi.useFakeTimers();
    const runs: number[] = [];
    const d = new Debouncer(50);
    for (let k = 0; k < 10; k++) {
      d.schedule("u", () => runs.push(k));
      vi.advanceTimersByTime(20);
    }
    // The last schedule was 20 ms ago: 30 more to go.
    vi.advanceTimersByTime(29);
    expect(runs).toEqual([]);
    vi.advanceTimersByTime(1);
    expect(runs).toEqual([9]);
    vi.advanceTimersByTime(200);
    expect(runs).toEqual([9]);
  });
});
