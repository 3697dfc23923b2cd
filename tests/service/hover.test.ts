// Hover at the service boundary: parameter values in the written unit and in meV, K, GHz; the
// Zeeman energy g muB B in meV, GHz, K, cm^-1 with g along the field from the site g-tensor.
// Reference numbers come from the SI/CODATA 2018 constants written out below, not from units.ts.
import { describe, expect, it } from "vitest";
import { doHover } from "../../server/src/service/hover";
import { analyzeMarked, CHAIN, LADDER } from "./fixtures";

// CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)); kB, h, e exact in the SI.
const KB_J_PER_K = 1.380649e-23;
const H_J_S = 6.62607015e-34;
const E_C = 1.602176634e-19;
const MU_B_EV_PER_T = 5.788381806e-5;
const MU_B_GHZ_PER_T = 13.9962449361;
const MU_B_K_PER_T = 0.67171381563;
const MU_B_CM_PER_T = 0.466864478;
const MEV_PER_K = (KB_J_PER_K / E_C) * 1e3;
const GHZ_PER_K = KB_J_PER_K / H_J_S / 1e9;

function hoverAt(source: string): string {
  const { a, offset } = analyzeMarked(source);
  const h = doHover(a, offset);
  if (!h) throw new Error("no hover");
  return h.markdown;
}

/** The number printed before `unit` (first occurrence after `from`). */
function numberBefore(text: string, unit: string, from = 0): number {
  const re = new RegExp(`(-?[0-9][0-9.e+-]*) ${unit.replace(/[\^]/g, "\\^")}(?![A-Za-z])`, "g");
  re.lastIndex = from;
  const m = re.exec(text);
  if (!m?.[1]) throw new Error(`no value in ${unit} in: ${text}`);
  return Number(m[1]);
}

/** Hovers print 5 significant digits: a relative tolerance of 1e-4 covers the rounding. */
function expectRelClose(actual: number, expected: number, rel = 1e-4): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(rel * Math.abs(expected));
}

describe("hover on a parameter", () => {
  it("shows the value in the written unit and in meV, K and GHz", () => {
    const text = hoverAt(CHAIN.replace("heisenberg(J1)", "heisenberg(J$01)"));
    expect(text).toContain("**J1**");
    expect(numberBefore(text, "K")).toBeCloseTo(14.2, 10);
    // 14.2 K in meV and GHz from kB/e and kB/h (exact SI constants).
    expectRelClose(numberBefore(text, "meV"), 14.2 * MEV_PER_K);
    expectRelClose(numberBefore(text, "GHz"), 14.2 * GHZ_PER_K);
    expect(text).toContain("CODATA 2018");
  });

  it("follows a parameter defined through another one (0.18 * J1 in kelvin)", () => {
    const text = hoverAt(CHAIN.replace("let J2 = 0.18", "let J$02 = 0.18"));
    expectRelClose(numberBefore(text, "K"), 0.18 * 14.2);
    expectRelClose(numberBefore(text, "meV"), 0.18 * 14.2 * MEV_PER_K);
  });

  it("is the same on the definition and on a use", () => {
    const onUse = hoverAt(CHAIN.replace("heisenberg(J1)", "heisenberg(J1$0)"));
    const onDef = hoverAt(CHAIN.replace("let J1 =", "let $0J1 ="));
    expect(onUse).toBe(onDef);
  });
});

describe("hover on the field", () => {
  it("gives the Zeeman energy g muB B in meV, GHz, K and cm^-1", () => {
    const text = hoverAt(CHAIN.replace("field 3.5 T", "fi$0eld 3.5 T"));
    const g = 2.06;
    const fieldT = 3.5;
    // E_Z = g muB B (physics-notes section 2), muB from CODATA 2018 in each unit.
    expectRelClose(numberBefore(text, "meV"), g * fieldT * MU_B_EV_PER_T * 1e3);
    expectRelClose(numberBefore(text, "GHz"), g * fieldT * MU_B_GHZ_PER_T);
    expectRelClose(numberBefore(text, "K"), g * fieldT * MU_B_K_PER_T);
    expectRelClose(numberBefore(text, "cm^-1"), g * fieldT * MU_B_CM_PER_T);
  });

  it("takes g along the field from the g-tensor of each site", () => {
    const text = hoverAt(LADDER.replace("field 2 T", "field 2$0 T"));
    // n = (1, 0, 1)/sqrt(2); g_A = diag(2, 2, 2.2): |g^T n| = sqrt((2^2 + 2.2^2) / 2); g_B = 2.
    const gA = Math.sqrt((2 ** 2 + 2.2 ** 2) / 2);
    const lineA = text.split("\n").find((l) => l.startsWith("- A:"));
    const lineB = text.split("\n").find((l) => l.startsWith("- B:"));
    if (!lineA || !lineB) throw new Error(`no per-site lines in: ${text}`);
    expectRelClose(Number(/g = ([0-9.]+)/.exec(lineA)?.[1]), gA);
    expectRelClose(numberBefore(lineA, "meV"), gA * 2 * MU_B_EV_PER_T * 1e3);
    expectRelClose(numberBefore(lineB, "GHz"), 2 * 2 * MU_B_GHZ_PER_T);
  });
});

