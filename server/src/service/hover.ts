// Hover: what the word under the cursor means and what it resolves to: parameter values in the
// written unit and in meV, K, GHz; the Zeeman energy g muB B on the field; exchange matrices,
// sites, presets, units and keywords; the physics summary on the model name. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import { termLabel } from "../analysis/couplings";
import { perCellText } from "../analysis/frustration";
import type { Span } from "../base/text";
import { describeBond } from "../model/build";
import { PRESETS } from "../model/lattice";
import type { SpinModel } from "../model/model";
import { unitKey, unitInfo, constantNamed } from "../model/units";
import type { Expr, Statement } from "../syntax/ast";
import { statementExprs, walkExpr } from "../syntax/ast";
import { Identifier, isKeyword } from "../syntax/lexer";
import { energyText, firstModel, formatNumber, lineNumberAt, spanContains, statementAt, symbolAt, tokenAt, tokenSpan } from "./common";
import { physicsItems } from "./physicsView";
import { markdownList, predictionLines } from "./predictionsView";
import { describeClass, isFieldFinding, kindText, type BreakingTerm } from "../analysis/symmetryCheck";
import { energyConversions, parameterValueText, zeemanLines, zeemanText } from "./quantities";
import { CLAUSE_WORDS, CONVENTIONS, KIND_SIGNATURES, STATEMENT_WORDS, SYMMETRY_CLAIMS, unitDescription } from "./vocabulary";

export interface HoverResult {
  readonly span: Span;
  /** Markdown. */
  readonly markdown: string;
}

const CODATA_NOTE = "_Conversions: CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 2021)._";

/**
 * The hover at `offset`. With the document's `uri`, places in the file (the terms that break the
 * Larmor protection) are Markdown links to their lines (`uri#L12`, which VS Code opens there).
 */
export function doHover(a: DocumentAnalysis, offset: number, uri?: string): HoverResult | null {
  const token = tokenAt(a, offset);
  if (!token) return null;
  const span = tokenSpan(token);
  const model = a.model;
  const statement = statementAt(a, offset);
  // Only a name can be a symbol: inside a keyword, number or punctuation there is none to search
  // for (at the start of a token, a name may end right there: `J1|)`).
  const symbol = token.tokenType === Identifier || offset === token.startOffset ? symbolAt(a, offset) : undefined;

  if (symbol && model) {
    if (symbol.kind === "parameter") {
      const text = parameterHover(a, model, symbol.name);
      const field = statement?.kind === "field" && spanContains(statement.magnitude.span, offset) ? fieldHover(a, model, uri) : null;
      return text ? { span: symbol.span, markdown: field ? `${text}\n\n---\n\n${field}` : text } : null;
    }
    if (symbol.kind === "site") return { span: symbol.span, markdown: siteHover(model, symbol.name) };
    if (symbol.kind === "vector") return { span: symbol.span, markdown: `**${symbol.name}**: lattice vector` };
  }

  const model0 = firstModel(a);
  if (model0 && spanContains(model0.name.span, offset) && token.tokenType.name === "StringLiteral") {
    return { span, markdown: modelHover(a) };
  }

  if (statement) {
    const specific = statementHover(a, statement, offset, span, uri);
    if (specific) return specific;
  }

  const word = token.image;
  if (isKeyword(word)) {
    const doc = STATEMENT_WORDS.find((w) => w.word === word)?.summary ?? CLAUSE_WORDS[word];
    if (doc) return { span, markdown: `**${word}**: ${doc}` };
  }
  const constant = constantNamed(word);
  if (constant) return { span, markdown: `**${word}** = ${formatNumber(constant.value, 11)}${constant.energy ? " meV/T" : ""}: ${constant.label}` };
  return null;
}

