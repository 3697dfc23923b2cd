// Property test: random edits of the samples (deleting, duplicating, swapping and inserting
// tokens) never throw and always return diagnostics whose ranges lie inside the file.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../server/src/analysis/analyze";
// A deterministic generator, so that failures can be replayed.
import { rng } from "../server/src/physics/ed/lanczos";

const samplesDir = join(__dirname, "..", "samples");
const samples = readdirSync(samplesDir)
  .filter((f) => f.endsWith(".spw"))
  .map((f) => readFileSync(join(samplesDir, f), "utf8"));


const EXTRA = ["{", "}", "(", ")", "->", "=", ",", "^", "-", "1/0", "1e999", "K", "T", "spin", "let", "shell", "exchange", "#", '"', "[[", "]]", "all", "0"];

function mutate(text: string, random: () => number): string {
  const pieces = text.split(/(\s+)/);
  const n = 1 + Math.floor(random() * 4);
  for (let k = 0; k < n; k++) {
    const i = Math.floor(random() * pieces.length);
    const j = Math.floor(random() * pieces.length);
    switch (Math.floor(random() * 4)) {
      case 0:
        pieces.splice(i, 1);
        break;
      case 1:
        pieces.splice(i, 0, pieces[j] ?? "");
        break;
      case 2: {
        const t = pieces[i] ?? "";
        pieces[i] = pieces[j] ?? "";
        pieces[j] = t;
        break;
      }
      default:
        pieces.splice(i, 0, ` ${EXTRA[Math.floor(random() * EXTRA.length)]} `);
    }
  }
  return pieces.join("");
}

describe("random edits of the samples", () => {
  it("never throw and keep every diagnostic range inside the file (600 edits)", () => {
    const random = rng(20261202);
    for (let round = 0; round < 600; round++) {
      const base = samples[round % samples.length] as string;
      const text = mutate(base, random);
      let a;
      try {
        a = analyzeDocument(text);
      } catch (e) {
        throw new Error(`analysis threw on edit round ${round}: ${(e as Error).message}\n${text}`);
      }
      for (const d of a.diagnostics) {
        expect(d.span.start, `round ${round}`).toBeGreaterThanOrEqual(0);
        expect(d.span.end, `round ${round}`).toBeLessThanOrEqual(text.length);
        expect(d.span.end).toBeGreaterThanOrEqual(d.span.start);
        expect(d.message.length).toBeGreaterThan(10);
      }
    }
  });
});
