// Readable lines for the field-dependent predictions, each number with its method or the reason
// it is missing: used by hovers, the preview and `spinwright report`. Service layer.
import type { Predictions } from "../analysis/predictions";
import { formatNumber as fmt } from "./common";

export function predictionLines(p: Predictions, options: { sweep?: boolean } = {}): string[] {
  const out: string[] = [];
  if (!p.applicable) {
    out.push(`not available: ${p.reason}`);
    return out;
  }
  const val = (v: { value: number | null; method: string; reason: string | null }, unit: string): string =>
    v.value === null ? `not available: ${v.reason}` : `${fmt(v.value)}${unit} [${v.method}]`;
  out.push(p.magnetization.value === null ? `magnetization m: ${val(p.magnetization, "")}` : `magnetization m = ${val(p.magnetization, " per site")}`);
  out.push(`saturation: ${val(p.saturationMeV, " meV")}${p.saturationFieldT !== null ? ` = ${fmt(p.saturationFieldT)} T along the field` : ""}`);
  out.push(`velocity: ${val(p.velocityMeV, " meV x lattice spacing")}`);
  // The regime is set by m alone (docs/analysis.md); whether its formulas apply is said per line below.
  if (p.regime) out.push(`regime by magnetization: ${p.regime}`);
  const b = p.branches;
  if (b.valid && b.splittingMeV !== null)
    out.push(`q = 0 branches: Larmor line at ${fmt(b.lowerAtZeroMeV ?? 0)} meV (all the weight), second branch at ${fmt(b.upperAtZeroMeV ?? 0)} meV; splitting ${fmt(b.splittingMeV)} meV = ${fmt(b.splittingOverZeeman ?? 0)} h [${b.method}]`);
  else out.push(`q = 0 branches: no splitting given: ${b.reason}`);
  // Other methods under the line; the one the line already quotes is not repeated.
  for (const alt of b.alternatives) if (!(b.valid && b.splittingMeV !== null && b.method.startsWith(alt.method) && alt.splittingMeV === b.splittingMeV)) out.push(`  ${alt.method}: ${alt.splittingMeV === null ? "n/a" : `${fmt(alt.splittingMeV)} meV`}${alt.valid ? "" : ` (outside its validity: ${alt.note})`}`);
  const n = p.nearSaturation;
  out.push(n.valid && n.upperAtZeroMeV !== null ? `near saturation: bound-state branch at ${fmt(n.upperAtZeroMeV)} meV at q = 0 [${n.method}]; ${n.weight}` : `near saturation: ${n.reason}`);
  const d = p.dmDoublet;
  if (d) {
    if (d.lowerMeV !== null && d.upperMeV !== null)
      out.push(
        `DM doublet: ${fmt(d.lowerMeV)} meV (weight ${fmt(d.lowerWeightFraction ?? 0)}) and ${fmt(d.upperMeV)} meV (weight ${fmt(d.upperWeightFraction ?? 0)}); textbook h ± (π/2) D: ${fmt(d.naiveLowerMeV ?? 0)} and ${fmt(d.naiveUpperMeV ?? 0)} meV${d.valid ? "" : ` (${d.reason})`} [${d.method}]`,
      );
    else out.push(`DM doublet: ${d.reason}`);
  }
  if (p.sweep.length && options.sweep !== false) {
    out.push(`field sweep (B in T, h in meV, m per site [${p.sweep[0]?.method ?? ""}], splitting Δ in meV):`);
    for (const s of p.sweep) out.push(`  B = ${fmt(s.fieldT).padEnd(8)} h = ${fmt(s.zeemanMeV).padEnd(10)} m = ${s.m === null ? "n/a" : fmt(s.m).padEnd(10)} Δ = ${s.splittingMeV === null ? "n/a" : `${fmt(s.splittingMeV).padEnd(10)} (${s.splittingMethod})`}`);
  }
  return out;
}

/**
 * Lines as a Markdown list: a line indented by two spaces (an alternative method under the line
 * before it) becomes a nested item.
 */
export function markdownList(lines: readonly string[]): string {
  return lines.map((l) => (l.startsWith("  ") ? `  - ${l.trimStart()}` : `- ${l}`)).join("\n");
}
