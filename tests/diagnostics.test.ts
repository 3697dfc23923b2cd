// Every broken-file fixture under tests/fixtures/diagnostics must produce exactly the diagnostics
// annotated under its lines: same code, severity and range, nothing more.
import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe as suite, expect, it } from "vitest";
import { analyzeDocument } from "../server/src/analysis/analyze";
import { DIAGNOSTIC_CODES } from "../server/src/base/diagnostics";
import { describe, readAnnotations } from "./support/annotations";

const dir = join(__dirname, "fixtures", "diagnostics");
const fixtures = readdirSync(dir).filter((f) => f.endsWith(".spw")).sort();

suite("diagnostic fixtures", () => {
  it("has at least 30 broken-file fixtures", () => {
    expect(fixtures.length).toBeGreaterThanOrEqual(30);
  });

  for (const name of fixtures) {
    it(name, () => {
      const text = readFileSync(join(dir, name), "utf8");
      const expected = readAnnotations(text).map(describe).sort();
      expect(expected.length).toBeGreaterThan(0);
      const a = analyzeDocument(text);
      const actual = a.diagnostics
        .map((d) => {
          const r = a.lines.range(d.span.start, d.span.end);
          // Multi-line ranges are compared on their first line only.
          const end = r.end.line === r.start.line ? r.end.character : r.start.character + 1;
          return describe({ line: r.start.line, startCharacter: r.start.character, endCharacter: end, severity: d.severity, code: d.code });
        })
        .sort();
      expect(actual).toEqual(expected);
    });
  }

  it("every code in the catalogue is exercised by a fixture or a named test", () => {
    const used = new Set(fixtures.flatMap((f) => readAnnotations(readFileSync(join(dir, f), "utf8")).map((d) => d.code)));
    // Codes raised by the physics analysis are tested in tests/physics*.test.ts.
    const analysisCodes = new Set(["spw-expect-mismatch", "spw-expect-weaker", "spw-coordination", "spw-frustrated", "spw-resonance-unprotected", "spw-anisotropy-invalid", "spw-value-kind", "spw-lattice-invalid"]);
    const missing = Object.keys(DIAGNOSTIC_CODES).filter((c) => !used.has(c) && !analysisCodes.has(c));
    expect(missing).toEqual([]);
  });
});
