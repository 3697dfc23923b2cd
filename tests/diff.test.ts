// The physics-aware diff: a DM term added flips the protection (significant); reordering
// statements or renaming parameters and sites changes nothing physical.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../server/src/analysis/analyze";
import { diffModels } from "../server/src/analysis/diff";

const sample = readFileSync(join(__dirname, "..", "samples", "heisenberg-chain-field.spw"), "utf8");

describe("spinwright diff", () => {
  it("adding a DM term flips the protection and the symmetry class", () => {
    const withDm = sample.replace("exchange heisenberg(J1) on Cu -> Cu + (1)", "exchange heisenberg(J1) on Cu -> Cu + (1)\n  exchange dm(0.05 * J1, (0, 0, 1)) on Cu -> Cu + (1)");
    const d = diffModels(analyzeDocument(sample), analyzeDocument(withDm));
    expect(d.significant).toBe(true);
    expect(d.protection).toEqual({ before: true, after: false, changed: true });
    expect(d.symmetry.after).toMatch(/^U\(1\)/);
    expect(d.breakingAdded).toEqual(["a Dzyaloshinskii-Moriya term"]);
    expect(d.bonds).toHaveLength(1);
    expect(d.bonds[0]?.change).toBe("changed");
  });

  it("renaming a parameter and a site and reordering statements is no physical change", () => {
    const renamed = sample
      .replace(/J1/g, "Jchain")
      .replace("sites Cu", "sites Cu2")
      .replace(/Cu -> Cu/g, "Cu2 -> Cu2")
      .replace("g Cu =", "g Cu2 =")
      .replace("  probe 9.8 GHz\n", "")
      .replace("  expect su2\n", "  expect su2\n  probe 9.8 GHz\n");
    const d = diffModels(analyzeDocument(sample), analyzeDocument(renamed));
    expect(d.same).toBe(true);
    expect(d.significant).toBe(false);
  });

  it("a coupling change is reported in meV and relative to the old value", () => {
    const stronger = sample.replace("let J1 = 10.7 K", "let J1 = 12.84 K");
    const d = diffModels(analyzeDocument(sample), analyzeDocument(stronger));
    expect(d.significant).toBe(false);
    expect(d.same).toBe(false);
    expect(d.bonds[0]?.relative).toBeCloseTo(0.2, 12);
  });

  it("moving J2 across J2c changes the region", () => {
    const base = `model "m" { convention antiferro-positive lattice chain let J1 = 1 meV exchange heisenberg(J1) on shell 1 exchange heisenberg(RATIO * J1) on shell 2 }`;
    const d = diffModels(analyzeDocument(base.replace("RATIO", "0.2")), analyzeDocument(base.replace("RATIO", "0.3")));
    expect(d.region.changed).toBe(true);
    expect(d.significant).toBe(true);
  });
});
