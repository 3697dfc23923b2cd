// Formatting: canonical output for a messy file, idempotence, and meaning preserved (the
// reformatted text is analysed again and its parameters, exchange matrices, bonds and field are
// compared with the original's). Files with syntax errors are left alone.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeDocument, type DocumentAnalysis } from "../../server/src/analysis/analyze";
import { formatDocument } from "../../server/src/service/formatting";
import { applyEdits, CHAIN, LADDER } from "./fixtures";

const MESSY = `# Invented scenario: untidy chain
model   "messy"{
spin 1/2
      convention antiferro-positive
lattice chain   sites Cu # the chain
let J1=14.2 K
let J2 = 0.18*J1


   let w = 3 cm ^ - 1
let neg = -( 2 K )  -  -1 K
exchange heisenberg( J1 ) on Cu->Cu+(1)
exchange dm(J2,(0,0,-1)) on Cu -> Cu + ( 2 )
    # a comment line inside
 field 3.5 T along (0,0,1) sweep 0 T to 10 T steps 20
exchange matrix(J1, [[1, 0, 0],
   [0, 1, 0],
        [0, 0, 1.5]]) on Cu -> Cu + (3)
}
`;

const CANONICAL = `# Invented scenario: untidy chain
model "messy" {
  spin 1/2
  convention antiferro-positive
  lattice chain sites Cu # the chain
  let J1 = 14.2 K
  let J2 = 0.18 * J1

  let w = 3 cm^-1
  let neg = -(2 K) - -1 K
  exchange heisenberg(J1) on Cu -> Cu + (1)
  exchange dm(J2, (0, 0, -1)) on Cu -> Cu + (2)
  # a comment line inside
  field 3.5 T along (0, 0, 1) sweep 0 T to 10 T steps 20
  exchange matrix(J1, [[1, 0, 0],
    [0, 1, 0],
    [0, 0, 1.5]]) on Cu -> Cu + (3)
}
`;

function format(text: string): string {
  return applyEdits(text, formatDocument(analyzeDocument(text)));
}

/** What the model means, in canonical units, for comparing two texts. */
function meaning(a: DocumentAnalysis): unknown {
  const m = a.model;
  if (!m) return null;
  return {
    parameters: [...m.parameters.values()].map((p) => [p.name, p.value?.data, p.value?.energy, p.value?.field]),
    exchanges: m.exchanges.map((e) => [e.kind, e.matrixMeV, e.bonds.map((b) => [b.from, b.to, b.offset])]),
    field: m.field && [m.field.magnitudeT, m.field.direction, m.field.sweep?.fromT, m.field.sweep?.toT, m.field.sweep?.steps],
    sites: m.lattice?.sites.map((s) => [s.name, s.spin, s.g]),
    convention: m.convention?.value,
    diagnostics: a.diagnostics.map((d) => d.code),
  };
}

describe("formatting", () => {
  it("produces the canonical layout", () => {
    expect(format(MESSY)).toBe(CANONICAL);
  });

  it("is idempotent", () => {
    for (const text of [MESSY, CHAIN, LADDER]) {
      const once = format(text);
      expect(format(once)).toBe(once);
      expect(formatDocument(analyzeDocument(once))).toEqual([]);
    }
  });

  it("preserves the meaning: same parameters, couplings, bonds and field", () => {
    for (const text of [MESSY, CHAIN, LADDER]) {
      const before = analyzeDocument(text);
      const after = analyzeDocument(format(text));
      expect(meaning(after)).toEqual(meaning(before));
    }
  });

  it("is idempotent and meaning-preserving on every sample in samples/", () => {
    const dir = join(__dirname, "..", "..", "samples");
    const files = readdirSync(dir).filter((f) => f.endsWith(".spw"));
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) {
      const text = readFileSync(join(dir, f), "utf8");
      const once = format(text);
      expect(format(once), f).toBe(once);
      expect(meaning(analyzeDocument(once)), f).toEqual(meaning(analyzeDocument(text)));
    }
  });

  it("finds every bundled sample already in canonical form", () => {
    const dir = join(__dirname, "..", "..", "samples");
    for (const f of readdirSync(dir).filter((x) => x.endsWith(".spw"))) {
      const text = readFileSync(join(dir, f), "utf8");
      expect(format(text), f).toBe(text);
    }
  });

  it("splits two statements written on one line", () => {
    const text = `model "m" {\n  spin 1/2 convention antiferro-positive\n  lattice chain\n}\n`;
    expect(format(text)).toBe(`model "m" {\n  spin 1/2\n  convention antiferro-positive\n  lattice chain\n}\n`);
  });

  it("leaves a file with syntax errors unchanged", () => {
    const broken = `model "m" {\n  let J1 = 14.2 K +\n  lattice   chain\n`;
    expect(formatDocument(analyzeDocument(broken))).toEqual([]);
  });

  it("keeps CRLF line endings", () => {
    const text = `model "m"{\r\n  lattice chain\r\nlet J = 1 meV\r\n}\r\n`;
    expect(format(text)).toBe(`model "m" {\r\n  lattice chain\r\n  let J = 1 meV\r\n}\r\n`);
  });
  it("aligns trailing comments on consecutive lines, canonically (whatever their columns before)", () => {
    const body = (a: string, b: string, c: string) => `model "c" {
  convention antiferro-positive${a}# H = +J S_i.S_j
  lattice chain sites Cu${b}# presets: chain ladder
  let J1 = 10.7 K${c}# from the fit

  g Cu = 2.06 # alone: one space
}
`;
    const expected = `model "c" {
  convention antiferro-positive # H = +J S_i.S_j
  lattice chain sites Cu        # presets: chain ladder
  let J1 = 10.7 K               # from the fit

  g Cu = 2.06 # alone: one space
}
`;
    expect(format(body(" ", " ", " "))).toBe(expected);
    expect(format(body("          ", "   ", "                     "))).toBe(expected);
    expect(format(expected)).toBe(expected);
    // A quoted name holding '#' is not a comment.
    expect(format('model "a#b" { # the model\n  spin 1/2 # spin\n}\n')).toBe('model "a#b" { # the model\n  spin 1/2    # spin\n}\n');
  });
});
