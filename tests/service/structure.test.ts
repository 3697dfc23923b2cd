// Outline (document symbols), folding ranges and selection ranges at the service boundary,
// checked on the chain fixture and on a broken file.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { foldingRanges } from "../../server/src/service/folding";
import { selectionSpans } from "../../server/src/service/selectionRanges";
import { documentSymbols } from "../../server/src/service/symbols";
import { CHAIN, marked } from "./fixtures";

describe("document symbols", () => {
  it("lists the model with its statements, parameters with resolved values", () => {
    const [model] = documentSymbols(analyzeDocument(CHAIN));
    expect(model?.name).toBe('model "chain-A"');
    const names = model?.children.map((c) => c.name) ?? [];
    expect(names).toEqual(expect.arrayContaining(["J1", "J2", "Dz", "lattice chain", "heisenberg(J1)", "dm(Dz, (0, 0, 1))", "field", "expect u1"]));
    const j1 = model?.children.find((c) => c.name === "J1");
    expect(j1?.detail).toContain("meV");
    expect(CHAIN.slice(j1!.selectionSpan.start, j1!.selectionSpan.end)).toBe("J1");
  });

  it("keeps an outline when the file is broken", () => {
    const [model] = documentSymbols(analyzeDocument(`model "b" {\n  let J1 = 14.2 K +\n  lattice chain\n  let x = 4 $ 5\n`));
    expect(model?.children.map((c) => c.name)).toEqual(expect.arrayContaining(["J1", "lattice chain", "x"]));
  });
});

describe("folding ranges", () => {
  it("folds the model block, a multi-line statement and a comment block", () => {
    const text = `# one\n# two\n# three\nmodel "m" {\n  lattice chain\n  let J = 1 meV\n  exchange matrix(J, [[1, 0, 0],\n    [0, 1, 0],\n    [0, 0, 1]]) on A -> A + (1)\n}\n`;
    const ranges = foldingRanges(analyzeDocument(text));
    expect(ranges).toEqual(
      expect.arrayContaining([
        { startLine: 0, endLine: 2, kind: "comment" },
        { startLine: 3, endLine: 8 },
        { startLine: 6, endLine: 8 },
      ]),
    );
    expect(ranges).toHaveLength(3);
  });
});

describe("selection ranges", () => {
  it("grows from the token through the expression and statement to the model", () => {
    const m = marked(CHAIN.replace("let J2 = 0.18 * J1", "let J2 = 0.$018 * J1"));
    const a = analyzeDocument(m.text);
    const spans = selectionSpans(a, m.offset).map((s) => m.text.slice(s.start, s.end));
    expect(spans[0]).toBe("0.18");
    expect(spans).toContain("0.18 * J1");
    expect(spans).toContain("let J2 = 0.18 * J1");
    expect(spans[spans.length - 1]).toBe(m.text);
    for (let k = 1; k < spans.length; k++) expect(spans[k]!.length).toBeGreaterThan(spans[k - 1]!.length);
  });
});
