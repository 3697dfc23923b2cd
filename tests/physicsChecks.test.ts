// Physics checks at the analysis boundary: symmetry classes and breaking terms with their source
// ranges, the expect claim, conventions, frustration, regions and the protected resonance.
// Each expectation names its source: Larmor theorem and symmetry algebra (physics notes 3-4,
// derivable), CODATA 2018 for conversions, the cited papers for region boundaries.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../server/src/analysis/analyze";
import { buildFiniteCluster } from "../server/src/model/cluster";

function analyze(body: string, header = "spin 1/2\n convention antiferro-positive\n lattice chain sites Cu") {
  const text = `model "m" {\n ${header}\n${body}\n}\n`;
  const a = analyzeDocument(text);
  const errors = a.diagnostics.filter((d) => d.severity === "error" && !d.code.startsWith("spw-expect"));
  if (errors.length) throw new Error(errors.map((e) => `${e.code}: ${e.message}`).join("\n"));
  if (!a.physics) throw new Error("no physics summary");
  return { a, p: a.physics, text, spanText: (s: { start: number; end: number }) => text.slice(s.start, s.end) };
}

describe("symmetry classification from the file", () => {
  it("Heisenberg chain with uniform g is SU(2) and protected", () => {
    const { p } = analyze(` let J = 1 meV\n exchange heisenberg(J) on shell 1\n g Cu = 2.1\n field 1 T`);
    expect(p.symmetry.h0).toBe("su2");
    expect(p.symmetry.breaking).toEqual([]);
    expect(p.resonance.protected).toBe(true);
  });

  it("XXZ with the field along z: U(1) about z, not protected; the finding points at the xxz statement", () => {
    const { p, spanText } = analyze(` let J = 1 meV\n exchange xxz(J, 0.7) on shell 1\n field 2 T along (0, 0, 1)`);
    expect(p.symmetry.h0).toBe("u1");
    expect(p.symmetry.axis?.map((x) => Math.abs(x))).toEqual([0, 0, 1]);
    expect(p.symmetry.full).toBe("u1");
    expect(p.resonance.protected).toBe(false);
    expect(p.symmetry.breaking.map((b) => [b.kind, spanText(b.span)])).toEqual([["exchange-anisotropy", "exchange xxz(J, 0.7) on shell 1"]]);
  });

  it("XXZ with a tilted field has no continuous symmetry at all", () => {
    const { p } = analyze(` exchange xxz(1 meV, 0.7) on shell 1\n field 2 T along (1, 0, 1)`);
    expect(p.symmetry.h0).toBe("u1");
    expect(p.symmetry.full).toBe("none");
  });

  it("finds a tilted XXZ axis", () => {
    const { p } = analyze(` exchange xxz(1 meV, 0.5, (1, 1, 0)) on shell 1`);
    expect(p.symmetry.h0).toBe("u1");
    const n = p.symmetry.axis ?? [0, 0, 0];
    expect(Math.abs(n[0])).toBeCloseTo(Math.SQRT1_2, 9);
    expect(Math.abs(n[1])).toBeCloseTo(Math.SQRT1_2, 9);
  });

  it("DM parallel to one axis leaves U(1) about it; DM on two axes leaves nothing", () => {
    const u1 = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)`);
    expect(u1.p.symmetry.h0).toBe("u1");
    expect(u1.p.symmetry.breaking.map((b) => [b.kind, u1.spanText(b.span)])).toEqual([["dm", "exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)"]]);
    const none = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)\n exchange dm(0.1 meV, (1, 0, 0)) on Cu -> Cu + (2)`);
    expect(none.p.symmetry.h0).toBe("none");
  });

  it("XYZ with three different couplings has no continuous symmetry", () => {
    const { p } = analyze(` exchange xyz(1 meV, 0.8 meV, 0.6 meV) on shell 1`);
    expect(p.symmetry.h0).toBe("none");
    expect(p.symmetry.breaking.map((b) => b.kind)).toContain("exchange-anisotropy");
  });

  it("off-diagonal symmetric exchange is reported as such", () => {
    const { p } = analyze(` exchange matrix(1 meV, [[1, 0.2, 0], [0.2, 1, 0], [0, 0, 1]]) on shell 1`);
    expect(p.symmetry.breaking.map((b) => b.kind)).toContain("off-diagonal-symmetric");
  });

  it("spin-1/2 single-ion term: a warning and no effect on the symmetry", () => {
    const { a, p } = analyze(` exchange heisenberg(1 meV) on shell 1\n anisotropy Cu D = 0.3 meV`);
    expect(a.diagnostics.map((d) => d.code)).toContain("spw-single-ion-constant");
    expect(p.symmetry.h0).toBe("su2");
  });

  it("spin-1 single-ion D breaks SU(2) to U(1) about its axis; an E term breaks it fully", () => {
    const d = analyze(` exchange heisenberg(1 meV) on shell 1\n anisotropy Cu D = 0.3 meV axis (0, 0, 1)`, "spin 1\n convention antiferro-positive\n lattice chain sites Cu");
    expect(d.p.symmetry.h0).toBe("u1");
    expect(d.p.symmetry.breaking.map((b) => [b.kind, d.spanText(b.span)])).toEqual([["single-ion", "anisotropy Cu D = 0.3 meV axis (0, 0, 1)"]]);
    const e = analyze(` exchange heisenberg(1 meV) on shell 1\n anisotropy Cu D = 0.3 meV E = 0.05 meV`, "spin 1\n convention antiferro-positive\n lattice chain sites Cu");
    expect(e.p.symmetry.h0).toBe("none");
  });

  it("uniform anisotropic g with SU(2) H0 is protected, with g along the field from g^T n", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n g Cu = (2.0, 2.0, 2.3)\n field 1 T along (1, 0, 1)`);
    expect(p.resonance.protected).toBe(true);
    // |g^T n| for n = (1, 0, 1)/sqrt 2: sqrt((2.0^2 + 2.3^2)/2) (derivable).
    expect(p.resonance.gAlongField).toBeCloseTo(Math.sqrt((4 + 2.3 ** 2) / 2), 12);
  });

  it("staggered g on a two-site cell is not protected and names the g statements", () => {
    const { p, spanText } = analyze(
      ` exchange heisenberg(1 meV) on A -> B, B -> A + (1)\n g A = (2.0, 2.0, 2.2)\n g B = (2.2, 2.0, 2.0)\n field 1 T along (1, 0, 1)`,
      "spin 1/2\n convention antiferro-positive\n lattice { vector a1 = (1, 0, 0)  site A = (0, 0, 0)  site B = (0.5, 0, 0) }",
    );
    expect(p.symmetry.h0).toBe("su2");
    expect(p.resonance.protected).toBe(false);
    expect(p.symmetry.breaking.map((b) => spanText(b.span)).some((t) => t.startsWith("g "))).toBe(true);
  });
});

describe("where a field finding points", () => {
  // h_i = muB g_i^T B: with an isotropic g the direction of h is the field's, so a field
  // transverse to the axis of H0 is the field statement's doing; with an anisotropic g the
  // g-tensor turns h away from B, and the g statement is the place (derivable).
  const transverse = (g: string) => {
    const { p, spanText } = analyze(` exchange xxz(1 meV, 0.5) on shell 1\n g Cu = ${g}\n field 1 T along (1, 0, 0)`);
    const f = p.symmetry.breaking.find((b) => b.kind === "transverse-field");
    return f ? spanText(f.span) : undefined;
  };
  it("points at the field when g is isotropic", () => {
    expect(transverse("2")).toBe("field 1 T along (1, 0, 0)");
  });
  it("points at the g-tensor when g is anisotropic", () => {
    expect(transverse("[[2, 0, 0], [0, 2, 0], [0, 0, 2.2]]")).toBe("g Cu = [[2, 0, 0], [0, 2, 0], [0, 0, 2.2]]");
  });
});

describe("the expect claim", () => {
  it("expect su2 on a DM chain is an error pointing at the DM term", () => {
    const { a, text } = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)\n expect su2`);
    const d = a.diagnostics.find((x) => x.code === "spw-expect-mismatch");
    expect(d?.severity).toBe("error");
    expect(text.slice(d?.span.start, d?.span.end)).toBe("su2");
    expect(d?.related?.map((r) => text.slice(r.span.start, r.span.end))).toEqual(["exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)"]);
    expect(d?.data?.["replacement"]).toBe("u1 about (0, 0, 1)");
  });

  it("expect u1 about the wrong axis is an error", () => {
    const { a } = analyze(` exchange xxz(1 meV, 0.5) on shell 1\n expect u1 about (1, 0, 0)`);
    const d = a.diagnostics.find((x) => x.code === "spw-expect-mismatch");
    expect(d?.message).toBe("The file expects U(1) about (1, 0, 0), but the conserved axis is (0, 0, 1). Write 'expect u1 about (0, 0, 1)'.");
  });

  it("expect none on an SU(2) model is a hint", () => {
    const { a } = analyze(` exchange heisenberg(1 meV) on shell 1\n expect none`);
    const d = a.diagnostics.find((x) => x.code === "spw-expect-weaker");
    expect(d?.severity).toBe("hint");
  });

  it("messages follow the claim and the computed axis from one file to the next", () => {
    // The texts of the last check are kept for the same claim and axes: a new axis or claim must
    // give new texts. DM along n conserves S.n only (symmetry algebra, derivable).
    const message = (body: string): string | undefined =>
      analyze(body).a.diagnostics.find((d) => d.code.startsWith("spw-expect"))?.message;
    expect(message(` exchange xxz(1 meV, 0.5) on shell 1\n expect u1 about (1, 0, 0)`)).toBe(
      "The file expects U(1) about (1, 0, 0), but the conserved axis is (0, 0, 1). Write 'expect u1 about (0, 0, 1)'.",
    );
    const dmAlongY = ` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 1, 0)) on Cu -> Cu + (1)\n`;
    expect(message(`${dmAlongY} expect u1 about (1, 0, 0)`)).toBe(
      "The file expects U(1) about (1, 0, 0), but the conserved axis is (0, 1, 0). Write 'expect u1 about (0, 1, 0)'.",
    );
    expect(message(`${dmAlongY} expect u1 about (0, 0, 1)`)).toBe(
      "The file expects U(1) about (0, 0, 1), but the conserved axis is (0, 1, 0). Write 'expect u1 about (0, 1, 0)'.",
    );
    expect(message(`${dmAlongY} expect none`)).toMatch(/^The Hamiltonian without the field has U\(1\) about \(0, 1, 0\), more than 'expect none' claims/);
    expect(message(`${dmAlongY} expect su2`)).toMatch(/^The file expects SU\(2\), but without the field the Hamiltonian has U\(1\) about \(0, 1, 0\)\./);
    expect(message(` exchange heisenberg(1 meV) on shell 1\n expect u1 about (0, 0, 1)`)).toMatch(/^The Hamiltonian without the field has SU\(2\), more than/);
    expect(message(` exchange xyz(1 meV, 0.5 meV, 0.2 meV) on shell 1\n expect u1 about (0, 0, 1)`)).toMatch(
      /^The file expects U\(1\) about \(0, 0, 1\), but without the field the Hamiltonian has no continuous spin-rotation symmetry\./,
    );
  });

  it("a correct claim gives no diagnostic", () => {
    const { a } = analyze(` exchange xxz(1 meV, 0.5) on shell 1\n expect u1 about (0, 0, -1)`);
    expect(a.diagnostics.filter((d) => d.code.startsWith("spw-expect"))).toEqual([]);
  });
});

