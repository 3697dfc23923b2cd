// Timing of the editor path on a generated 200-line model: analysis (what a keystroke costs
// before diagnostics can be sent) and each feature on top of it. A benchmark function, not a
// test: bench/main.ts (or anyone) can call it and print the figures. Service layer.
import { analyzeDocument } from "../analysis/analyze";
import { codeActions } from "./codeActions";
import { DEFAULT_SETTINGS } from "./common";
import { doComplete } from "./completion";
import { formatDocument } from "./formatting";
import { doHover } from "./hover";
import { inlayHints } from "./inlayHints";
import { semanticTokens } from "./semanticTokens";
import { documentSymbols } from "./symbols";

/** A chain model of about `lines` lines: parameters, exchange terms of several kinds, comments. */
export function generatedModel(lines = 200): string {
  const out = ["# Generated benchmark model (invented)", 'model "bench-200" {', "  spin 1/2", "  convention antiferro-positive", "  lattice chain sites Cu"];
  const kinds = ["heisenberg(J%)", "dm(D%, (0, 0, 1))", "xxz(J%, 0.9)", "xyz(J%, J%, D%)"];
  let k = 0;
  while (out.length < lines - 8) {
    k++;
    out.push(`  # coupling set ${k}`, `  let J${k} = ${(10 + k * 0.37).toFixed(2)} K`, `  let D${k} = 0.0${(k % 9) + 1} * J${k}`);
    const kind = kinds[k % kinds.length]!.replace(/%/g, String(k));
    if (k <= 20) out.push(`  exchange ${kind} on Cu -> Cu + (${(k % 5) + 1})`);
  }
  out.push("  g Cu = 2.06", "  field 3.5 T along (0, 0, 1) sweep 0 T to 10 T steps 20", "  cluster 16 periodic", "  probe 240 GHz", "  expect none", "}");
  return out.join("\n") + "\n";
}

export interface EditorTimings {
  readonly lines: number;
  /** Median milliseconds over the repetitions. */
  readonly medianMs: Readonly<Record<string, number>>;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

export function benchmarkEditor(repetitions = 30, lines = 200): EditorTimings {
  const text = generatedModel(lines);
  const samples: Record<string, number[]> = {};
  const time = (name: string, f: () => unknown): void => {
    const t0 = performance.now();
    f();
    (samples[name] ??= []).push(performance.now() - t0);
  };
  const fieldAt = text.indexOf("field 3.5") + 2;
  const blank = text.indexOf("  g Cu");
  let previous = analyzeDocument(text);
  for (let r = 0; r < repetitions; r++) {
    // An edit changes the text: every repetition analyses a new string, as after a keystroke (a
    // digit typed into J1 and deleted again, so values and predictions change).
    const edited = text.replace("let J1 = ", `let J1 = ${r % 2 ? "" : "1"}`);
    let a = analyzeDocument(edited);
    time("analysis of the whole text", () => (a = analyzeDocument(edited)));
    time("analysis from the version before (keystroke to diagnostics)", () => (previous = analyzeDocument(edited, { previous })));
    a = previous;
    time("hover on the field", () => doHover(a, fieldAt));
    time("completion at a statement start", () => doComplete(a, blank));
    time("semantic tokens", () => semanticTokens(a));
    time("document symbols", () => documentSymbols(a));
    time("inlay hints", () => inlayHints(a, { start: 0, end: edited.length }, DEFAULT_SETTINGS));
    time("code actions (whole file)", () => codeActions(a, { start: 0, end: edited.length }));
    time("formatting", () => formatDocument(a));
  }
  const medianMs: Record<string, number> = {};
  for (const [k, v] of Object.entries(samples)) medianMs[k] = median(v);
  return { lines: text.split("\n").length - 1, medianMs };
}
