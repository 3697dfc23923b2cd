// Analysing a new version with the analysis of the version before (the incremental parse, the
// kept parameter evaluations and the kept physics) must give what a fresh analysis gives: diagnostics, the semantic
// model with its symbols, and the physics summary. Checked over chains of random edits of every
// project file, and over typing a number digit by digit in a long generated model.
import { describe, expect, it } from "vitest";
import { generatedModel } from "../service/benchmark";
import { applyEdit, mulberry32, projectTexts, randomEdit } from "../syntax/mutations.testutil";
import { analyzeDocument, type DocumentAnalysis } from "./analyze";

function expectSameAnalysis(incremental: DocumentAnalysis, fresh: DocumentAnalysis): void {
  expect(incremental.diagnostics).toEqual(fresh.diagnostics);
  expect(incremental.model).toEqual(fresh.model);
  expect(incremental.physics).toEqual(fresh.physics);
  // Every symbol and parameter span names what the text says at that place.
  for (const s of incremental.model?.symbols ?? []) expect(incremental.text.slice(s.span.start, s.span.end)).toBe(s.name);
  for (const p of incremental.model?.parameters.values() ?? []) expect(incremental.text.slice(p.nameSpan.start, p.nameSpan.end)).toBe(p.name);
}

describe("incremental analysis", () => {
  it("gives the fresh analysis after each of 1200 random edits (chains of 8 edits of project files)", () => {
    const texts = projectTexts();
    const r = mulberry32(77);
    for (let chain = 0; chain < 150; chain++) {
      let text = texts[chain % texts.length] as string;
      let analysis = analyzeDocument(text);
      for (let step = 0; step < 8; step++) {
        text = applyEdit(text, randomEdit(text, r));
        const incremental = analyzeDocument(text, { previous: analysis });
        expectSameAnalysis(incremental, analyzeDocument(text));
        analysis = incremental;
      }
    }
  });

  it("follows a value typed and deleted digit by digit in a 600-line model, parameters depending on it included", () => {
    let text = generatedModel(600);
    const at = text.indexOf("let J1 = ") + "let J1 = ".length;
    let analysis = analyzeDocument(text);
    const typed = ["9", "9.", "9.5", "9.", "9", "", "1", "12", "12.5"];
    for (const prefix of typed) {
      const next = text.slice(0, at) + prefix + text.slice(at).replace(/^[0-9.]*/, "");
      const incremental = analyzeDocument(next, { previous: analysis });
      expectSameAnalysis(incremental, analyzeDocument(next));
      analysis = incremental;
      text = next;
    }
    // D1 = 0.02 * J1 follows J1: evaluated again, not replayed.
    const d1 = analysis.model?.parameters.get("D1")?.value?.data[0];
    const j1 = analysis.model?.parameters.get("J1")?.value?.data[0];
    expect(d1).toBeCloseTo(0.02 * (j1 ?? NaN), 12);
  });

  it("keeps the physics of the version before when an edit changes nothing it reads, and only then", () => {
    const text = generatedModel(300);
    const first = analyzeDocument(text);
    // A comment typed at the top of the block moves every statement but changes no number.
    const commented = text.replace("  spin 1/2", "  # checked\n  spin 1/2");
    const second = analyzeDocument(commented, { previous: first });
    expect(second.physics).toBe(first.physics);
    expectSameAnalysis(second, analyzeDocument(commented));
    // A new value of J1 changes the couplings: the physics is worked out again.
    const changed = commented.replace("let J1 = ", "let J1 = 2");
    const third = analyzeDocument(changed, { previous: second });
    expect(third.physics).not.toBe(second.physics);
    expectSameAnalysis(third, analyzeDocument(changed));
  });

  it("replays an unchanged exchange statement only while its lattice and values read the same", () => {
    // A two-site cell; the second heisenberg bond A -> B repeats the first (a duplicate), the dm
    // term reads D, which reads J.
    const base = [
      'model "kept-exchange" {',
      "  spin 1/2",
      "  convention antiferro-positive",
      "  lattice { vector a1 = (1, 0, 0)  site A = (0, 0, 0)  site B = (0.5, 0, 0) }",
      "  let J = 10 K",
      "  let D = 0.1 * J",
      "  exchange heisenberg(J) on A -> B",
      "  exchange dm(D, (0, 0, 1)) on B -> A + (1)",
      "  exchange heisenberg(2 K) on A -> B",
      "}",
      "",
    ].join("\n");
    const versions = [
      base.replace("let J = 10 K", "let J = 10  K"), // a space: everything replays
      base.replace("site B = (0.5, 0, 0)", "site B = (0.25, 0, 0)"), // new geometry: bonds again
      base, // and back
      base.replace("site B = (0.5", "site C = (0.5"), // B unknown now: errors on every bond
      base, // back again: no stale replay from before the rename
      base.replace("let J = 10 K", "let J = 12 K"), // J and D change: both terms rebuilt
      base.replace("  exchange heisenberg(J) on A -> B\n", ""), // the duplicate is the first now
      base,
      // New geometry while J is missing (no term can be built), then J back: the terms kept from
      // the old geometry must not come back.
      base.replace("site B = (0.5, 0, 0)", "site B = (0.25, 0, 0)").replace("  let J = 10 K\n", ""),
      base.replace("site B = (0.5, 0, 0)", "site B = (0.25, 0, 0)"),
    ];
    let analysis = analyzeDocument(base);
    let dmMatrix = analysis.model?.exchanges[1]?.writtenMatrixMeV;
    for (const [k, text] of versions.entries()) {
      const incremental = analyzeDocument(text, { previous: analysis });
      expectSameAnalysis(incremental, analyzeDocument(text));
      const dm = incremental.model?.exchanges.find((t) => t.kind === "dm")?.writtenMatrixMeV;
      // Kept (the same matrix object) exactly when nothing the dm statement reads has changed.
      if (k === 0) expect(dm).toBe(dmMatrix);
      if (k === 1 || k === 5) expect(dm).not.toBe(dmMatrix);
      analysis = incremental;
      dmMatrix = dm;
    }
    expect(analysis.diagnostics.filter((d) => d.code === "spw-bond-duplicate")).toHaveLength(1);
  });
});