describe("bond orientation", () => {
  // docs/format.md: `A -> B + (n)` is S_A(cell 0) . J . S_B(cell n), and `B -> A + (-n)` is the same
  // bond seen from its other end. S_a . J . S_b = S_b . J^T . S_a for operators on different
  // sites (derivable), so the stored canonical bond must carry J^T when it was written reversed.
  const chainOf = (body: string) =>
    analyzeDocument(`model "m" {\n spin 1/2\n convention antiferro-positive\n lattice chain sites V\n cluster 6 periodic\n${body}\n}\n`);

  it("a DM term written from the other end with the opposite matrix cancels the first: SU(2)", () => {
    const a = chainOf(
      " exchange heisenberg(10 K) on V -> V + (1)\n exchange dm(1 K, (0, 0, 1)) on V -> V + (1)\n exchange matrix([[0 K, 1 K, 0 K], [-1 K, 0 K, 0 K], [0 K, 0 K, 0 K]]) on V -> V + (-1)",
    );
    expect(a.physics?.symmetry.h0).toBe("su2");
    const cluster = buildFiniteCluster(a.model!, [6]);
    if (!cluster.ok) throw new Error("no cluster");
    // Every bond's DM parts cancel pair by pair: the summed matrix of each pair is symmetric.
    const sums = new Map<string, number[][]>();
    for (const b of cluster.value.cluster.bonds) {
      const key = b.i < b.j ? `${b.i}:${b.j}` : `${b.j}:${b.i}`;
      const m = b.i < b.j ? b.matrix : b.matrix.map((_, r) => b.matrix.map((row) => row[r]!));
      const acc = sums.get(key) ?? [[0, 0, 0], [0, 0, 0], [0, 0, 0]];
      m.forEach((row, r) => row.forEach((x, c) => (acc[r]![c]! += x)));
      sums.set(key, acc);
    }
    for (const m of sums.values()) expect(Math.abs(m[0]![1]! - m[1]![0]!)).toBeLessThan(1e-15);
  });

  it("dm(-D) written from the other end is dm(D): same symmetry, chain couplings and cluster", () => {
    const field = "\n g V = 2\n field 5 T along (0, 0, 1)";
    const forward = chainOf(` exchange heisenberg(10 K) on V -> V + (1)\n exchange dm(1 K, (0, 0, 1)) on V -> V + (1)${field}`);
    const backward = chainOf(` exchange heisenberg(10 K) on V -> V + (1)\n exchange dm(-1 K, (0, 0, 1)) on V -> V + (-1)${field}`);
    expect(backward.physics?.symmetry.h0).toBe(forward.physics?.symmetry.h0);
    expect(backward.physics?.predictions.couplings).toEqual(forward.physics?.predictions.couplings);
    expect(forward.physics?.predictions.couplings?.dmMeV).toBeGreaterThan(0);
    const cf = buildFiniteCluster(forward.model!, [6]);
    const cb = buildFiniteCluster(backward.model!, [6]);
    if (!cf.ok || !cb.ok) throw new Error("no cluster");
    expect(cb.value.cluster.bonds).toEqual(cf.value.cluster.bonds);
  });
});

