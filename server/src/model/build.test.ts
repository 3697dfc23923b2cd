// Semantic-model tests: values in canonical units, lattice shells with the right bond counts,
// exchange matrices in the Hamiltonian's sign, g-tensors, field and cluster expansion.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../analysis/analyze";
import { buildFiniteCluster } from "./cluster";
import { MEV_PER_K, MU_B_MEV_PER_T } from "./units";

function model(body: string) {
  const a = analyzeDocument(`model "m" {\n convention antiferro-positive\n${body}\n}`);
  const errors = a.diagnostics.filter((d) => d.severity === "error");
  if (errors.length) throw new Error(errors.map((e) => e.message).join("\n"));
  if (!a.model) throw new Error("no model");
  return a.model;
}

describe("neighbour shells of the presets", () => {
  // Bonds per site on shell 1: coordination / 2 (geometry of each lattice, derivable).
  const cases: [string, number, number][] = [
    ["chain", 1, 1],
    ["square", 1, 2],
    ["triangular", 1, 3],
    ["honeycomb", 1, 1.5],
    ["kagome", 1, 2],
    ["cubic", 1, 3],
    ["ladder", 1, 1.5],
    ["chain", 2, 1],
    ["square", 2, 2],
    ["triangular", 2, 3],
    ["honeycomb", 2, 3],
  ];
  for (const [lattice, shell, perSite] of cases) {
    it(`${lattice} shell ${shell}: ${perSite} bond(s) per site`, () => {
      const m = model(`lattice ${lattice}\n let J = 1 K\n exchange heisenberg(J) on shell ${shell}`);
      const sites = m.lattice?.sites.length ?? 0;
      expect((m.exchanges[0]?.bonds.length ?? 0) / sites).toBe(perSite);
    });
  }

  it("shell distances: chain 1 and 2, square 1 and sqrt 2, honeycomb 1/sqrt 3", () => {
    const d = (lattice: string, shell: number) =>
      model(`lattice ${lattice}\n let J = 1 K\n exchange heisenberg(J) on shell ${shell}`).exchanges[0]?.bonds[0]?.distance;
    expect(d("chain", 2)).toBeCloseTo(2, 12);
    expect(d("square", 2)).toBeCloseTo(Math.SQRT2, 12);
    expect(d("honeycomb", 1)).toBeCloseTo(1 / Math.sqrt(3), 12);
  });
});

