// Test-only text generators for the syntax layer: a deterministic generator (mulberry32) and
// random edits of .spw texts (deletions, insertions of grammar pieces, cut ranges), so that the
// scanner and the incremental parser are checked on many broken files, not just valid ones.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { rng } from "../physics/ed/lanczos";

/** The project's deterministic generator (mulberry32), shared with the other property tests. */
export const mulberry32 = rng;

const ROOT = join(__dirname, "..", "..", "..");

/** Every .spw text bundled with the project: samples, diagnostic fixtures, grammar fixtures. */
export function projectTexts(): string[] {
  const out: string[] = [];
  const walk = (dir: string): void => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const p = join(dir, entry.name);
      if (entry.isDirectory()) walk(p);
      else if (entry.name.endsWith(".spw")) out.push(readFileSync(p, "utf8"));
    }
  };
  for (const dir of ["samples", "tests/fixtures", "grammar/tests"]) walk(join(ROOT, dir));
  return out;
}

/** Pieces of .spw that edits insert: keywords, braces, operators, comments, line ends, strays. */
export const PIECES = [
  "model", '"x"', "{", "}", "lattice", "let", "J", "=", "1", "2.5e-3", "K", "(", ")", "[", "]", ",", "->", "+", "-", "*", "/",
  "^", "spin", "site", "vector", "exchange", "heisenberg", "dm", "on", "shell", "\n", "\r\n", " ", "# note", "$", ".", '"',
  "field", "along", "sweep", "to", "steps", "g", "expect", "about", "cluster", "periodic", "anisotropy", "axis", "probe", "convention",
];

/** A replacement of text[start, end) by `insert`. */
export interface Edit {
  readonly start: number;
  readonly end: number;
  readonly insert: string;
}

export function applyEdit(text: string, e: Edit): string {
  return text.slice(0, e.start) + e.insert + text.slice(e.end);
}

/** One random edit of `text`: a deletion, an insertion of a piece or a typed character, or a cut. */
export function randomEdit(text: string, r: () => number): Edit {
  const at = Math.floor(r() * (text.length + 1));
  const kind = r();
  if (kind < 0.3) return { start: at, end: Math.min(text.length, at + 1 + Math.floor(r() * 6)), insert: "" };
  if (kind < 0.6) return { start: at, end: at, insert: PIECES[Math.floor(r() * PIECES.length)] + (r() < 0.5 ? " " : "") };
  if (kind < 0.85) return { start: at, end: at, insert: "aJ1 .e5(\"#}{".charAt(Math.floor(r() * 12)) };
  const other = Math.floor(r() * (text.length + 1));
  return { start: Math.min(at, other), end: Math.max(at, other), insert: r() < 0.5 ? "" : "\n" };
}