function parameterHover(a: DocumentAnalysis, model: SpinModel, name: string): string | null {
  const p = model.parameters.get(name);
  const statement = firstModel(a)?.statements.find((s) => s.kind === "let" && s.name.name === name);
  const written = statement ? a.text.slice(statement.span.start, statement.span.end) : `let ${name} = ...`;
  const out = [`**${name}** (parameter)`, "```spw\n" + written + "\n```"];
  const value = p ? parameterValueText(a, p) : null;
  out.push(value ? `= ${value}` : "_No value: see the diagnostics on its definition._");
  const uses = model.exchanges.filter((e) => e.couplingName === name);
  for (const e of uses.slice(0, 5)) {
    const bonds = model.lattice ? e.bonds.map((b) => describeBond(model.lattice!, b.from, b.to, b.offset)) : [];
    out.push(`- ${e.kind} on ${bonds.slice(0, 3).join(", ")}${bonds.length > 3 ? `, ... (${bonds.length} bonds per cell)` : ""}`);
  }
  for (const e of uses.slice(0, 5)) out.push(...termPhysics(a, model.exchanges.indexOf(e)));
  if (p?.value && p.value.energy === 1 && p.value.field === 0) out.push(CODATA_NOTE);
  return out.join("\n\n");
}

const CHARACTER_TEXT: Record<string, string> = {
  antiferro: "antiferromagnetic",
  ferro: "ferromagnetic",
  zero: "no isotropic part",
  antisymmetric: "purely antisymmetric (Dzyaloshinskii-Moriya)",
};

/**
 * What the analysis says of one exchange term: its character in H = + sum S_i.J.S_j (after the
 * file's convention) and its share in each frustrated shortest cycle (how many of the cycle's
 * bonds it carries).
 */
function termPhysics(a: DocumentAnalysis, index: number): string[] {
  const p = a.physics;
  if (!p || index < 0) return [];
  const c = p.couplings.find((x) => x.index === index);
  const term = a.model?.exchanges[index];
  const out: string[] = [];
  if (c) {
    const convention = a.model?.convention?.value ?? "antiferro-positive (assumed)";
    out.push(`${c.name ? `${c.name} (${c.kind})` : c.kind}: ${CHARACTER_TEXT[c.character] ?? c.character}, J = ${formatNumber(c.valueMeV)} meV in H = + Σ S_i·J·S_j (convention ${convention})`);
  }
  const cycles = p.frustration.filter((g) => g.terms.includes(index));
  // Edges are labelled by the terms on them ("J1", or "J1+D" for two terms on one bond).
  const label = term ? termLabel(term) : "";
  if (cycles.length === 0) out.push("in no closed cycle of the cluster's shortest loops");
  else {
    const lines = cycles.map((g) => {
      const share = g.couplings.filter((edge) => edge.split("+").includes(label)).length;
      const state = g.frustrated === true ? "frustrated" : g.frustrated === false ? "not frustrated" : "frustration undecided";
      return `- ${g.cycle} (${perCellText(g)}, ${state}): ${share} of its ${g.length} bonds`;
    });
    out.push(`In the shortest cycles:\n${lines.join("\n")}`);
  }
  return out;
}

function siteHover(model: SpinModel, name: string): string {
  const site = model.lattice?.sites.find((s) => s.name === name);
  if (!site) return `**${name}**: site`;
  const spin = Number.isInteger(site.spin) ? String(site.spin) : `${Math.round(2 * site.spin)}/2`;
  const g = site.g;
  const isotropic = [0, 1, 2].every((i) => [0, 1, 2].every((j) => (i === j ? g[i]?.[j] === g[0]?.[0] : g[i]?.[j] === 0)));
  const gText = isotropic ? formatNumber(g[0]?.[0] ?? 0) : `[${g.map((r) => `[${r.map((x) => formatNumber(x)).join(", ")}]`).join(", ")}]`;
  const lines = [
    `**${name}** (site ${site.index + 1} of ${model.lattice?.sites.length ?? 1} per cell)`,
    `- position (${site.position.map((x) => formatNumber(x)).join(", ")}) in lattice units`,
    `- spin S = ${spin}`,
    `- g = ${gText}${site.gSpan ? "" : " (default)"}`,
  ];
  return lines.join("\n");
}

/**
 * Field hovers by physics summary. The analysis hands over the summary of the version before only
 * when the model reads the same to the physics (analysis/physics.ts: every model field but the
 * parameters, symbols and spans), and the field hover reads nothing else: the field, the sites'
 * names and g-tensors, the summary, and the lines of the breaking terms (kept with the text). So
 * one summary means one text, and typing elsewhere in a file does not build the text again. (A
 * test holds hovers after edits to fresh analyses.)
 */
