// The shared SVG renderer: well-formed, carries the data it claims (Larmor line at the Zeeman
// energy, both branches, m(h) with the file's field), and says why when a panel has no data.
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../server/src/analysis/analyze";
import { renderPlotSvg } from "../server/src/render/plot";

const sample = (f: string) => analyzeDocument(readFileSync(join(__dirname, "..", "samples", f), "utf8"));

function wellFormed(svg: string): void {
  expect(svg.startsWith("<svg ")).toBe(true);
  expect(svg.trim().endsWith("</svg>")).toBe(true);
  expect(svg).not.toMatch(/NaN|undefined|Infinity/);
  // Every opened element is closed (self-closing or paired).
  const opened = (svg.match(/<(svg|text|style|title|defs|clipPath)\b/g) ?? []).length;
  const closed = (svg.match(/<\/(svg|text|style|title|defs|clipPath)>/g) ?? []).length;
  expect(closed).toBe(opened);
}

describe("renderPlotSvg", () => {
  it("draws the Heisenberg chain's branches, the Larmor line at h and m(h)", () => {
    const a = sample("heisenberg-chain-field.spw");
    const svg = renderPlotSvg(a);
    wellFormed(svg);
    const h = a.physics?.resonance.zeemanMeV as number;
    expect(svg).toContain(`Larmor h = ${Number(h.toPrecision(4))} meV`);
    expect((svg.match(/stroke="#1f77b4" stroke-width/g) ?? []).length).toBeGreaterThan(20);
    expect((svg.match(/stroke="#d62728" stroke-width/g) ?? []).length).toBeGreaterThan(20);
    expect(svg).toContain("file's field");
  });

  it("overlays exact poles when given", () => {
    const svg = renderPlotSvg(sample("heisenberg-chain-field.spw"), { poles: [{ qOverPi: 0.01, energyMeV: 0.4, weight: 0.05 }] });
    expect(svg).toMatch(/<circle [^>]*stroke="#2ca02c"/);
  });

  it("keys the lattice sketch by colour and keeps two terms on one bond apart", () => {
    // dm-chain.spw: J and D on the same nearest-neighbour bonds. Each name is written in its
    // term's colour as an inline style (a fill attribute loses to the stylesheet's text colour),
    // and the second term's bonds are shifted sideways instead of drawn over the first's.
    const svg = renderPlotSvg(sample("dm-chain.spw"));
    wellFormed(svg);
    expect(svg).toMatch(/<text [^>]*style="fill:#1f77b4" class="legend">J<\/text>/);
    expect(svg).toMatch(/<text [^>]*style="fill:#d62728" class="legend">D<\/text>/);
    const starts = (color: string): string[] => [...svg.matchAll(new RegExp(`<path d="M([0-9.-]+,[0-9.-]+) Q[^"]*" fill="none" stroke="${color}"`, "g"))].map((x) => x[1]!);
    const j = starts("#1f77b4");
    const d = starts("#d62728");
    expect(j.length).toBe(3);
    expect(d.length).toBe(3);
    expect(d.filter((p) => j.includes(p))).toEqual([]);
  });

  it("explains a missing panel instead of drawing an empty curve", () => {
    const svg = renderPlotSvg(sample("triangular-j1j2.spw"));
    wellFormed(svg);
    expect(svg).toContain("implemented for chains");
  });
});
