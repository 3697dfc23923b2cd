// LineIndex against a reference built from String.split on the three LSP line ends (\n, \r\n,
// \r), over random texts with and without carriage returns: the "\n only" fast path and the
// general scan must give the same positions.
import { describe, expect, it } from "vitest";
import { rng } from "../physics/ed/lanczos";
import { LineIndex } from "./text";

function referenceStarts(text: string): number[] {
  const starts = [0];
  const re = /\r\n|\r|\n/g;
  for (let m = re.exec(text); m; m = re.exec(text)) starts.push(m.index + m[0].length);
  return starts;
}

function randomText(next: () => number, alphabet: readonly string[], length: number): string {
  let s = "";
  for (let i = 0; i < length; i++) s += alphabet[Math.floor(next() * alphabet.length)];
  return s;
}

describe("LineIndex", () => {
  const cases: [string, readonly string[]][] = [
    ["\\n only", ["a", "b", " ", "\n", "\n"]],
    ["\\r\\n and \\r too", ["a", " ", "\n", "\r", "\r\n"]],
  ];
  for (const [name, alphabet] of cases) {
    it(`positionAt and offsetAt agree with the reference on random texts (${name})`, () => {
      const next = rng(7);
      for (let n = 0; n < 300; n++) {
        const text = randomText(next, alphabet, Math.floor(next() * 60));
        const index = new LineIndex(text);
        const starts = referenceStarts(text);
        expect(index.lineCount).toBe(starts.length);
        for (let offset = 0; offset <= text.length; offset++) {
          let line = 0;
          while (line + 1 < starts.length && starts[line + 1]! <= offset) line++;
          expect(index.positionAt(offset)).toEqual({ line, character: offset - starts[line]! });
        }
        for (let line = 0; line < starts.length; line++) expect(index.offsetAt({ line, character: 0 })).toBe(starts[line]);
      }
    });
  }
});