describe("other hovers", () => {
  it("shows a site's spin and g", () => {
    const text = hoverAt(CHAIN.replace("g Cu = 2.06", "g C$0u = 2.06"));
    expect(text).toContain("**Cu**");
    expect(text).toContain("S = 1/2");
    expect(text).toContain("g = 2.06");
  });

  it("shows the exchange matrix after the convention", () => {
    const text = hoverAt(CHAIN.replace("exchange heisenberg(J1)", "exchange heis$0enberg(J1)"));
    expect(text).toContain("heisenberg(J)");
    // The diagonal holds J1 = 14.2 K in meV, printed with 4 digits.
    expect(text).toContain((14.2 * MEV_PER_K).toPrecision(4));
  });

  it("converts a number with a unit", () => {
    const text = hoverAt(CHAIN.replace("D = 0.5 K", "D = 0.5$0 K"));
    expectRelClose(numberBefore(text, "meV"), 0.5 * MEV_PER_K);
  });

  it("says that a number beyond the double range is too large instead of converting Infinity", () => {
    const text = hoverAt(CHAIN.replace("let J1 = 14.2 K", "let J1 = 1e4$000 K"));
    expect(text).toContain("1e400** is too large to represent");
    expect(text).not.toMatch(/Infinity/);
  });

  it("says nothing inside a comment", () => {
    const { a, offset } = analyzeMarked(CHAIN.replace("Invented scenario", "Invented sc$0enario"));
    expect(doHover(a, offset)).toBeNull();
  });
});