const fieldHovers = new WeakMap<object, { readonly places: Places; readonly text: string | null }>();

/**
 * The last field hover with what it read: a new summary (a coupling typed into) often leaves all
 * of it the same. The field and lattice objects are handed over by the build while their
 * statements and values read the same (model/build.ts); the resonance sentence is compared as
 * text; predictions count only when they apply, and then as the very same object. `places` holds
 * the document and the lines of the breaking terms the text links to: lines can move while the
 * spans stay (a character before them turned into a line end), so they are part of every key.
 */
let lastFieldHover: {
  readonly field: object;
  readonly lattice: object | null;
  readonly reason: string | null;
  readonly predictions: object | null;
  readonly places: Places;
  readonly text: string | null;
} | null = null;

/** How many breaking terms the field hover lists before it only counts the rest. */
const FIELD_HOVER_PLACES = 6;

/** The terms that break the Larmor protection that the hover lists (lines and kinds), how many more there are, and for which document. */
interface Places {
  readonly uri: string | undefined;
  readonly lines: readonly number[];
  readonly kinds: readonly BreakingTerm["kind"][];
  readonly more: number;
}

const NO_PLACES: readonly number[] = [];

function breakingPlaces(a: DocumentAnalysis, uri: string | undefined): Places {
  const physics = a.physics;
  if (!physics || !physics.resonance.hasField || physics.resonance.protected) return { uri, lines: NO_PLACES, kinds: [], more: 0 };
  const breaking = physics.symmetry.breaking;
  const count = Math.min(breaking.length, FIELD_HOVER_PLACES);
  const lines: number[] = [];
  const kinds: BreakingTerm["kind"][] = [];
  for (let k = 0; k < count; k++) {
    const b = breaking[k] as BreakingTerm;
    lines.push(lineNumberAt(a, b.span.start));
    kinds.push(b.kind);
  }
  return { uri, lines, kinds, more: breaking.length - count };
}

function samePlaces(x: Places, y: Places): boolean {
  if (x.uri !== y.uri || x.more !== y.more || x.lines.length !== y.lines.length) return false;
  for (let k = 0; k < x.lines.length; k++) if (x.lines[k] !== y.lines[k] || x.kinds[k] !== y.kinds[k]) return false;
  return true;
}

function fieldHover(a: DocumentAnalysis, model: SpinModel, uri: string | undefined): string | null {
  const physics = a.physics;
  const places = breakingPlaces(a, uri);
  const kept = physics ? fieldHovers.get(physics) : undefined;
  if (kept && samePlaces(kept.places, places)) return kept.text;
  const field = model.field;
  if (!field) return null;
  const resonance = physics?.resonance;
  const reason = resonance?.hasField && resonance.reason ? resonance.reason : null;
  const predictions = physics?.predictions.applicable ? physics.predictions : null;
  const lattice = model.lattice ?? null;
  const last = lastFieldHover;
  const text =
    last && last.field === field && last.lattice === lattice && last.reason === reason && last.predictions === predictions && samePlaces(last.places, places)
      ? last.text
      : fieldHoverText(a, model, places);
  lastFieldHover = { field, lattice, reason, predictions, places, text };
  if (physics) fieldHovers.set(physics, { places, text });
  return text;
}

/**
 * What breaks the symmetry, each kind once: terms of H0 break its SU(2); field findings (a field
 * transverse to the axis H0 keeps, site-dependent fields) break only what H0 leaves.
 */
function brokenBy(breaking: readonly BreakingTerm[]): string {
  const inH0 = new Set<string>();
  const byField = new Set<string>();
  for (const b of breaking) (isFieldFinding(b.kind) ? byField : inH0).add(kindText(b.kind));
  const h0 = inH0.size ? ` SU(2) broken in H0 by: ${[...inH0].join("; ")}.` : "";
  const field = byField.size ? ` Broken further by the field: ${[...byField].join("; ")}.` : "";
  return h0 + field;
}