describe("conventions and frustration", () => {
  it("labels couplings under each convention", () => {
    const af = analyze(` let J1 = 1 meV\n let J2 = -0.3 meV\n exchange heisenberg(J1) on shell 1\n exchange heisenberg(J2) on shell 2`);
    expect(af.p.couplings.map((c) => [c.name, c.character])).toEqual([["J1", "antiferro"], ["J2", "ferro"]]);
    const f = analyze(` let J1 = 1 meV\n exchange heisenberg(J1) on shell 1`, "spin 1/2\n convention ferro-positive\n lattice chain sites Cu");
    expect(f.p.couplings[0]?.character).toBe("ferro");
  });

  // Frustration: a cycle with an odd number of antiferromagnetic bonds (derivable).
  const chain = (j1: string, j2: string) => analyze(` exchange heisenberg(${j1}) on shell 1\n exchange heisenberg(${j2}) on shell 2`).p.frustration;
  it("J1-J2 chain: AF/AF frustrated, F/AF frustrated, AF/F not", () => {
    expect(chain("1 meV", "0.3 meV").map((g) => [g.cycle, g.frustrated])).toEqual([["triangle J1-J1-J2".replace(/J1|J2/g, (m) => (m === "J1" ? "heisenberg #1" : "heisenberg #2")), true]]);
    expect(chain("-1 meV", "0.3 meV")[0]?.frustrated).toBe(true);
    expect(chain("1 meV", "-0.3 meV")[0]?.frustrated).toBe(false);
  });

  it("counts the cycles of each kind per unit cell (derivable by hand on each lattice)", () => {
    const perCell = (body: string, lattice: string) =>
      Object.fromEntries(analyze(body, `spin 1/2\n convention antiferro-positive\n lattice ${lattice}`).p.frustration.map((g) => [g.cycle, [g.perCell, g.complete]]));
    // Chain J1-J2: one triangle (i, i+1, i+2) per site.
    expect(Object.values(perCell(` exchange heisenberg(1 meV) on shell 1\n exchange heisenberg(0.3 meV) on shell 2`, "chain sites Cu"))).toEqual([[1, true]]);
    // Triangular: two nearest-neighbour triangles per site (up and down); with J2 (distance sqrt 3),
    // each of the 3 J2 bonds per site closes two J1-J1-J2 triangles (6 per site), and the J2 bonds
    // form triangles of their own, again 2 per site.
    expect(perCell(` let J1 = 1 meV\n let J2 = 0.1 meV\n exchange heisenberg(J1) on shell 1\n exchange heisenberg(J2) on shell 2`, "triangular")).toEqual({
      "triangle J1-J1-J1": [2, true],
      "triangle J1-J1-J2": [6, true],
      "triangle J2-J2-J2": [2, true],
    });
    // Kagome: three sites per cell, one up and one down triangle per cell.
    expect(perCell(` let J = 1 meV\n exchange heisenberg(J) on shell 1`, "kagome")).toEqual({ "triangle J-J-J": [2, true] });
    // A chain with second-neighbour exchange alone (the first-neighbour DM term has no isotropic
    // part) is two decoupled chains: no loop at all, only rings the periodic cluster closes.
    expect(perCell(` exchange dm(0.3 meV, (0, 0, 1)) on shell 1\n exchange heisenberg(1 meV) on shell 2`, "chain sites Cu")).toEqual({});
    // Square lattice with first and second neighbours: each diagonal closes two J1-J1-J2
    // triangles, and there are two diagonals per cell (4 per cell).
    expect(perCell(` let J1 = 1 meV\n let J2 = 0.3 meV\n exchange heisenberg(J1) on shell 1\n exchange heisenberg(J2) on shell 2`, "square")).toEqual({ "triangle J1-J1-J2": [4, true] });
  });

  it("two terms on one bond count by their sum: the sign of the sum, not of each term, decides (derivable)", () => {
    // J2 written as an AF heisenberg term plus an F isotropic xxz term on the same second-neighbour
    // bond: the bond is AF when the sum is positive. Both files give each term the same sign, so
    // the answer must not come from a cache keyed on the signs of the terms.
    const split = (jb: string) =>
      analyze(` exchange heisenberg(1 meV) on shell 1\n exchange heisenberg(0.5 meV) on shell 2\n exchange xxz(${jb}, 1) on shell 2`).p.frustration;
    expect(split("-0.2 meV")[0]?.frustrated).toBe(true);
    expect(split("-0.8 meV")[0]?.frustrated).toBe(false);
    expect(split("-0.2 meV")[0]?.frustrated).toBe(true);
  });

  it("names a bond several terms sum on in parentheses, so that '-' only separates bonds", () => {
    const { p } = analyze(` let J1 = 1 meV\n let J2 = 0.4 meV\n exchange heisenberg(J1) on shell 1\n exchange dm(0.1 * J1, (0, 0, 1)) on Cu -> Cu + (1)\n exchange heisenberg(J2) on shell 2`);
    expect(p.frustration.map((g) => g.cycle)).toEqual(["triangle (J1 + dm #2)-(J1 + dm #2)-J2"]);
  });

  it("typing a value into a coupling keeps the frustration answer only while every summed sign stays", () => {
    // The same check edit by edit, each analysis built on the one before (the build hands out the
    // same bonds and labels, so only the signs decide whether the last answer stands).
    const text = (jb: string) =>
      `model "m" {\n spin 1/2\n convention antiferro-positive\n lattice chain sites Cu\n let Jb = ${jb}\n exchange heisenberg(1 meV) on shell 1\n exchange heisenberg(0.5 meV) on shell 2\n exchange xxz(Jb, 1) on shell 2\n}\n`;
    const values = ["-0.3 meV", "-0.8 meV", "-0.9 meV", "-0.4 meV", "-0.45 meV", "-0.6 meV"];
    const fresh = values.map((jb) => analyzeDocument(text(jb)).physics?.frustration[0]?.frustrated);
    expect(fresh).toEqual([true, false, false, true, true, false]);
    // No fresh analysis in between: each edit meets the last answer of the chain itself.
    let a = analyzeDocument(text("-0.2 meV"));
    const typed = values.map((jb) => {
      a = analyzeDocument(text(jb), { previous: a });
      return a.physics?.frustration[0]?.frustrated;
    });
    expect(typed).toEqual(fresh);
  });

  it("triangular and kagome triangles are frustrated; the plain square lattice is not; square with J2 is", () => {
    const lat = (l: string, extra = "") => analyze(` exchange heisenberg(1 meV) on shell 1\n${extra}`, `spin 1/2\n convention antiferro-positive\n lattice ${l}`).p.frustration;
    expect(lat("triangular").every((g) => g.frustrated && g.length === 3)).toBe(true);
    expect(lat("kagome").every((g) => g.frustrated && g.length === 3)).toBe(true);
    expect(lat("square").every((g) => g.frustrated === false && g.length === 4)).toBe(true);
    expect(lat("square", " exchange heisenberg(0.5 meV) on shell 2").some((g) => g.frustrated && g.length === 3)).toBe(true);
  });

  it("a square lattice with only one bond direction draws a coordination warning", () => {
    const { a } = analyze(` exchange heisenberg(1 meV) on A -> A + (1, 0)`, "spin 1/2\n convention antiferro-positive\n lattice square");
    expect(a.diagnostics.map((d) => d.code)).toContain("spw-coordination");
  });
});