describe("hover on the field and the symmetry claim: predictions and computed symmetry", () => {
  const HEISENBERG = `model "h" {
  convention antiferro-positive
  lattice chain sites Cu
  let J = 1 meV
  exchange heisenberg(J) on shell 1
  g Cu = 2
  fie$0ld 0.5 T along (0, 0, 1)
  expect su2
}`;

  it("the field hover lists the q = 0 branches with their method (Bethe ansatz m, field-theory splitting)", () => {
    const md = hoverAt(HEISENBERG);
    expect(md).toMatch(/Predicted near q = 0/);
    expect(md).toMatch(/Larmor line at [0-9.]+ meV/);
    expect(md).toMatch(/leading-order field theory/);
    expect(md).toMatch(/Bethe ansatz/);
  });

  it("the field hover says whether the q = 0 line is protected, and why (Larmor theorem)", () => {
    expect(hoverAt(HEISENBERG)).toMatch(/by the Larmor theorem the q = 0 resonance sits exactly at the Zeeman energy/);
    const dm = hoverAt(HEISENBERG.replace("g Cu = 2", "exchange dm(0.05 * J, (0, 0, 1)) on Cu -> Cu + (1)\n  g Cu = 2"));
    expect(dm).toMatch(/q = 0 resonance is not protected because H0 is not SU\(2\)-symmetric/);
  });

  it("the method a splitting line quotes is not listed again under it", () => {
    const md = hoverAt(HEISENBERG);
    expect(md).toMatch(/splitting [0-9.]+ meV = [0-9.]+ h \[leading-order field theory/);
    expect(md).not.toMatch(/\n  - leading-order field theory/);
  });

  it("an alternative method under a prediction is a nested list item", () => {
    const md = hoverAt(HEISENBERG.replace("0.5 T", "6 T"));
    // Each line of the predictions is a list item; a method listed under the line before it is nested.
    expect(md).toMatch(/\n  - leading-order field theory/);
    expect(md).not.toMatch(/\n- {2,}/);
  });

  it("the field hover of a DM chain says why no splitting is given and shows the doublet", () => {
    const md = hoverAt(HEISENBERG.replace("g Cu = 2", "exchange dm(0.05 * J, (0, 0, 1)) on Cu -> Cu + (1)\n  g Cu = 2").replace("0.5 T", "6 T"));
    expect(md).toMatch(/DM doublet/);
    expect(md).toMatch(/run the exact check/);
  });

  it("the field hover links to each term that breaks the protection, by line", () => {
    // CHAIN: the DM term (line 11) breaks SU(2); the spin-1/2 anisotropy is a constant and does not.
    const { a, offset: at } = analyzeMarked(CHAIN.replace("field 3.5", "fi$0eld 3.5"));
    expect(doHover(a, at, "file:///w/chain.spw")?.markdown).toMatch(/\nBroken by:\n\n- \[line 11\]\(file:\/\/\/w\/chain\.spw#L11\): a Dzyaloshinskii-Moriya term\n/);
    expect(doHover(a, at)?.markdown).toMatch(/\n- line 11: a Dzyaloshinskii-Moriya term\n/);
    expect(a.text.split("\n")[10]).toMatch(/^ {2}exchange dm/);
    // Protected: nothing to list.
    expect(hoverAt(HEISENBERG)).not.toMatch(/Broken by/);
    // Eight DM terms: the first six, then a count.
    const many = Array.from({ length: 8 }, (_, k) => `  exchange dm(0.01 * J, (0, 0, 1)) on Cu -> Cu + (${k + 1})`).join("\n");
    const md = hoverAt(HEISENBERG.replace("  g Cu = 2", `${many}\n  g Cu = 2`));
    expect(md.match(/^- line \d+: a Dzyaloshinskii-Moriya term$/gm)?.length).toBe(6);
    expect(md).toMatch(/^- and 2 more \(each is a related location of the resonance diagnostic\)$/m);
  });

  it("the expect hover gives the computed symmetry and the breaking terms", () => {
    const md = hoverAt(HEISENBERG.replace("fie$0ld", "field").replace("expect su2", "exchange dm(0.05 * J, (0, 0, 1)) on Cu -> Cu + (1)\n  expect s$0u2"));
    expect(md).toMatch(/Computed: without the field U\(1\) about \(0, 0, 1\)/);
    expect(md).toMatch(/Dzyaloshinskii-Moriya/);
  });
  it("the expect keyword itself gives the computed symmetry too", () => {
    const md = hoverAt(HEISENBERG.replace("fie$0ld", "field").replace("expect su2", "exchange dm(0.05 * J, (0, 0, 1)) on Cu -> Cu + (1)\n  exp$0ect su2"));
    expect(md).toMatch(/\*\*expect\*\* su2/);
    expect(md).toMatch(/Computed: without the field U\(1\) about \(0, 0, 1\)/);
    expect(md).toMatch(/SU\(2\) broken in H0 by: a Dzyaloshinskii-Moriya term\./);
  });

  it("the expect hover tells terms of H0 from the field, and names each kind once", () => {
    // Two DM terms break SU(2) down to U(1) about z; a field along x breaks that U(1) but not the
    // SU(2) of H0, which has none left to break (symmetry algebra, derivable).
    const md = hoverAt(
      HEISENBERG.replace("fie$0ld", "field")
        .replace("along (0, 0, 1)", "along (1, 0, 0)")
        .replace("expect su2", "exchange dm(0.05 * J, (0, 0, 1)) on Cu -> Cu + (1)\n  exchange dm(0.02 * J, (0, 0, 1)) on Cu -> Cu + (2)\n  exp$0ect su2"),
    );
    expect(md).toMatch(/with the field no continuous spin-rotation symmetry\. SU\(2\) broken in H0 by: a Dzyaloshinskii-Moriya term\. Broken further by the field: a field transverse to the symmetry axis\.$/);
  });

  it("the model hover names the nearest phase boundary and how far the couplings are from it", () => {
    // J1-J2 chain: J2c/J1 = 0.2411 (Okamoto & Nomura, Phys. Lett. A 169, 433 (1992)); 0.23 is
    // (0.2411 - 0.23) / 0.2411 = 4.6 % below it.
    const md = hoverAt(HEISENBERG.replace("fie$0ld", "field").replace('model "h"', 'model "h$0"').replace("exchange heisenberg(J) on shell 1", "exchange heisenberg(J) on shell 1\n  exchange heisenberg(0.23 * J) on shell 2"));
    expect(md).toMatch(/nearest boundary: .*at J2\/J1 = 0\.2411/);
    expect(md).toContain(`${(((0.2411 - 0.23) / 0.2411) * 100).toFixed(1)} % below it`);
  });
  it("a coupling's hover gives its character and its share in the frustrated triangles", () => {
    // J1-J2 chain: the shortest loop is the triangle (i, i+1, i+2), two J1 bonds and one J2
    // (derivable); with both antiferromagnetic it is frustrated.
    const chainJ1J2 = HEISENBERG.replace("fie$0ld", "field").replace("exchange heisenberg(J) on shell 1", "exchange heisenberg(J) on shell 1\n  exchange heisenberg(0.3 * J) on shell 2");
    const md = hoverAt(chainJ1J2.replace("let J = 1 meV", "let $0J = 1 meV"));
    expect(md).toMatch(/antiferromagnetic, J = 1 meV/);
    // One such triangle per site, i.e. per cell of the chain (derivable).
    expect(md).toContain("triangle J-J-heisenberg #2 (1 per cell, frustrated): 2 of its 3 bonds");
    // The same numbers under the ferro-positive convention: H = -J S.S, so J > 0 is ferromagnetic.
    const ferro = hoverAt(chainJ1J2.replace("antiferro-positive", "ferro-positive").replace("let J = 1 meV", "let $0J = 1 meV"));
    expect(ferro).toMatch(/ferromagnetic, J = -1 meV/);
    expect(ferro).toMatch(/not frustrated\): 2 of its 3 bonds/);
  });
});

describe("hover after edits", () => {
  // The field hover text is kept with the physics summary the analysis hands over from the
  // version before, and with what it read when only the summary is new; after each edit it must
  // read exactly as on a fresh analysis of the same text.
  const HEISENBERG = `model "h" {\n  spin 1/2\n  lattice chain sites Cu\n  let J1 = 10.7 K\n  exchange heisenberg(J1) on Cu -> Cu + (1)\n  g Cu = 2.06\n  field 3 T along (0, 0, 1)\n}\n`;
  const steps: [string, (text: string) => string][] = [
    ["a space elsewhere", (t) => t.replace(/\n\}\s*$/, "\n  # a note\n}\n")],
    ["a new coupling value", (t) => t.replace(/let J1 = ([0-9.]+)/, (_m, v: string) => `let J1 = ${Number(v) + 2}`)],
    ["the same value again", (t) => t.replace(/let J1 = ([0-9.]+)/, (_m, v: string) => `let J1 = ${Number(v) - 2}`)],
    ["a stronger field", (t) => t.replace(/field ([0-9.]+)/, (_m, v: string) => `field ${Number(v) + 1.5}`)],
    ["another g-tensor", (t) => t.replace(/(\n\s*g [A-Za-z0-9_]+ = )([0-9.]+)/, (_m, p: string, v: string) => `${p}${Number(v) + 0.1}`)],
    ["a comment again", (t) => t.replace(/\n\}\s*$/, "\n  # another note\n}\n")],
    // Every offset stays, every line below moves: the lines the hover links to must follow.
    ["a line end in place of a space above every term", (t) => t.replace("\n  spin", "\n \nspin")],
  ];
  it.each([
    ["the J1-J2 chain with a DM term", CHAIN.replace("$0", "")],
    ["a Heisenberg chain", HEISENBERG],
  ])("the field hover equals the fresh one along a chain of edits: %s", async (_name, base) => {
    const { analyzeDocument } = await import("../../server/src/analysis/analyze");
    const texts: string[] = [];
    for (const [, edit] of steps) texts.push(edit(texts[texts.length - 1] ?? base));
    const hoverOf = (a: ReturnType<typeof analyzeDocument>): string | undefined => doHover(a, a.text.indexOf("field ") + 1)?.markdown;
    // Fresh analyses first: none of their objects may meet the chain's.
    const fresh = texts.map((t) => hoverOf(analyzeDocument(t)));
    let previous = analyzeDocument(base);
    hoverOf(previous);
    texts.forEach((text, k) => {
      previous = analyzeDocument(text, { previous });
      expect(hoverOf(previous), steps[k]![0]).toBe(fresh[k]);
    });
    // The field and g edits change the text: the cache did not hand out an old one.
    expect(new Set(fresh).size).toBeGreaterThanOrEqual(3);
  });
});