/** The Zeeman energy of every site in the file's field, and the sweep's end if there is one. */
function fieldHoverText(a: DocumentAnalysis, model: SpinModel, places: Places): string | null {
  const field = model.field;
  if (!field) return null;
  const out = [
    `**field** ${formatNumber(field.magnitudeT)} T along (${field.direction.map((x) => formatNumber(x, 4)).join(", ")})`,
    "Zeeman energy E_Z = g μB B, with g = |gᵀ n| along the field direction n:",
  ];
  for (const z of zeemanLines(model)) {
    out.push(`- ${z.siteNames.join(", ")}: g = ${formatNumber(z.gAlongField)}, E_Z = ${zeemanText(z.energyMeV)}`);
  }
  if (field.sweep) {
    const end = zeemanLines(model, field.sweep.toT);
    out.push(`Sweep ${formatNumber(field.sweep.fromT)} T to ${formatNumber(field.sweep.toT)} T in ${field.sweep.steps} steps; at ${formatNumber(field.sweep.toT)} T: ${end.map((z) => energyText(z.energyMeV, "meV")).join(", ")}.`);
  }
  const resonance = a.physics?.resonance;
  // The reason is a whole sentence that names the q = 0 resonance itself.
  if (resonance?.hasField && resonance.reason) out.push(resonance.reason);
  if (places.lines.length) {
    const uri = places.uri;
    const at = (line: number): string => (uri ? `[line ${line}](${uri}#L${line})` : `line ${line}`);
    // A hover is a glance: the first few places, and how many more (the diagnostic lists all).
    const shown = places.lines.map((line, k) => `${at(line)}: ${kindText(places.kinds[k] as BreakingTerm["kind"])}`);
    if (places.more > 0) shown.push(`and ${places.more} more (each is a related location of the resonance diagnostic)`);
    out.push(`Broken by:\n\n${markdownList(shown)}`);
  }
  const predictions = a.physics?.predictions;
  if (predictions?.applicable) out.push(`**Predicted near q = 0**\n\n${markdownList(predictionLines(predictions, { sweep: false }))}`);
  out.push("_μB and conversions: CODATA 2018 (Tiesinga et al., Rev. Mod. Phys. 2021)._");
  return out.join("\n\n");
}

function modelHover(a: DocumentAnalysis): string {
  const m = a.model;
  const out = [`**model "${firstModel(a)?.name.name ?? ""}"**`];
  if (m) {
    const L = m.lattice;
    if (L) out.push(`${L.preset ?? "custom"} lattice, ${L.dimension}D, ${L.sites.length} site(s) per cell; ${m.parameters.size} parameter(s), ${m.exchanges.length} exchange term(s)`);
    out.push(`convention: ${m.convention?.value ?? "antiferro-positive (assumed)"}`);
  }
  for (const item of physicsItems(a)) out.push(`**${item.title}**\n\n${markdownList(item.lines)}`);
  const errors = a.diagnostics.filter((d) => d.severity === "error").length;
  const warnings = a.diagnostics.filter((d) => d.severity === "warning").length;
  out.push(`${errors} error(s), ${warnings} warning(s)`);
  return out.join("\n\n");
}

/** The number expression (with or without unit) whose span holds `offset`. */
function numberAt(statement: Statement, offset: number): Extract<Expr, { kind: "number" }> | null {
  let best: Extract<Expr, { kind: "number" }> | null = null;
  for (const e of statementExprs(statement))
    walkExpr(e, (x) => {
      if (x.kind === "number" && spanContains(x.span, offset)) best = x;
    });
  return best;
}