describe("coupling summaries", () => {
  it("report the parts of each coupling, with rounding as zero", () => {
    // heisenberg(J) is J times the identity: 3.2 meV leaves a traceless part of about 1e-15 meV
    // in floating point. xxz(J, delta) = diag(J, J, J delta) has the traceless part
    // J (1 - delta)/3 diag(1, 1, -2), of norm |J (1 - delta)| sqrt(6)/3 (derivable).
    const { p } = analyze(` exchange heisenberg(3.2 meV) on shell 1\n exchange xxz(1 meV, 0.5) on shell 2`);
    const [h, x] = p.couplings;
    expect([h?.dmMeV, h?.anisotropicMeV]).toEqual([0, 0]);
    expect(x?.dmMeV).toBe(0);
    expect(x?.anisotropicMeV).toBeCloseTo((0.5 * Math.sqrt(6)) / 3, 12);
  });

  it("follow the tolerance when another coupling changes the scale", () => {
    // The xxz term's traceless part is about 8e-12 meV: above 1e-12 of a 1 meV scale, rounding
    // at a 100 meV scale. Its term is handed over unchanged when only J changes.
    const text = (j: string): string => `model "m" {\n spin 1/2\n lattice chain sites Cu\n let J = ${j}\n exchange heisenberg(J) on shell 1\n exchange xxz(0.01 meV, 1.000000001) on shell 2\n}\n`;
    let a = analyzeDocument(text("1 meV"));
    expect(a.physics?.couplings[1]?.anisotropicMeV).toBeGreaterThan(0);
    a = analyzeDocument(text("100 meV"), { previous: a });
    expect(a.physics?.couplings[1]?.anisotropicMeV).toBe(0);
    a = analyzeDocument(text("1 meV"), { previous: a });
    expect(a.physics?.couplings[1]?.anisotropicMeV).toBeGreaterThan(0);
  });
});

