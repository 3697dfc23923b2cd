// Documentation that must stay true: docs/diagnostics.md matches the catalogue, and every sample
// named in the README exists and is an invented scenario.
import { readFileSync, readdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { diagnosticsMarkdown } from "../scripts/genDiagnosticsDoc";

const root = join(__dirname, "..");

describe("docs", () => {
  it("docs/diagnostics.md lists exactly the catalogue (regenerate with UPDATE_DOCS=1)", () => {
    const path = join(root, "docs", "diagnostics.md");
    const expected = diagnosticsMarkdown();
    if (process.env["UPDATE_DOCS"]) writeFileSync(path, expected);
    expect(readFileSync(path, "utf8")).toBe(expected);
  });

  it("every sample says it is an invented scenario", () => {
    const dirs = [join(root, "samples"), join(root, "samples", "broken")];
    for (const d of dirs)
      for (const f of readdirSync(d).filter((x) => x.endsWith(".spw")))
        expect(readFileSync(join(d, f), "utf8"), f).toMatch(/Invented scenario/);
  });
});

describe("JSON schemas", () => {
  it("spinwright export output validates against docs/cluster.schema.json (ajv)", async () => {
    const Ajv = (await import("ajv")).default;
    const { analyzeDocument } = await import("../server/src/analysis/analyze");
    const { exportCluster } = await import("../server/src/model/exportCluster");
    const schema = JSON.parse(readFileSync(join(root, "docs", "cluster.schema.json"), "utf8"));
    const validate = new Ajv({ allErrors: true }).compile(schema);
    for (const f of readdirSync(join(root, "samples")).filter((x) => x.endsWith(".spw"))) {
      const a = analyzeDocument(readFileSync(join(root, "samples", f), "utf8"));
      if (!a.model) throw new Error(f);
      const e = exportCluster(a.model, a.model.lattice?.dimension === 2 ? [3, 3] : [6]);
      if (!e.ok) throw new Error(e.reason);
      const ok = validate(e.json);
      expect(validate.errors ?? [], f).toEqual([]);
      expect(ok).toBe(true);
    }
    // The schema is not vacuous: a broken document fails.
    expect(validate({ format: "spinwright-cluster" })).toBe(false);
  });
});
