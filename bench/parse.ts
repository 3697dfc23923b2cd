// Benchmarks of the syntax and model layers: parse + model of a 200-line and a 20,000-line
// generated file. Figures are printed; targets are stated beside them, not asserted.
import { analyzeDocument } from "../server/src/analysis/analyze";
import { buildModel } from "../server/src/model/build";
import { parseSpw } from "../server/src/syntax/parse";

/** A generated model with `lines` lines: many parameters and explicit bonds on a custom lattice. */
export function generatedModel(lines: number): string {
  const out = ['# Generated benchmark model (invented).', 'model "bench" {', "  spin 1/2", "  convention antiferro-positive", "  lattice chain sites Cu"];
  let k = 0;
  while (out.length < lines - 4) {
    out.push(`  let J${k} = ${(1 + (k % 7) * 0.1).toFixed(2)} K * 1.0${k % 10}`);
    out.push(`  exchange heisenberg(J${k}) on Cu -> Cu + (${k + 1})`);
    k++;
  }
  out.push("  g Cu = 2.05", "  field 3 T along (0, 0, 1)", "  cluster 16 periodic", "}");
  return out.join("\n") + "\n";
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)] ?? NaN;
}

function time(fn: () => void, repeats: number): number {
  const samples: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    fn();
    samples.push(performance.now() - t0);
  }
  return median(samples);
}

export function benchParse(): string[] {
  const out: string[] = [];
  for (const [lines, target, repeats] of [
    [200, 2, 200],
    [20000, 150, 9],
  ] as const) {
    const text = generatedModel(lines);
    // Warm up the JIT.
    for (let i = 0; i < 3; i++) buildModel(parseSpw(text).ast, text);
    const ms = time(() => buildModel(parseSpw(text).ast, text), repeats);
    const full = time(() => analyzeDocument(text), Math.max(3, Math.floor(repeats / 3)));
    out.push(
      `parse + model, ${lines}-line file: median ${ms.toFixed(3)} ms (target < ${target} ms) ${ms < target ? "OK" : "OVER TARGET"}; full analysis ${full.toFixed(3)} ms`,
    );
  }
  return out;
}