describe("stability regions", () => {
  const place = (ratio: number) => analyze(` let J1 = 1 meV\n exchange heisenberg(J1) on shell 1\n exchange heisenberg(${ratio} * J1) on shell 2`).p.family.placement;
  it("J1-J2 chain below and above J2c = 0.2411 J1 (Okamoto & Nomura, Phys. Lett. A 169, 433 (1992))", () => {
    expect(place(0.23)?.gapless).toBe(true);
    expect(place(0.23)?.boundary?.value).toBe(0.2411);
    expect(place(0.23)?.distance).toBeCloseTo(0.23 / 0.2411 - 1, 12);
    expect(place(0.3)?.gapless).toBe(false);
    expect(place(0.2411)?.onBoundary).toBe(true);
  });

  it("the Majumdar-Ghosh point J2 = J1/2 (Majumdar & Ghosh, J. Math. Phys. 10, 1388 (1969))", () => {
    expect(place(0.5)?.onBoundary).toBe(true);
    expect(place(0.5)?.boundary?.value).toBe(0.5);
  });

  it("XXZ chain regimes from the Bethe ansatz", () => {
    const xxz = (d: number) => analyze(` exchange xxz(1 meV, ${d}) on shell 1`).p.family.placement;
    expect(xxz(0.5)?.gapless).toBe(true);
    expect(xxz(1.5)?.gapless).toBe(false);
    expect(xxz(-1.5)?.family).toBe("xxz-chain");
  });

  it("a chain with DM matches no tabulated family and says why", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)`);
    expect(p.family.placement).toBeNull();
    expect(p.family.description).toMatch(/no tabulated/);
  });

  it("a spin-1 square model says that the square phase diagrams are tabulated for spin 1/2", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange heisenberg(0.3 meV) on shell 2`, "spin 1\n convention antiferro-positive\n lattice square");
    expect(p.family.placement).toBeNull();
    expect(p.family.description).toBe("a spin-1 square model: the tabulated square phase diagrams are for spin 1/2");
  });

  it("triangular J1-J2 uses the classical boundary 1/8 (derivable classical minimum)", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange heisenberg(0.05 meV) on shell 2`, "spin 1/2\n convention antiferro-positive\n lattice triangular");
    expect(p.family.placement?.family).toBe("triangular-j1j2");
    expect(p.family.placement?.boundary?.value).toBe(0.125);
  });
});

describe("the zero-momentum resonance", () => {
  it("g = 2 at 1 T: 27.99 GHz, 0.1158 meV, 1.3434 K, 0.9337 cm^-1 (CODATA 2018)", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n g Cu = 2\n field 1 T`);
    expect(p.resonance.zeemanGHz).toBeCloseTo(27.99249, 4);
    expect(p.resonance.zeemanMeV).toBeCloseTo(0.115768, 6);
    expect(p.resonance.zeemanK).toBeCloseTo(1.343428, 5);
    expect(p.resonance.zeemanCm).toBeCloseTo(0.933729, 5);
  });

  it("gives the resonance field of the probe frequency: 9.8 GHz at g = 2 is 0.35006 T (CODATA 2018)", () => {
    const { p } = analyze(` exchange heisenberg(1 meV) on shell 1\n g Cu = 2\n field 1 T\n probe 9.8 GHz`);
    expect(p.resonance.probe?.resonanceFieldT).toBeCloseTo(9.8 / (2 * 13.9962449361), 8);
  });

  it("uniform DM parallel to the field on a chain flags the doublet with tan theta = D/J", () => {
    const { p, a } = analyze(` exchange heisenberg(1 meV) on shell 1\n exchange dm(0.1 meV, (0, 0, 1)) on Cu -> Cu + (1)\n field 3 T along (0, 0, 1)`);
    expect(p.resonance.protected).toBe(false);
    expect(p.resonance.dmDoublet?.theta).toBeCloseTo(Math.atan(0.1), 12);
    expect(a.diagnostics.find((d) => d.code === "spw-resonance-unprotected")?.related?.length).toBe(1);
  });
});

