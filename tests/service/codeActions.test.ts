// Quick fixes: each is applied and the resulting text compared with the expected one; the
// diagnostic it fixes must be gone after a new analysis.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import type { DiagnosticCode } from "../../server/src/base/diagnostics";
import { codeActions, type CodeAction } from "../../server/src/service/codeActions";
import { applyEdits, CHAIN } from "./fixtures";

function fixesFor(text: string, code: DiagnosticCode): CodeAction[] {
  const a = analyzeDocument(text);
  const d = a.diagnostics.find((x) => x.code === code);
  if (!d) throw new Error(`no ${code} in the fixture; found ${a.diagnostics.map((x) => x.code).join(", ")}`);
  return codeActions(a, d.span).filter((c) => c.diagnostic.code === code);
}

function applyPreferred(text: string, code: DiagnosticCode): string {
  const fix = fixesFor(text, code).find((c) => c.isPreferred);
  if (!fix) throw new Error(`no preferred fix for ${code}`);
  return applyEdits(text, fix.edits);
}

function codes(text: string): string[] {
  return analyzeDocument(text).diagnostics.map((d) => d.code);
}

describe("code actions", () => {
  it("adds the convention after the spin statement", () => {
    const text = `model "m" {\n  spin 1/2\n  lattice chain\n}\n`;
    const fixed = applyPreferred(text, "spw-convention-missing");
    expect(fixed).toBe(`model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain\n}\n`);
    expect(codes(fixed)).not.toContain("spw-convention-missing");
    expect(fixesFor(text, "spw-convention-missing").map((c) => c.title).join("\n")).toContain("ferro-positive");
  });

  it("adds the convention before the first statement when there is no spin statement", () => {
    const text = `model "m" {\n    lattice chain\n}\n`;
    expect(applyPreferred(text, "spw-convention-missing")).toBe(`model "m" {\n    convention antiferro-positive\n    lattice chain\n}\n`);
  });

  it("adds to an empty model right after its brace, and offers nothing when the header has no brace", () => {
    expect(applyPreferred(`model "m" {\n}\n`, "spw-lattice-missing")).toBe(`model "m" {\n  lattice chain\n}\n`);
    // Without '{' a statement would land outside the block; the missing brace has its own error.
    const broken = `model "m"   stray words\n}\n`;
    expect(fixesFor(broken, "spw-lattice-missing")).toEqual([]);
    expect(fixesFor(broken, "spw-convention-missing")).toEqual([]);
    expect(codes(broken)).toContain("spw-syntax");
  });

  it("removes a spin-1/2 anisotropy (a constant) with its line", () => {
    const fixed = applyPreferred(CHAIN, "spw-single-ion-constant");
    expect(fixed).toBe(CHAIN.replace("  anisotropy Cu D = 0.5 K E = 0.1 K axis (0, 0, 1)\n", ""));
    expect(codes(fixed)).not.toContain("spw-single-ion-constant");
  });

  it("removes an exchange term that is zero, with its line", () => {
    const text = `model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites Cu\n  exchange heisenberg(1 meV) on shell 1\n  exchange dm(0 meV, (0, 0, 1)) on shell 1\n}\n`;
    const fixed = applyPreferred(text, "spw-term-zero");
    expect(fixed).toBe(text.replace("  exchange dm(0 meV, (0, 0, 1)) on shell 1\n", ""));
    expect(codes(fixed)).toEqual([]);
    // Zero in floating point only when every entry is: a tiny coupling is a coupling.
    expect(codes(text.replace("dm(0 meV", "dm(1e-9 meV"))).not.toContain("spw-term-zero");
  });

  it("removes a name written before a custom lattice's braces; the cell and the statements after it still build", () => {
    const text = `model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice custom {\n    vector a1 = (1, 0, 0)\n    site A = (0, 0, 0)\n  }\n  exchange heisenberg(1 meV) on A -> A + (1)\n}\n`;
    const a = analyzeDocument(text);
    expect(a.diagnostics.map((d) => [d.code, text.slice(d.span.start, d.span.end)])).toEqual([["spw-lattice-invalid", "custom"]]);
    // Read as the cell it encloses: the exchange finds site A, and the model is not cut at the lattice's '}'.
    expect(a.model?.lattice?.sites.map((x) => x.name)).toEqual(["A"]);
    expect(a.model?.exchanges).toHaveLength(1);
    const fixed = applyPreferred(text, "spw-lattice-invalid");
    expect(fixed).toBe(text.replace("lattice custom {", "lattice {"));
    expect(codes(fixed)).toEqual([]);
    // A preset's name before braces: the message offers both readings.
    const preset = analyzeDocument(text.replace("lattice custom {", "lattice chain {")).diagnostics.find((d) => d.code === "spw-lattice-invalid");
    expect(preset?.message).toContain("`lattice chain` without the braces");
    // A cell that does not build is reported once: the sites and the cluster size that lean on it
    // are not reported again one by one.
    const broken = codes(text.replace("vector a1 = (1, 0, 0)", "vectors (1, 0, 0)").replace("}\n  exchange", "}\n  cluster (4, 4) periodic\n  exchange"));
    expect(broken).toContain("spw-lattice-invalid");
    expect(broken.filter((c) => c === "spw-site-unknown" || c === "spw-cluster-invalid")).toEqual([]);
    // With the cell built, a size per direction it does not have is reported, in words that fit one direction.
    const sizes = analyzeDocument(fixed.replace("}\n  exchange", "}\n  cluster (4, 4) periodic\n  exchange")).diagnostics.find((d) => d.code === "spw-cluster-invalid");
    expect(sizes?.message).toBe("This 1D lattice takes one cluster size, e.g. cluster 8 periodic.");
  });

  it("turns the spellings of print and speech into .spw's, one fix each", () => {
    const clean = `model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites Cu\n  let J = 10 K\n  exchange heisenberg(J) on shell 1\n  field 5 T along (0, 0, 1)\n  expect su2\n}\n`;
    expect(codes(clean)).toEqual([]);
    const cases: [string, string, DiagnosticCode][] = [
      ["convention antiferro-positive", "convention afm", "spw-convention-unknown"],
      ["convention antiferro-positive", "convention ferro-positive", "spw-convention-unknown"],
      ["10 K", "10 kelvin", "spw-unit-unknown"],
      ["5 T", "5 Tesla", "spw-unit-unknown"],
      ["heisenberg(J) on", "J on", "spw-kind-unknown"],
      ["along (0, 0, 1)", "along z", "spw-name-unknown"],
      ["expect su2", "expect SU(2)", "spw-expect-unknown"],
    ];
    for (const [right, wrong, code] of cases) {
      // ferro-positive is no mistake: only the short form 'fm' is, and it is fixed back to it.
      const broken = wrong === "convention ferro-positive" ? clean.replace(right, "convention fm") : clean.replace(right, wrong);
      const fixed = applyPreferred(broken, code);
      expect(fixed).toBe(wrong === "convention ferro-positive" ? clean.replace(right, wrong) : clean);
      // One message for one mistake: `exchange J on` and `SU(2)` no longer leave stray tokens behind.
      expect(codes(broken).filter((c) => c !== "spw-expect-mismatch")).toEqual([code]);
    }
    // A parameter named z is a direction like any other name, not the axis.
    expect(codes(clean.replace("let J = 10 K", "let J = 10 K\n  let z = (0, 1, 0)").replace("along (0, 0, 1)", "along z"))).not.toContain("spw-name-unknown");
    // Bare numbers after a g value: the tuple is spelt out.
    const g = analyzeDocument(clean.replace("  expect su2", "  g Cu = 2.0 2.0 2.2\n  expect su2")).diagnostics.find((d) => d.code === "spw-syntax");
    expect(g?.message).toBe("Unexpected '2.0 2.2': a g-tensor given by its principal values is a tuple, g Cu = (2.0, 2.0, 2.2).");
  });

  it("writes g = diag(a, b, c) as the tuple the g statement takes", () => {
    const text = `model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain sites Cu\n  exchange heisenberg(1 meV) on shell 1\n  g Cu = diag(2, 2, 2.2)\n}\n`;
    expect(analyzeDocument(text).diagnostics.find((d) => d.code === "spw-expr-forbidden")?.message).toContain("g Cu = (2, 2, 2.2)");
    const fixed = applyPreferred(text, "spw-expr-forbidden");
    expect(fixed).toBe(text.replace("diag(2, 2, 2.2)", "(2, 2, 2.2)"));
    expect(codes(fixed)).toEqual([]);
    // Not in an exchange, where a tuple is no matrix.
    expect(fixesFor(text.replace("heisenberg(1 meV)", "matrix(diag(1, 1, 2))").replace("diag(2, 2, 2.2)", "2"), "spw-expr-forbidden")).toEqual([]);
  });

  it("removes a duplicate bond from a bond list", () => {
    const fixed = applyPreferred(CHAIN, "spw-bond-duplicate");
    expect(fixed).toBe(CHAIN.replace("on Cu -> Cu + (2), shell 2", "on Cu -> Cu + (2)"));
    expect(codes(fixed)).not.toContain("spw-bond-duplicate");
  });

  it("removes a whole exchange statement that only repeats a bond", () => {
    const text = CHAIN.replace("on Cu -> Cu + (2), shell 2", "on Cu -> Cu + (2)").replace(
      "  exchange dm(",
      "  exchange heisenberg(J1) on Cu -> Cu + (-1)\n  exchange dm(",
    );
    const fixed = applyPreferred(text, "spw-bond-duplicate");
    expect(fixed).toBe(text.replace("  exchange heisenberg(J1) on Cu -> Cu + (-1)\n", ""));
  });

  it("does not remove a shell whose other bonds are new", () => {
    // Shell 1 of the ladder holds the two legs and the rung; only A -> A + (1) is a repeat.
    const text = `model "m" {\n  convention antiferro-positive\n  lattice ladder\n  let J = 1 meV\n  exchange heisenberg(J) on A -> A + (1), shell 1\n}\n`;
    expect(fixesFor(text, "spw-bond-duplicate")).toEqual([]);
  });

  it("suggests the known site, lattice, exchange kind and name for a misspelling", () => {
    const site = CHAIN.replace("on Cu -> Cu + (1)\n", "on Cu -> Cv + (1)\n");
    expect(applyPreferred(site, "spw-site-unknown")).toBe(CHAIN);
    const lattice = CHAIN.replace("lattice chain", "lattice chian");
    expect(applyPreferred(lattice, "spw-lattice-unknown")).toBe(CHAIN);
    const kind = CHAIN.replace("exchange heisenberg(J1)", "exchange heisenbrg(J1)");
    expect(applyPreferred(kind, "spw-kind-unknown")).toBe(CHAIN);
    const name = CHAIN.replace("let Dz = 0.02 * J1", "let Dz = 0.02 * J11");
    expect(applyPreferred(name, "spw-name-unknown")).toBe(CHAIN);
  });

  it("suggests units of the dimension the statement needs: energies in a coupling, fields in the field", () => {
    const titles = (text: string): string[] => fixesFor(text, "spw-unit-unknown").map((c) => c.title);
    const base = 'model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain\n';
    // 'mt' is one case away from mT, a field unit, and close to mK and meV.
    const coupling = titles(`${base}  exchange heisenberg(1 mt) on shell 1\n}\n`);
    expect(coupling[0]).toBe("Change unit to 'mK'");
    expect(coupling.join(" ")).not.toContain("'mT'");
    const field = titles(`${base}  field 2 mk\n}\n`);
    expect(field[0]).toBe("Change unit to 'mT'");
    expect(field.join(" ")).not.toContain("'mK'");
    // A parameter may be either: spelling alone decides.
    expect(titles(`${base}  let B = 2 mt\n}\n`)[0]).toBe("Change unit to 'mT'");
  });

  it("suggests only energies for an unknown name in a coupling's place", () => {
    const titles = (text: string): string[] => fixesFor(text, "spw-name-unknown").map((c) => c.title);
    const base = 'model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain\n  let B1 = 2 T\n  let J1 = 1 meV\n';
    // 'B' is one edit from the field B1 and two from the energy J1.
    const coupling = titles(`${base}  exchange heisenberg(B) on shell 1\n}\n`);
    expect(coupling.join(" ")).toContain("'J1'");
    expect(coupling.join(" ")).not.toContain("'B1'");
    // muB is an energy per field: no coupling on its own.
    expect(titles(`${base}  exchange heisenberg(mu) on shell 1\n}\n`).join(" ")).not.toContain("muB");
    // Elsewhere spelling alone decides.
    expect(titles(`${base}  let h = 2 * B\n}\n`)[0]).toContain("'B1'");
  });

  it("adds a unit to a bare coupling value at its definition", () => {
    const text = CHAIN.replace("let J1 = 14.2 K", "let J1 = 14.2");
    const titles = fixesFor(text, "spw-unit-missing").map((c) => c.title);
    expect(titles.some((t) => t.includes("K"))).toBe(true);
    const fixed = applyPreferred(text, "spw-unit-missing");
    expect(fixed).toBe(CHAIN.replace("let J1 = 14.2 K", "let J1 = 14.2 meV"));
    expect(codes(fixed)).not.toContain("spw-unit-missing");
  });

  it("adds a field unit to a bare field value", () => {
    const text = CHAIN.replace("field 3.5 T", "field 3.5");
    expect(applyPreferred(text, "spw-unit-missing")).toBe(CHAIN);
  });

  it("changes a symmetry claim to the computed symmetry", () => {
    // A DM vector along z leaves U(1) about z (physics-notes section 3), not SU(2).
    const text = CHAIN.replace("expect u1 about (0, 0, 1)", "expect su2");
    const fixed = applyPreferred(text, "spw-expect-mismatch");
    expect(fixed).toBe(CHAIN);
    expect(codes(fixed)).not.toContain("spw-expect-mismatch");
    const tilted = CHAIN.replace("expect u1 about (0, 0, 1)", "expect u1 about (1, 0, 0)");
    expect(applyPreferred(tilted, "spw-expect-mismatch")).toBe(CHAIN);
  });
});
