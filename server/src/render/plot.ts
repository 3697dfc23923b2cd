// The picture of a model's predictions as one self-contained SVG: the two q = 0 branches with
// their weights and the Larmor line, the near-saturation branch, exact-check poles when given,
// m(h) with the file's field marked, and a lattice sketch with bonds coloured by coupling. The
// CLI (`spinwright plot`) and the editor's preview call the same function. Render layer: pure.
import type { DocumentAnalysis } from "../analysis/analyze";
import { magnetizationCurve, type ExactCalibration } from "../analysis/predictions";
import { termLabel } from "../analysis/couplings";

export interface PlotPole {
  readonly qOverPi: number;
  readonly energyMeV: number;
  readonly weight: number;
}

export interface PlotOptions {
  /** Poles of an exact check (energies above the ground state, meV) to overlay. */
  readonly poles?: readonly PlotPole[];
  readonly exact?: ExactCalibration | null;
  /** Colours follow the editor theme through CSS variables; these are the fallbacks. */
  readonly width?: number;
}

const COLORS = ["#1f77b4", "#d62728", "#2ca02c", "#9467bd", "#ff7f0e", "#8c564b", "#17becf"];
// Each theme colour is declared twice: a plain value for renderers without CSS variables, then
// the editor's variable (with the same fallback), which wins wherever variables are supported.
const FG = "#222;fill:var(--vscode-editor-foreground, #222)";
const MUTED = "#777;stroke:var(--vscode-descriptionForeground, #777)";
const MUTED_FILL = "#777;fill:var(--vscode-descriptionForeground, #777)";

function esc(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

const n = (x: number): string => (Number.isFinite(x) ? Number(x.toFixed(2)).toString() : "0");

interface Frame {
  x: number;
  y: number;
  w: number;
  h: number;
  x0: number;
  x1: number;
  y0: number;
  y1: number;
}

function sx(f: Frame, v: number): number {
  return f.x + ((v - f.x0) / (f.x1 - f.x0 || 1)) * f.w;
}
function sy(f: Frame, v: number): number {
  return f.y + f.h - ((v - f.y0) / (f.y1 - f.y0 || 1)) * f.h;
}

function niceTicks(a: number, b: number, count = 5): number[] {
  const span = b - a;
  if (!(span > 0)) return [a];
  const raw = span / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 2.5, 5, 10].map((k) => k * mag).find((s) => span / s <= count) ?? 10 * mag;
  const out: number[] = [];
  for (let t = Math.ceil(a / step) * step; t <= b + 1e-12 * span; t += step) out.push(Number(t.toPrecision(10)));
  return out;
}

function axes(f: Frame, title: string, xLabel: string, yLabel: string): string[] {
  const out: string[] = [];
  out.push(`<rect x="${n(f.x)}" y="${n(f.y)}" width="${n(f.w)}" height="${n(f.h)}" fill="none" class="frame"/>`);
  for (const t of niceTicks(f.x0, f.x1)) {
    const x = sx(f, t);
    out.push(`<line x1="${n(x)}" y1="${n(f.y + f.h)}" x2="${n(x)}" y2="${n(f.y + f.h + 4)}" class="axis"/>`);
    out.push(`<text x="${n(x)}" y="${n(f.y + f.h + 16)}" text-anchor="middle" class="tick">${t}</text>`);
  }
  for (const t of niceTicks(f.y0, f.y1)) {
    const y = sy(f, t);
    out.push(`<line x1="${n(f.x - 4)}" y1="${n(y)}" x2="${n(f.x)}" y2="${n(y)}" class="axis"/>`);
    out.push(`<text x="${n(f.x - 7)}" y="${n(y + 4)}" text-anchor="end" class="tick">${t}</text>`);
  }
  out.push(`<text x="${n(f.x + f.w / 2)}" y="${n(f.y - 10)}" text-anchor="middle" class="title">${esc(title)}</text>`);
  out.push(`<text x="${n(f.x + f.w / 2)}" y="${n(f.y + f.h + 34)}" text-anchor="middle" class="label">${esc(xLabel)}</text>`);
  out.push(`<text transform="translate(${n(f.x - 44)} ${n(f.y + f.h / 2)}) rotate(-90)" text-anchor="middle" class="label">${esc(yLabel)}</text>`);
  return out;
}