describe("sentences about breaking terms", () => {
  // The numbers are the model's own, in meV (the analysis's canonical unit), to four significant
  // digits: xxz(J, delta) about z is diag(J, J, J delta), so its principal values are J delta, J, J
  // (derivable); D in a single-ion term is the D of D (S.n)^2 as written.
  it("name their numbers with the unit, without trailing zeros", () => {
    const { p } = analyze(` let J = 1.5 meV\n exchange xxz(J, 0.6) on shell 1`);
    expect(p.symmetry.breaking[0]?.consequence).toContain("about n = (0, 0, 1) (principal values 0.9, 1.5, 1.5 meV)");
    const spin1 = analyze(` let J = 3.2 meV\n exchange heisenberg(J) on shell 1\n anisotropy Cu D = 0.8 meV axis (0, 0, 1)`, "spin 1\n convention antiferro-positive\n lattice chain sites Cu");
    expect(spin1.p.symmetry.breaking[0]?.consequence).toContain("(D = 0.8 meV, n = (0, 0, 1))");
  });

  it("stand alone as the notes of the unprotected-resonance diagnostic, which gives its reason in one clause", () => {
    const { a, p } = analyze(` let J = 1 meV\n exchange heisenberg(J) on shell 1\n exchange dm(0.05 * J, (0, 0, 1)) on shell 1\n g Cu = 2\n field 2 T along (0, 0, 1)`);
    const d = a.diagnostics.find((x) => x.code === "spw-resonance-unprotected");
    expect(d?.message.startsWith("The q = 0 resonance is not pinned at the Zeeman energy because H0 is not SU(2)-symmetric: it may shift")).toBe(true);
    expect(d?.related?.map((r) => r.message)).toEqual(p.symmetry.breaking.map((b) => b.consequence));
    expect(d?.related?.[0]?.message.startsWith("A DM vector breaks SU(2)")).toBe(true);
  });
});