function statementHover(a: DocumentAnalysis, s: Statement, offset: number, span: Span, uri: string | undefined): HoverResult | null {
  const model = a.model;
  const n = numberAt(s, offset);
  // A literal beyond the double range (1e400) reads as Infinity: say so instead of converting it.
  if (n && !Number.isFinite(n.value)) return { span: n.span, markdown: `**${n.text}** is too large to represent as a number (the limit is about 1.8e308); use a smaller value or a smaller unit.` };
  if (n?.unit && s.kind !== "field") {
    const key = unitKey(n.unit.name, n.unit.power);
    const u = unitInfo(key);
    if (u) {
      const canonical = n.value * u.toCanonical;
      const text =
        u.dimension === "energy" ? energyConversions(canonical, key).join(" = ") : `${formatNumber(n.value)} ${key} = ${formatNumber(canonical)} T`;
      return { span: n.span, markdown: `${text}\n\n${unitDescription(key) ?? ""}\n\n${CODATA_NOTE}` };
    }
  }
  switch (s.kind) {
    case "field": {
      if (!model?.field) return null;
      const md = fieldHover(a, model, uri);
      return md ? { span, markdown: md } : null;
    }
    case "exchange": {
      if (!spanContains(s.exchangeKind.span, offset)) return null;
      const sigs = KIND_SIGNATURES[s.exchangeKind.name];
      const out: string[] = [];
      if (sigs) out.push(sigs.map((x) => `\`${x.label}\`: ${x.documentation}`).join("\n\n"));
      else out.push(`Unknown exchange kind \`${s.exchangeKind.name}\`.`);
      const term = model?.exchanges.find((e) => e.span.start === s.span.start);
      if (term) {
        const m = term.matrixMeV;
        out.push(
          "Matrix in H = Σ S_i · J · S_j (meV, after the sign convention):\n\n```\n" +
            m.map((r) => r.map((x) => formatNumber(x, 4).padStart(10)).join(" ")).join("\n") +
            "\n```",
        );
        out.push(`${term.bonds.length} bond(s) per cell.`);
        out.push(...termPhysics(a, model!.exchanges.indexOf(term)));
      }
      return { span: s.exchangeKind.span, markdown: out.join("\n\n") };
    }
    case "latticePreset": {
      if (!spanContains(s.preset.span, offset)) return null;
      const p = PRESETS[s.preset.name];
      if (!p) return { span: s.preset.span, markdown: `Unknown lattice preset \`${s.preset.name}\`. Presets: ${Object.keys(PRESETS).join(", ")}.` };
      return {
        span: s.preset.span,
        markdown: `**${p.name}** lattice (${p.vectors.length}D): ${p.description}; sites ${p.sites.map((x) => x.name).join(", ")}; ${p.coordination} nearest neighbours.`,
      };
    }
    case "convention": {
      const doc = CONVENTIONS[s.value.name];
      return doc && spanContains(s.value.span, offset) ? { span: s.value.span, markdown: `**${s.value.name}**: ${doc}` } : null;
    }
    case "expect": {
      const doc = SYMMETRY_CLAIMS[s.claim.name];
      const sym = a.physics?.symmetry;
      const computed = sym ? `\n\nComputed: without the field ${describeClass(sym.h0, sym.axis)}; with the field ${describeClass(sym.full, sym.fullAxis)}.${brokenBy(sym.breaking)}` : "";
      if (doc && spanContains(s.claim.span, offset)) return { span: s.claim.span, markdown: `**${s.claim.name}**: ${doc}${computed}` };
      // On the keyword or the axis: the claim as written and what the analysis found.
      return sym ? { span: s.span, markdown: `**expect** ${s.claim.name}: the symmetry the author relies on, checked against the model.${computed}` } : null;
    }
    case "probe": {
      const e = model?.probe?.energyMeV;
      if (e === undefined) return null;
      const resonantT = a.physics?.resonance?.probe?.resonanceFieldT;
      const resonance = typeof resonantT === "number" ? `\n\nResonant (h ν = g μB B) at B = ${formatNumber(resonantT)} T.` : "";
      const pred = a.physics?.predictions;
      const branches = pred?.applicable ? `\n\n${markdownList(predictionLines(pred, { sweep: false }))}` : "";
      return { span, markdown: `**probe** ${energyConversions(e, null).join(" = ")} = ${energyText(e, "cm^-1")}${resonance}${branches}\n\n${CODATA_NOTE}` };
    }
    case "cluster": {
      const c = model?.cluster;
      const perCell = model?.lattice?.sites.length ?? 1;
      if (!c) return null;
      const cells = c.cells.reduce((p, x) => p * x, 1);
      return { span, markdown: `**cluster** ${c.cells.join(" × ")} cells × ${perCell} site(s) = ${cells * perCell} sites, ${c.boundary} boundaries` };
    }
    default:
      return null;
  }
}