/** A reason in place of a plot, wrapped to the panel's width. */
function message(f: Frame, text: string): string {
  const perLine = Math.max(20, Math.floor(f.w / 5.6));
  const lines: string[] = [];
  for (const word of text.split(/\s+/)) {
    const last = lines[lines.length - 1];
    if (last !== undefined && (last + " " + word).length <= perLine) lines[lines.length - 1] = last + " " + word;
    else lines.push(word);
  }
  const y0 = f.y + f.h / 2 - (lines.length - 1) * 7;
  return lines
    .slice(0, 8)
    .map((l, i) => `<text x="${n(f.x + f.w / 2)}" y="${n(y0 + 14 * i)}" text-anchor="middle" class="note">${esc(l)}</text>`)
    .join("\n");
}

export function renderPlotSvg(a: DocumentAnalysis, options: PlotOptions = {}): string {
  const W = options.width ?? 960;
  const H = 380;
  const parts: string[] = [];
  const p = a.physics?.predictions;
  const h = a.physics?.resonance.zeemanMeV ?? null;

  // Panel 1: branches near q = 0.
  const f1: Frame = { x: 70, y: 40, w: 260, h: 260, x0: 0, x1: 1, y0: 0, y1: 1 };
  if (p && p.curve.length > 1 && h !== null) {
    const qMax = p.curve[p.curve.length - 1]?.qOverPi ?? 0.2;
    const energies = p.curve.flatMap((c) => [c.lowerMeV, c.upperMeV]).concat(p.nearSaturation.points.map((x) => x.upperMeV ?? h));
    f1.x1 = qMax;
    f1.y0 = Math.max(0, Math.min(...energies) - 0.1 * (Math.max(...energies) - Math.min(...energies)));
    f1.y1 = Math.max(...energies) * 1.08;
    parts.push(...axes(f1, "q ≈ 0 branches (line width ∝ weight)", "q / π", "ω (meV)"));
    parts.push(`<line x1="${n(f1.x)}" y1="${n(sy(f1, h))}" x2="${n(f1.x + f1.w)}" y2="${n(sy(f1, h))}" class="axis" stroke-dasharray="4 3"/>`);
    parts.push(`<text x="${n(f1.x + f1.w - 4)}" y="${n(sy(f1, h) - 4)}" text-anchor="end" class="note">Larmor h = ${Number(h.toPrecision(4))} meV</text>`);
    const total = 2 * (p.magnetization.value ?? 0.25);
    for (const [key, color] of [["lower", COLORS[0]], ["upper", COLORS[1]]] as const) {
      for (let i = 1; i < p.curve.length; i++) {
        const c0 = p.curve[i - 1];
        const c1 = p.curve[i];
        if (!c0 || !c1) continue;
        const w0 = key === "lower" ? c1.lowerWeight : c1.upperWeight;
        const width = 0.6 + 5 * Math.max(0, Math.min(1, w0 / (total || 1)));
        const y0 = key === "lower" ? c0.lowerMeV : c0.upperMeV;
        const y1 = key === "lower" ? c1.lowerMeV : c1.upperMeV;
        parts.push(`<line clip-path="url(#clip1)" x1="${n(sx(f1, c0.qOverPi))}" y1="${n(sy(f1, y0))}" x2="${n(sx(f1, c1.qOverPi))}" y2="${n(sy(f1, y1))}" stroke="${color}" stroke-width="${n(width)}" stroke-linecap="round"/>`);
      }
    }
    for (const pole of options.poles ?? []) {
      if (pole.qOverPi > qMax) continue;
      parts.push(`<circle cx="${n(sx(f1, pole.qOverPi))}" cy="${n(sy(f1, pole.energyMeV))}" r="${n(1.5 + 4 * Math.sqrt(Math.max(0, pole.weight / (total || 1))))}" fill="none" stroke="${COLORS[2]}"/>`);
    }
    parts.push(`<text x="${n(f1.x + 6)}" y="${n(f1.y + 14)}" class="note">${esc(`Δ = ${Number((p.branches.splittingMeV ?? 0).toPrecision(3))} meV (${p.branches.method.split(",")[0]})`)}</text>`);
  } else {
    parts.push(...axes(f1, "q ≈ 0 branches", "q / π", "ω (meV)"));
    parts.push(message(f1, p?.branches.reason ?? p?.reason ?? "no predictions for this model"));
  }

  // Panel 2: m(h) with the file's field.
  const f2: Frame = { x: 410, y: 40, w: 240, h: 260, x0: 0, x1: 1, y0: 0, y1: 0.5 };
  const curve = p ? magnetizationCurve(p, options.exact ?? null) : null;
  if (curve && curve.length > 1) {
    f2.x1 = curve[curve.length - 1]?.zeemanMeV ?? 1;
    parts.push(...axes(f2, "magnetization", "h = g μB B (meV)", "m per site"));
    const path = curve.map((c, i) => `${i === 0 ? "M" : "L"}${n(sx(f2, c.zeemanMeV))},${n(sy(f2, c.m))}`).join(" ");
    parts.push(`<path d="${path}" fill="none" stroke="${COLORS[0]}" stroke-width="2"/>`);
    if (h !== null && h <= f2.x1) {
      parts.push(`<line x1="${n(sx(f2, h))}" y1="${n(f2.y)}" x2="${n(sx(f2, h))}" y2="${n(f2.y + f2.h)}" stroke="${COLORS[1]}" stroke-dasharray="4 3"/>`);
      parts.push(`<text x="${n(sx(f2, h) + 4)}" y="${n(f2.y + 14)}" class="note">file's field</text>`);
    }
    parts.push(`<text x="${n(f2.x + f2.w - 4)}" y="${n(f2.y + f2.h - 8)}" text-anchor="end" class="note">${esc(p?.magnetization.method.split(",")[0] ?? "")}</text>`);
  } else {
    parts.push(...axes(f2, "magnetization", "h (meV)", "m per site"));
    parts.push(message(f2, p?.magnetization.reason ?? "no magnetization curve for this model"));
  }

  // Panel 3: lattice sketch, bonds coloured by coupling.
  const f3 = { x: 700, y: 40, w: 230, h: 260 };
  parts.push(`<text x="${n(f3.x + f3.w / 2)}" y="${n(f3.y - 10)}" text-anchor="middle" class="title">lattice and bonds</text>`);
  const m = a.model;
  if (m?.lattice) {
    const L = m.lattice;
    const cells: number[][] = [];
    const span = L.dimension === 1 ? [[0, 1, 2, 3]] : [[0, 1, 2], [0, 1, 2]];
    if (L.dimension === 1) for (const i of span[0] ?? []) cells.push([i]);
    else for (const i of span[0] ?? []) for (const j of span[1] ?? []) cells.push([i, j, 0].slice(0, L.dimension));
    const pos = (cell: readonly number[], s: number): [number, number] => {
      const base = L.sites[s]?.position ?? [0, 0, 0];
      let x = base[0];
      let y = base[1];
      cell.forEach((c, k) => {
        x += c * (L.vectors[k]?.[0] ?? 0);
        y += c * (L.vectors[k]?.[1] ?? 0);
      });
      return [x, y];
    };
    const pts = cells.flatMap((c) => L.sites.map((_, s) => pos(c, s)));
    const xs = pts.map((q) => q[0]);
    const ys = pts.map((q) => q[1]);
    const [minX, maxX, minY, maxY] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
    const scale = Math.min((f3.w - 30) / (maxX - minX || 1), (f3.h - 60) / (maxY - minY || 1), 60);
    const X = (x: number): number => f3.x + 15 + (x - minX) * scale;
    const Y = (y: number): number => f3.y + f3.h - 40 - (y - minY) * scale;
    // Terms drawn on a bond already drawn are shifted sideways, so that each stays visible.
    const drawn = new Map<string, number>();
    m.exchanges.forEach((t, k) => {
      const color = COLORS[k % COLORS.length] as string;
      for (const b of t.bonds)
        for (const c of cells) {
          const target = c.map((x, i) => x + (b.offset[i] ?? 0));
          if (!cells.some((d) => d.every((x, i) => x === target[i]))) continue;
          const [x0, y0] = pos(c, b.from);
          const [x1, y1] = pos(target, b.to);
          const key = [x0, y0, x1, y1].map((v) => v.toFixed(6)).join(",");
          const before = drawn.get(key) ?? 0;
          drawn.set(key, before + 1);
          const length = Math.hypot(X(x1) - X(x0), Y(y1) - Y(y0)) || 1;
          const side = 3 * before;
          const [ox, oy] = [(-(Y(y1) - Y(y0)) / length) * side, ((X(x1) - X(x0)) / length) * side];
          // Longer bonds bow out so that they do not hide the shorter ones along a chain.
          const bow = Math.hypot(x1 - x0, y1 - y0) > 1.01 ? 0.35 * scale * (L.dimension === 1 ? 1 : 0.3) : 0;
          const mx = (X(x0) + X(x1)) / 2 + ox;
          const my = (Y(y0) + Y(y1)) / 2 - bow + oy;
          parts.push(`<path d="M${n(X(x0) + ox)},${n(Y(y0) + oy)} Q${n(mx)},${n(my)} ${n(X(x1) + ox)},${n(Y(y1) + oy)}" fill="none" stroke="${color}" stroke-width="2"/>`);
        }
      // The key: a swatch of the term's colour and its name. The name's colour is an inline style,
      // since the stylesheet's text colour would override a fill attribute.
      const lx = f3.x + 10 + 80 * (k % 3);
      const ly = f3.y + f3.h - 4 + 14 * Math.floor(k / 3);
      parts.push(`<line x1="${n(lx)}" y1="${n(ly - 4)}" x2="${n(lx + 12)}" y2="${n(ly - 4)}" stroke="${color}" stroke-width="2"/>`);
      parts.push(`<text x="${n(lx + 16)}" y="${n(ly)}" style="fill:${color}" class="legend">${esc(termLabel(t))}</text>`);
    });
    for (const [x, y] of pts) parts.push(`<circle cx="${n(X(x))}" cy="${n(Y(y))}" r="4" class="site"/>`);
  } else parts.push(message({ x: f3.x, y: f3.y, w: f3.w, h: f3.h, x0: 0, x1: 1, y0: 0, y1: 1 }, "no lattice"));

  const title = `${a.model?.name ?? "model"}: predictions near q = 0${h !== null ? `, h = ${Number(h.toPrecision(4))} meV` : ""}`;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" role="img" aria-label="${esc(title)}">`,
    // Presentation attributes cannot hold CSS variables, so theme colours go through classes.
    `<style>text{font-family:sans-serif;font-family:var(--vscode-font-family,sans-serif);fill:${FG}} .tick{font-size:10px;fill:${MUTED_FILL}} .label{font-size:11px} .title{font-size:12px;font-weight:600} .note{font-size:10px;fill:${MUTED_FILL}} .legend{font-size:11px} .frame{fill:none;stroke-width:1;stroke:${MUTED}} .axis{stroke:${MUTED}} .site{fill:${FG}}</style>`,
    `<defs><clipPath id="clip1"><rect x="70" y="40" width="260" height="260"/></clipPath></defs>`,
    `<title>${esc(title)}</title>`,
    ...parts,
    `</svg>`,
  ].join("\n");
}
