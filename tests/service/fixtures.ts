// Model texts shared by the service and protocol tests (invented scenarios), and the `$0`
// cursor-marker helper. Test support for the service layer.
import { analyzeDocument, type DocumentAnalysis } from "../../server/src/analysis/analyze";

/** A spin-1/2 chain with J1, J2, a DM term, a no-op anisotropy and a doubled J2 bond. */
export const CHAIN = `# Invented scenario: a copper chain
model "chain-A" {
  spin 1/2
  convention antiferro-positive
  lattice chain sites Cu
  let J1 = 14.2 K
  let J2 = 0.18 * J1
  let Dz = 0.02 * J1
  exchange heisenberg(J1) on Cu -> Cu + (1)
  exchange heisenberg(J2) on Cu -> Cu + (2), shell 2
  exchange dm(Dz, (0, 0, 1)) on Cu -> Cu + (1)
  anisotropy Cu D = 0.5 K E = 0.1 K axis (0, 0, 1)
  g Cu = 2.06
  field 3.5 T along (0, 0, 1)
  cluster 16 periodic
  expect u1 about (0, 0, 1)
}
`;

/** A two-leg ladder with an anisotropic g-tensor on one leg and a tilted field. */
export const LADDER = `# Invented scenario: a ladder in a tilted field
model "ladder-B" {
  spin 1/2
  convention antiferro-positive
  lattice ladder sites A, B
  let Jleg = 1.1 meV
  let Jrung = 0.8 meV
  exchange heisenberg(Jleg) on A -> A + (1), B -> B + (1)
  exchange heisenberg(Jrung) on A -> B
  g A = (2.0, 2.0, 2.2)
  field 2 T along (1, 0, 1)
  cluster 6 periodic
}
`;

export interface Marked {
  readonly text: string;
  readonly offset: number;
}

/** Removes the `$0` marker and returns the text with the marker's offset. */
export function marked(source: string): Marked {
  const offset = source.indexOf("$0");
  if (offset < 0) throw new Error("fixture without $0 marker");
  return { text: source.slice(0, offset) + source.slice(offset + 2), offset };
}

export function analyzeMarked(source: string): { a: DocumentAnalysis; offset: number } {
  const m = marked(source);
  return { a: analyzeDocument(m.text), offset: m.offset };
}

/** Applies edits given as offset spans (non-overlapping) to a text. */
export function applyEdits(text: string, edits: readonly { span: { start: number; end: number }; newText: string }[]): string {
  const sorted = [...edits].sort((x, y) => y.span.start - x.span.start);
  let out = text;
  for (const e of sorted) out = out.slice(0, e.span.start) + e.newText + out.slice(e.span.end);
  return out;
}
