// Inlay hints (resolved `let` values, the Zeeman energy), signature help for the exchange kinds
// and the exact-check code lens at the service boundary.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { codeLenses } from "../../server/src/service/codeLens";
import { DEFAULT_SETTINGS } from "../../server/src/service/common";
import { inlayHints } from "../../server/src/service/inlayHints";
import { signatureHelp } from "../../server/src/service/signatureHelp";
import { analyzeMarked, CHAIN } from "./fixtures";

// CODATA 2018, exact SI: kB / e = 8.617333262e-5 eV/K; muB = 5.788381806e-5 eV/T.
const MEV_PER_K = 1.380649e-23 / 1.602176634e-19 * 1e3;
const MU_B_MEV_PER_T = 5.788381806e-2;

function hintValue(label: string): number {
  return Number(/= (-?[0-9.e+-]+)/.exec(label)?.[1]);
}

describe("inlay hints", () => {
  const a = analyzeDocument(CHAIN);
  const all = { start: 0, end: CHAIN.length };

  it("shows the resolved value of each let in meV, the Zeeman energy after the field", () => {
    const hints = inlayHints(a, all, DEFAULT_SETTINGS);
    const j1 = hints.find((h) => h.offset === CHAIN.indexOf("14.2 K") + "14.2 K".length);
    expect(hintValue(j1!.label)).toBeCloseTo(14.2 * MEV_PER_K, 3);
    const j2 = hints.find((h) => h.offset === CHAIN.indexOf("0.18 * J1") + "0.18 * J1".length);
    expect(hintValue(j2!.label)).toBeCloseTo(0.18 * 14.2 * MEV_PER_K, 4);
    const zeeman = hints.find((h) => h.label.startsWith("g μB B"));
    // E_Z = g muB B with g = 2.06, B = 3.5 T (physics-notes section 2).
    expect(hintValue(zeeman!.label)).toBeCloseTo(2.06 * MU_B_MEV_PER_T * 3.5, 4);
  });

  it("uses the display unit and skips values written in it", () => {
    const hints = inlayHints(a, all, { ...DEFAULT_SETTINGS, displayUnits: "K" });
    expect(hints.some((h) => h.offset === CHAIN.indexOf("14.2 K") + "14.2 K".length)).toBe(false);
    const j2 = hints.find((h) => h.offset === CHAIN.indexOf("0.18 * J1") + "0.18 * J1".length);
    expect(j2?.label).toBe("= 2.556 K");
  });

  it("only returns hints in the requested range", () => {
    const start = CHAIN.indexOf("field");
    const hints = inlayHints(a, { start, end: start + 10 }, DEFAULT_SETTINGS);
    expect(hints.map((h) => h.label.slice(0, 6))).toEqual(["g μB B"]);
  });
});

describe("signature help", () => {
  const head = `model "m" {\n  lattice chain\n  let J = 1 meV\n`;
  const help = (line: string) => {
    const { a, offset } = analyzeMarked(`${head}  ${line}\n}\n`);
    return signatureHelp(a, offset);
  };

  it("names the active argument of xxz and switches to the three-argument form", () => {
    const two = help("exchange xxz(J, $0");
    expect(two?.signatures[two.activeSignature]?.label).toBe("xxz(J, delta)");
    expect(two?.activeParameter).toBe(1);
    const three = help("exchange xxz(J, 0.5, $0");
    expect(three?.signatures[three.activeSignature]?.label).toBe("xxz(J, delta, axis)");
    expect(three?.activeParameter).toBe(2);
  });

  it("does not count commas inside a vector or a matrix", () => {
    expect(help("exchange dm(J, (0, 0$0")?.activeParameter).toBe(1);
    const m = help("exchange matrix([[1, 0, 0], [0, 1$0");
    expect(m?.activeParameter).toBe(0);
  });

  it("is silent outside an exchange argument list", () => {
    expect(help("exchange heisenberg(J) on A -> A + (1$0")).toBeNull();
    expect(help("let x = (1, $0")).toBeNull();
  });
});

describe("code lens", () => {
  it("offers the exact check on the cluster's sites, within the limit", () => {
    const a = analyzeDocument(CHAIN);
    expect(codeLenses(a, "file:///chain.spw", DEFAULT_SETTINGS)[0]?.title).toBe("Run exact check on 16 sites");
    expect(codeLenses(a, "file:///chain.spw", { ...DEFAULT_SETTINGS, exactCheckMaxSites: 12 })[0]?.title).toContain("exceed");
    expect(codeLenses(analyzeDocument(CHAIN.replace("  cluster 16 periodic\n", "")), "file:///x", DEFAULT_SETTINGS)).toEqual([]);
  });
});
