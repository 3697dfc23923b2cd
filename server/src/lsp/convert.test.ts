// LSP conversions and settings: diagnostics keep code, range, related information, tags and the
// documentation link; snippets degrade to plain text for clients without snippet support; the
// `spinwright` settings are read defensively.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../analysis/analyze";
import { generatedModel } from "../service/benchmark";
import { plainFromSnippet, sameAsLsp, toLspDiagnostic } from "./convert";
import { DEFAULT_SERVER_SETTINGS, readSettings } from "./server";

describe("toLspDiagnostic", () => {
  it("carries code, range, related information, the unnecessary tag and a doc link", () => {
    const text = 'model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain\n  anisotropy A D = 1 K\n}\n';
    const a = analyzeDocument(text);
    const d = a.diagnostics.find((x) => x.code === "spw-single-ion-constant");
    if (!d) throw new Error("fixture lost its diagnostic");
    const lsp = toLspDiagnostic(a, "file:///m.spw", d, "file:///docs/diagnostics.md");
    expect(lsp).toMatchObject({ code: "spw-single-ion-constant", severity: 2, source: "spinwright", tags: [1] });
    expect(lsp.range).toEqual({ start: { line: 4, character: 2 }, end: { line: 4, character: 22 } });
    expect(lsp.codeDescription?.href).toBe("file:///docs/diagnostics.md#spw-single-ion-constant");
    expect(toLspDiagnostic(a, "file:///m.spw", d, null).codeDescription).toBeUndefined();
  });
});

describe("sameAsLsp", () => {
  // The cheap check the server makes before converting and comparing a version's diagnostics: it
  // must agree with the full comparison (every diagnostic converted and serialized) edit by edit.
  it("agrees with comparing the converted diagnostics in full", () => {
    const uri = "file:///bench.spw";
    const docs = "file:///docs/diagnostics.md";
    const base = generatedModel(60);
    const at = (needle: string): number => base.indexOf(needle) + needle.length;
    const edits: [string, string][] = [
      ["a space in the first coupling", base.slice(0, at("let J1 = ")) + " " + base.slice(at("let J1 = "))],
      ["a line break at the top", base.slice(0, at("spin 1/2")) + "\n" + base.slice(at("spin 1/2"))],
      ["a digit that changes no message", base.replace("let J1 = 10.37 K", "let J1 = 10.371 K")],
      ["a claim that changes a message", base.replace("expect none", "expect su2")],
      ["a comment", base.replace("# coupling set 2", "# coupling set two")],
      ["an anisotropy that changes a related message only", base.replace("xxz(J2, 0.9)", "xxz(J2, 0.8)")],
    ];
    const full = (a: ReturnType<typeof analyzeDocument>): string => JSON.stringify(a.diagnostics.map((d) => toLspDiagnostic(a, uri, d, docs)));
    const outcomes: boolean[] = [];
    for (const [what, text] of edits) {
      const before = analyzeDocument(base);
      const report = { core: before.diagnostics, items: before.diagnostics.map((d) => toLspDiagnostic(before, uri, d, docs)) };
      const expected = full(before);
      const after = analyzeDocument(text, { previous: before });
      const same = sameAsLsp(after, uri, docs, report);
      expect(same, what).toBe(full(after) === expected);
      outcomes.push(same);
      // A fresh analysis has none of the objects converted before: it is compared by what its
      // diagnostics say and where they point.
      const fresh = analyzeDocument(text);
      expect(fresh.diagnostics.some((d) => before.diagnostics.includes(d))).toBe(false);
      expect(sameAsLsp(fresh, uri, docs, report), `${what}, fresh`).toBe(full(fresh) === expected);
    }
    // Both answers occur, and at least one diagnostic was carried over as the same object.
    expect(outcomes).toContain(true);
    expect(outcomes).toContain(false);
    const before = analyzeDocument(base);
    const kept = before.diagnostics;
    const after = analyzeDocument(edits[0]![1], { previous: before });
    expect(after.diagnostics.some((d) => kept.includes(d))).toBe(true);
  });
});

describe("plainFromSnippet", () => {
  it("keeps the default text of placeholders and the first choice", () => {
    expect(plainFromSnippet("let ${1:J} = ${2:1} ${3:meV}")).toBe("let J = 1 meV");
    expect(plainFromSnippet("convention ${1|antiferro-positive,ferro-positive|}")).toBe("convention antiferro-positive");
    expect(plainFromSnippet("heisenberg(${1:J})$0")).toBe("heisenberg(J)");
  });
});

describe("readSettings", () => {
  it("reads nested and flat keys and falls back to the defaults on bad values", () => {
    expect(readSettings({ displayUnits: "K", exactCheck: { maxSites: 16, automatic: true } })).toEqual({ displayUnits: "K", exactCheckMaxSites: 16, exactCheckAutomatic: true });
    expect(readSettings({ "exactCheck.maxSites": 12 }).exactCheckMaxSites).toBe(12);
    expect(readSettings({ displayUnits: 3, exactCheck: { maxSites: -1 } })).toEqual(DEFAULT_SERVER_SETTINGS);
    expect(readSettings(null)).toEqual(DEFAULT_SERVER_SETTINGS);
  });
});
