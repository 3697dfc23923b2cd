// LSP conversions and settings: diagnostics keep code, range, related information, tags and the
// documentation link; snippets degrade to plain text for clients without snippet support; the
// `spinwright` settings are read defensively.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../analysis/analyze";
import { plainFromSnippet, toLspDiagnostic } from "./convert";
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
