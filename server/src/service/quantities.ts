// Physical quantities the editor shows: a parameter's value in the unit its file wrote and in
// meV, K, GHz; the Zeeman energy g muB B of every site for the file's field. Constants come from
// model/units.ts (CODATA 2018, Tiesinga et al., Rev. Mod. Phys. 2021). Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Value } from "../model/evaluate";
import type { Parameter, SpinModel } from "../model/model";
import { MU_B_MEV_PER_T, unitKey, unitInfo } from "../model/units";
import { mulMatVec3, norm3 } from "../physics/linalg3";
import type { Expr } from "../syntax/ast";
import { walkExpr } from "../syntax/ast";
import { energyText, firstModel, formatNumber } from "./common";

/** The unit a parameter's definition is written in: the first unit in its expression, found
 *  through the parameters it names when it has none of its own (`0.18 * J1` takes J1's unit). */
export function writtenUnitOf(a: DocumentAnalysis, name: string, seen: Set<string> = new Set()): string | null {
  if (seen.has(name)) return null;
  seen.add(name);
  const statement = firstModel(a)?.statements.find((s) => s.kind === "let" && s.name.name === name);
  if (!statement || statement.kind !== "let") return null;
  return unitOfExpr(a, statement.value, seen);
}

function unitOfExpr(a: DocumentAnalysis, e: Expr, seen: Set<string>): string | null {
  let unit: string | null = null;
  const names: string[] = [];
  walkExpr(e, (x) => {
    if (unit) return;
    if (x.kind === "number" && x.unit) {
      const key = unitKey(x.unit.name, x.unit.power);
      if (unitInfo(key)) unit = key;
    } else if (x.kind === "name") names.push(x.name);
  });
  if (unit) return unit;
  for (const n of names) {
    const u = writtenUnitOf(a, n, seen);
    if (u) return u;
  }
  return null;
}

export type QuantityKind = "energy" | "field" | "dimensionless" | "other";

export function quantityKind(v: Value): QuantityKind {
  if (v.energy === 1 && v.field === 0) return "energy";
  if (v.energy === 0 && v.field === 1) return "field";
  if (v.energy === 0 && v.field === 0) return "dimensionless";
  return "other";
}

/** Energy conversions shown for every energy: the written unit first, then meV, K, GHz. */
export function energyConversions(valueMeV: number, writtenUnit: string | null): string[] {
  const units = [writtenUnit, "meV", "K", "GHz"].filter((u, k, all): u is string => !!u && unitInfo(u)?.dimension === "energy" && all.indexOf(u) === k);
  return units.map((u) => energyText(valueMeV, u));
}

/** One line of text for a parameter's value, or null when it has none. */
export function parameterValueText(a: DocumentAnalysis, p: Parameter): string | null {
  const v = p.value;
  if (!v) return null;
  const kind = quantityKind(v);
  const scalar = v.shape.length === 0 || (v.shape.length === 1 && v.shape[0] === 1);
  if (scalar) {
    const x = v.data[0] ?? 0;
    if (kind === "energy") return energyConversions(x, writtenUnitOf(a, p.name)).join(" = ");
    if (kind === "field") {
      const unit = writtenUnitOf(a, p.name);
      const u = unit ? unitInfo(unit) : undefined;
      return u && u.dimension === "field" && unit !== "T" ? `${formatNumber(x / u.toCanonical)} ${unit} = ${formatNumber(x)} T` : `${formatNumber(x)} T`;
    }
    if (kind === "dimensionless") return formatNumber(x);
  }
  const unit = kind === "energy" ? " meV" : kind === "field" ? " T" : kind === "dimensionless" ? "" : ` (meV^${v.energy} T^${v.field})`;
  if (v.shape.length === 1) return `(${v.data.map((x) => formatNumber(x)).join(", ")})${unit}`;
  if (v.shape.length === 2) {
    const cols = v.shape[1] ?? 1;
    const rows: string[] = [];
    for (let r = 0; r < (v.shape[0] ?? 0); r++) rows.push(`[${v.data.slice(r * cols, r * cols + cols).map((x) => formatNumber(x)).join(", ")}]`);
    return `[${rows.join(", ")}]${unit}`;
  }
  return null;
}

export interface ZeemanLine {
  /** Sites that share this g along the field. */
  readonly siteNames: readonly string[];
  /** |g^T n| for the field direction n (dimensionless). */
  readonly gAlongField: number;
  /** E_Z = |g^T n| muB B, meV. */
  readonly energyMeV: number;
}

/**
 * The Zeeman energy of each site: the effective field on site i is h_i = muB g_i^T B
 * (physics-notes section 2), so its size is |g_i^T n| muB B for B = B n. muB in meV/T from
 * CODATA 2018 via units.ts. Sites with the same value are grouped (relative tolerance 1e-12).
 */
export function zeemanLines(model: SpinModel, fieldT?: number): ZeemanLine[] {
  const field = model.field;
  if (!field) return [];
  const magnitudeT = fieldT ?? field.magnitudeT;
  const sites = model.lattice?.sites ?? [];
  const groups: { names: string[]; g: number }[] = [];
  const gOf = (g: readonly (readonly number[])[]): number => {
    const gt: [[number, number, number], [number, number, number], [number, number, number]] = [
      [g[0]?.[0] ?? 0, g[1]?.[0] ?? 0, g[2]?.[0] ?? 0],
      [g[0]?.[1] ?? 0, g[1]?.[1] ?? 0, g[2]?.[1] ?? 0],
      [g[0]?.[2] ?? 0, g[1]?.[2] ?? 0, g[2]?.[2] ?? 0],
    ];
    return norm3(mulMatVec3(gt, field.direction));
  };
  // Without a lattice the default g = 2 of the model layer applies (build.ts, DEFAULT_G).
  const list = sites.length > 0 ? sites.map((s) => ({ name: s.name, g: gOf(s.g) })) : [{ name: "every site", g: 2 }];
  for (const s of list) {
    const group = groups.find((x) => Math.abs(x.g - s.g) <= 1e-12 * Math.max(1, s.g));
    if (group) group.names.push(s.name);
    else groups.push({ names: [s.name], g: s.g });
  }
  return groups.map((x) => ({ siteNames: x.names, gAlongField: x.g, energyMeV: x.g * MU_B_MEV_PER_T * magnitudeT }));
}

/** `0.41736 meV = 100.91 GHz = 4.8433 K = 3.3663 cm^-1` */
export function zeemanText(energyMeV: number): string {
  return ["meV", "GHz", "K", "cm^-1"].map((u) => energyText(energyMeV, u)).join(" = ");
}