describe("values and matrices", () => {
  it("converts K to meV with kB from CODATA 2018 and resolves parameter arithmetic", () => {
    const m = model(`lattice chain\n let J1 = 14.2 K\n let J2 = 0.18 * J1`);
    expect(m.parameters.get("J1")?.value?.data[0]).toBeCloseTo(14.2 * MEV_PER_K, 14);
    expect(m.parameters.get("J2")?.value?.data[0]).toBeCloseTo(0.18 * 14.2 * MEV_PER_K, 14);
    // 14.2 K = 1.22366 meV (1 meV = 11.6045 K, CODATA 2018)
    expect(m.parameters.get("J1")?.value?.data[0]).toBeCloseTo(1.22366, 5);
  });

  it("ferro-positive flips the sign of every exchange matrix (H = -J S.S)", () => {
    const a = analyzeDocument(`model "m" { convention ferro-positive lattice chain let J = 1 meV exchange heisenberg(J) on shell 1 }`);
    expect(a.model?.exchanges[0]?.matrixMeV[0][0]).toBe(-1);
    expect(a.model?.exchanges[0]?.writtenMatrixMeV[0][0]).toBe(1);
  });

  it("builds the DM matrix so that S_i.J.S_j = D.(S_i x S_j)", () => {
    const m = model(`lattice chain\n exchange dm(2 meV, (0, 0, 5)) on A -> A + (1)`);
    const J = m.exchanges[0]?.matrixMeV;
    // D_z = (J_xy - J_yx) / 2 (physics notes section 2).
    expect(J?.[0][1]).toBe(2);
    expect(J?.[1][0]).toBe(-2);
    expect(((J?.[0][1] ?? 0) - (J?.[1][0] ?? 0)) / 2).toBe(2);
  });

  it("xxz about a tilted axis has J delta along the axis and J across it", () => {
    const m = model(`lattice chain\n exchange xxz(1 meV, 0.5, (1, 1, 0)) on shell 1`);
    const J = m.exchanges[0]?.matrixMeV;
    const n = [Math.SQRT1_2, Math.SQRT1_2, 0];
    const along = n.reduce((s, a, i) => s + n.reduce((t, b, j) => t + a * ((J?.[i] as number[] | undefined)?.[j] ?? 0) * b, 0), 0);
    expect(along).toBeCloseTo(0.5, 14);
    expect(J?.[2][2]).toBeCloseTo(1, 14);
  });

  it("applies g-tensors and computes the effective Zeeman field muB g^T B", () => {
    const m = model(`lattice chain\n g A = (2, 2, 3)\n field 2 T along (0, 0, 1)\n cluster 4 periodic`);
    const c = buildFiniteCluster(m);
    expect(c.ok).toBe(true);
    if (!c.ok) return;
    expect(c.value.cluster.fields[0]?.[2]).toBeCloseTo(3 * 2 * MU_B_MEV_PER_T, 15);
    expect(c.value.cluster.fields[0]?.[0]).toBe(0);
  });

  it("a parameter may be named like a JavaScript object member (toString, constructor)", () => {
    const a = analyzeDocument('model "m" {\n  convention antiferro-positive\n  lattice chain\n  let toString = 2 meV\n  let constructor = 0.5 * toString\n  exchange heisenberg(constructor) on shell 1\n}\n');
    expect(a.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
    expect(a.model?.exchanges[0]?.scaleMeV).toBeCloseTo(1, 12);
  });

  it("field in mT and G", () => {
    expect(model(`lattice chain\n field 350 mT`).field?.magnitudeT).toBeCloseTo(0.35, 14);
    expect(model(`lattice chain\n field 3500 G`).field?.magnitudeT).toBeCloseTo(0.35, 14);
  });
});

describe("finite clusters", () => {
  it("a periodic 8-site J1-J2 chain has 8 + 8 bonds and a translation by one site", () => {
    const m = model(`lattice chain\n let J = 1 meV\n exchange heisenberg(J) on shell 1\n exchange heisenberg(0.5 * J) on shell 2\n cluster 8 periodic`);
    const c = buildFiniteCluster(m);
    if (!c.ok) throw new Error(c.reason);
    expect(c.value.cluster.bonds.length).toBe(16);
    expect(c.value.cluster.translations?.[0]?.slice(0, 3)).toEqual([1, 2, 3]);
  });

  it("an open chain of 8 sites has 7 nearest-neighbour bonds", () => {
    const m = model(`lattice chain\n let J = 1 meV\n exchange heisenberg(J) on shell 1\n cluster 8 open`);
    const c = buildFiniteCluster(m);
    if (!c.ok) throw new Error(c.reason);
    expect(c.value.cluster.bonds.length).toBe(7);
    expect(c.value.cluster.translations).toBeUndefined();
  });

  it("a 3x3 periodic kagome cluster has 27 sites and 54 bonds", () => {
    const m = model(`lattice kagome\n let J = 1 meV\n exchange heisenberg(J) on shell 1\n cluster (3, 3) periodic`);
    const c = buildFiniteCluster(m);
    if (!c.ok) throw new Error(c.reason);
    expect(c.value.cluster.spins.length).toBe(27);
    expect(c.value.cluster.bonds.length).toBe(54);
  });
});

describe("expression precedence and associativity (arithmetic conventions)", () => {
  const value = (expr: string) => model(`lattice chain\n let x = ${expr}`).parameters.get("x")?.value?.data[0];
  it.each([
    ["-2 ^ 2", -4],
    ["2 ^ -1", 0.5],
    ["2 * 3 ^ 2", 18],
    ["1 - 2 - 3", -4],
    ["2 ^ 3 ^ 2", 512],
    ["12 / 2 / 3", 2],
    ["-(1 + 2) * 2", -6],
    ["2 + 3 * 4 ^ 2", 50],
    ["- -3", 3],
  ])("%s = %d", (expr, expected) => {
    expect(value(expr)).toBeCloseTo(expected, 12);
  });
});

describe("a bond given twice", () => {
  // S_j . J . S_i = S_i . J^T . S_j (derivable): written from its other end, a symmetric term is
  // the same operator again, while a DM vector enters with the opposite sign.
  const duplicates = (lines: string): string[] =>
    analyzeDocument(`model "m" {\n convention antiferro-positive\n lattice chain sites A\n let J = 1 K\n${lines}\n}`)
      .diagnostics.filter((d) => d.code === "spw-bond-duplicate")
      .map((d) => d.message);

  it("says a DM term written from the other end would cancel, not add", () => {
    const [message] = duplicates(" exchange dm(J, (0, 0, 1)) on A -> A + (1)\n exchange dm(J, (0, 0, 1)) on A -> A + (-1)");
    expect(message).toBe(
      "This dm bond A -> A + (-1) is already given; written from its other end, its DM vector enters with the opposite sign (S_j.J.S_i = S_i.Jᵀ.S_j), so the two would cancel (wholly or in part) rather than add. Only the first is kept; remove one of them, or write both from the same end.",
    );
  });

  it("says the same DM bond twice, or a symmetric term from either end, is counted twice", () => {
    expect(duplicates(" exchange dm(J, (0, 0, 1)) on A -> A + (-1)\n exchange dm(J, (0, 0, 1)) on A -> A + (-1)")).toEqual([
      "This dm bond A -> A + (-1) is already given; it would be counted twice. Remove one of them.",
    ]);
    expect(duplicates(" exchange heisenberg(J) on A -> A + (1)\n exchange heisenberg(J) on A -> A + (-1)")).toEqual([
      "This heisenberg bond A -> A + (-1) is already given; it would be counted twice. Remove one of them.",
    ]);
  });

  it("names both effects for a matrix term written from the other end", () => {
    const [message] = duplicates(" exchange matrix([[J, J, 0 K], [0 K, J, 0 K], [0 K, 0 K, J]]) on A -> A + (1)\n exchange matrix([[J, J, 0 K], [0 K, J, 0 K], [0 K, 0 K, J]]) on A -> A + (-1)");
    expect(message).toContain("its symmetric part would be counted twice and its antisymmetric (DM) part, if any, would enter with the opposite sign");
  });
});

describe("an unknown site", () => {
  it("names every site that is as near as the nearest, not only the first", () => {
    const message = (bond: string) =>
      analyzeDocument(`model "m" {\n convention antiferro-positive\n lattice ladder sites Cu1, Cu2\n exchange heisenberg(1 meV) on ${bond}\n}`).diagnostics.find((d) => d.code === "spw-site-unknown")?.message;
    expect(message("Cu1 -> Cu3")).toBe("Unknown site 'Cu3'. The lattice has Cu1, Cu2; did you mean Cu1 or Cu2?");
    expect(message("Cu1 -> cu2")).toBe("Unknown site 'cu2'. The lattice has Cu1, Cu2; did you mean Cu2?");
  });
});

describe("a parameter named like a unit", () => {
  it("is refused once, and its uses say why instead of asking for a number before the unit", () => {
    const text = `model "m" {\n convention antiferro-positive\n lattice chain sites A\n let K = -8 meV\n let J = 0.5 * K\n exchange heisenberg(J) on shell 1\n}`;
    const a = analyzeDocument(text);
    expect(a.diagnostics.map((d) => [d.code, text.slice(d.span.start, d.span.end)])).toEqual([
      ["spw-name-is-unit", "K"],
      ["spw-name-unknown", "K"],
    ]);
    expect(a.diagnostics[1]?.message).toBe("'K' is a unit, so `let K = ...` defines no parameter: rename it there and here, e.g. K1.");
    // Renaming only the let leaves the use unknown, with the plain message (the kept evaluation is not replayed).
    const renamed = text.replace("let K = -8 meV", "let K1 = -8 meV");
    const incremental = analyzeDocument(renamed, { previous: a });
    expect(incremental.diagnostics.map((d) => d.message)).toEqual(analyzeDocument(renamed).diagnostics.map((d) => d.message));
    expect(incremental.diagnostics.map((d) => d.message)).toEqual(["Unknown name 'K'. A unit follows a number: write 1 K."]);
  });
});

describe("an unknown unit", () => {
  const message = (value: string) =>
    analyzeDocument(`model "m" {\n convention antiferro-positive\n lattice chain sites A\n let J = ${value}\n}`).diagnostics.find((d) => d.code === "spw-unit-unknown")?.message;
  it("is named with the unit it resembles: letter case first, then spelling", () => {
    expect(message("1 mev")).toBe("Unknown unit 'mev'; did you mean meV? Energies take meV, ueV, eV, joule, K, mK, MHz, GHz, THz, cm^-1; fields take T, mT, G.");
    expect(message("1 Ghz")).toContain("did you mean GHz?");
    expect(message("1 tesla")).toBe("Unknown unit 'tesla'; did you mean T? Energies take meV, ueV, eV, joule, K, mK, MHz, GHz, THz, cm^-1; fields take T, mT, G.");
  });

  it("written out in words is named by its symbol", () => {
    expect(message("10 kelvin")).toContain("did you mean K?");
    expect(message("10 Kelvins")).toContain("did you mean K?");
    expect(message("5 gauss")).toContain("did you mean G?");
    expect(message("3 gigahertz")).toContain("did you mean GHz?");
    // A word that is no unit gets no guess from the table.
    expect(message("3 kelvinish")).not.toContain("did you mean K?");
  });
});
