// Definition, references, highlights and rename (with prepareRename) at the service boundary.
// Rename is checked by applying its edits and analysing the result again.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { documentHighlights, findDefinition, findReferences, prepareRename, rename } from "../../server/src/service/navigation";
import { analyzeMarked, applyEdits, CHAIN, marked } from "./fixtures";

function textAt(text: string, span: { start: number; end: number } | null): string | null {
  return span ? text.slice(span.start, span.end) : null;
}

describe("definition", () => {
  it("goes from a use of a parameter to its `let`", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("heisenberg(J1)", "heisenberg(J$01)"));
    const span = findDefinition(a, offset);
    expect(textAt(a.text, span)).toBe("J1");
    expect(span?.start).toBe(a.text.indexOf("let J1") + 4);
  });

  it("goes from a bond's site to the `sites` list", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("on Cu -> Cu + (1)\n", "on Cu -> C$0u + (1)\n"));
    const span = findDefinition(a, offset);
    expect(span?.start).toBe(a.text.indexOf("sites Cu") + 6);
  });

  it("goes from a preset's default site to the preset", () => {
    const { a, offset } = analyzeMarked(`model "m" {\n  convention antiferro-positive\n  lattice chain\n  let J = 1 meV\n  exchange heisenberg(J) on A -> $0A + (1)\n}\n`);
    expect(textAt(a.text, findDefinition(a, offset))).toBe("chain");
  });

  it("finds nothing on a keyword", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("exchange heisenberg(J1)", "exch$0ange heisenberg(J1)"));
    expect(findDefinition(a, offset)).toBeNull();
  });
});

describe("references and highlights", () => {
  it("lists every use of J1, with or without its definition", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("let J1 =", "let J$01 ="));
    // J1 is defined once and used in J2, Dz and the first exchange.
    expect(findReferences(a, offset, true)).toHaveLength(4);
    const uses = findReferences(a, offset, false);
    expect(uses).toHaveLength(3);
    expect(uses.every((s) => a.text.slice(s.start, s.end) === "J1")).toBe(true);
  });

  it("marks the definition as a write and the uses as reads", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("let J1 =", "let J$01 ="));
    const kinds = documentHighlights(a, offset).map((h) => h.kind);
    expect(kinds.filter((k) => k === "write")).toHaveLength(1);
    expect(kinds.filter((k) => k === "read")).toHaveLength(3);
  });

  it("finds a parameter used in a statement the model skipped (unknown exchange kind)", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("let J1 =", "let J$01 =").replace("exchange heisenberg(J1)", "exchange heisenbrg(J1)"));
    expect(findReferences(a, offset, false)).toHaveLength(3);
  });
});

describe("rename", () => {
  it("renames a parameter everywhere and keeps the model", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("heisenberg(J1)", "heisenberg($0J1)"));
    const prepared = prepareRename(a, offset);
    expect(prepared).toMatchObject({ ok: true, placeholder: "J1" });
    const result = rename(a, offset, "Jnn");
    if (!result.ok) throw new Error(result.reason);
    const after = analyzeDocument(applyEdits(a.text, result.edits));
    expect(after.text).not.toMatch(/\bJ1\b/);
    expect(after.model?.parameters.get("Jnn")?.value?.data[0]).toBeCloseTo(a.model?.parameters.get("J1")?.value?.data[0] ?? NaN, 12);
    expect(after.model?.exchanges.map((e) => e.couplingName)).toEqual(["Jnn", "J2", "Dz"]);
    expect(after.diagnostics.map((d) => d.code)).toEqual(a.diagnostics.map((d) => d.code));
  });

  it("renames a site in the sites list and in every bond", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("sites Cu", "sites C$0u"));
    const result = rename(a, offset, "Cu2");
    if (!result.ok) throw new Error(result.reason);
    const text = applyEdits(a.text, result.edits);
    expect(text).not.toMatch(/\bCu\b/);
    const after = analyzeDocument(text);
    expect(after.model?.lattice?.sites.map((s) => s.name)).toEqual(["Cu2"]);
    expect(after.diagnostics.filter((d) => d.code === "spw-site-unknown")).toHaveLength(0);
  });

  it("refuses names that are keywords, units, constants or taken", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("let J1 =", "let J$01 ="));
    for (const bad of ["on", "K", "muB", "J2", "2x", "a b"]) expect(rename(a, offset, bad).ok).toBe(false);
  });

  it("refuses to rename a preset's default site, and anything that is not a name", () => {
    const preset = analyzeMarked(`model "m" {\n  lattice chain\n  let J = 1 meV\n  exchange heisenberg(J) on $0A -> A + (1)\n}\n`);
    expect(prepareRename(preset.a, preset.offset).ok).toBe(false);
    const m = marked(CHAIN.replace("field 3.5", "fi$0eld 3.5"));
    expect(prepareRename(analyzeDocument(m.text), m.offset).ok).toBe(false);
  });
});
