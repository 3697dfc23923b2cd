// Analysing a new version with the analysis of the version before (the incremental parse, the
// kept parameter evaluations and the kept physics) must give what a fresh analysis gives: diagnostics, the semantic
// model with its symbols, and the physics summary. Checked over chains of random edits of every
// project file, and over typing a number digit by digit in a long generated model.
import { describe, expect, it } from "vitest";
import { generatedModel } from "../service/benchmark";
import { applyEdit, mulberry32, projectTexts, randomEdit } from "../syntax/mutations.testutil";
import type { SymbolOccurrence } from "../model/model";
import { analyzeDocument, type DocumentAnalysis } from "./analyze";

/** Symbol occurrences in source order (the model's list has no meaningful order). */
function inSourceOrder(symbols: readonly SymbolOccurrence[]): SymbolOccurrence[] {
  return [...symbols].sort((x, y) => x.span.start - y.span.start || x.span.end - y.span.end || Number(y.isDefinition) - Number(x.isDefinition) || x.kind.localeCompare(y.kind));
}

function expectSameAnalysis(incremental: DocumentAnalysis, fresh: DocumentAnalysis): void {
  expect(incremental.diagnostics).toEqual(fresh.diagnostics);
  const { symbols: a, ...incrementalModel } = incremental.model ?? { symbols: [] };
  const { symbols: b, ...freshModel } = fresh.model ?? { symbols: [] };
  expect(incrementalModel).toEqual(freshModel);
  expect(inSourceOrder(a)).toEqual(inSourceOrder(b));
  expect(incremental.model === null).toBe(fresh.model === null);
  expect(incremental.physics).toEqual(fresh.physics);
  // Every symbol and parameter span names what the text says at that place.
  for (const s of incremental.model?.symbols ?? []) expect(incremental.text.slice(s.span.start, s.span.end)).toBe(s.name);
  for (const p of incremental.model?.parameters.values() ?? []) expect(incremental.text.slice(p.nameSpan.start, p.nameSpan.end)).toBe(p.name);
}

/**
 * What an analysis says, copied: diagnostics, model and physics with every span at its place at
 * the time of copying (the next incremental parse moves the trees of the version before).
 */
function snapshot(a: DocumentAnalysis): unknown {
  const { symbols, ...model } = a.model ?? { symbols: [] };
  return structuredClone({ diagnostics: a.diagnostics, model, symbols: inSourceOrder(symbols), physics: a.physics, hasModel: a.model !== null });
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

  it("gives the fresh analysis after each of 800 random edits with no fresh analysis in between", () => {
    // The analysis layer keeps the last result of some steps (frustration, coupling summaries,
    // chain sums) for the objects the build hands over; a fresh analysis between two edits would
    // replace them, so here each chain runs on its own and is compared afterwards.
    const texts = projectTexts();
    const r = mulberry32(78);
    for (let chain = 0; chain < 100; chain++) {
      let text = texts[chain % texts.length] as string;
      let analysis = analyzeDocument(text);
      const seen: { text: string; copy: unknown }[] = [];
      for (let step = 0; step < 8; step++) {
        text = applyEdit(text, randomEdit(text, r));
        analysis = analyzeDocument(text, { previous: analysis });
        seen.push({ text, copy: snapshot(analysis) });
      }
      for (const { text: t, copy } of seen) expect(copy).toEqual(snapshot(analyzeDocument(t)));
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

  it("takes over the parameters of the build before only where no edit reaches: cycles, chains, forward reads, diagnostics", () => {
    const base = [
      'model "parameter-take-over" {',
      "  spin 1/2",
      "  convention antiferro-positive",
      "  lattice chain sites Cu",
      "  let D = 0.1 * J", // reads J before its definition
      "  let J = 10 K",
      "  let E = 2 * D", // a chain J -> D -> E
      "  let a = b + 1 K", // a cycle a -> b -> a, in no edited statement
      "  let b = a",
      "  let u = 5 furlongs", // a diagnostic of its own
      "  let c = 3 K",
      "  exchange heisenberg(J) on Cu -> Cu + (1)",
      "  exchange dm(E, (0, 0, 1)) on Cu -> Cu + (1)",
      "}",
      "",
    ].join("\n");
    const versions = [
      base.replace("  spin 1/2", "  # a comment above everything\n  spin 1/2"), // every statement moves
      base.replace("let J = 10 K", "let J = 12 K"), // D and E follow J
      base.replace("let c = 3 K", "let c = 2 * J"), // c now reads J
      base.replace("let c = 3 K", "let c = 2 * J").replace("let J = 10 K", "let J = 11 K"), // and follows it
      base.replace("let b = a", "let b = 4 K"), // the cycle is gone
      base.replace("let c = 3 K", "let c = c"), // a new cycle in an edited statement
      base,
      base.replace("let u = 5 furlongs", "let u = 5 K"), // the diagnostic goes
      base.replace("exchange heisenberg(J)", "exchange heisenberg(c)"), // no let changed
    ];
    let analysis = analyzeDocument(base);
    for (const text of versions) {
      const incremental = analyzeDocument(text, { previous: analysis });
      expectSameAnalysis(incremental, analyzeDocument(text));
      analysis = incremental;
    }
    // The cycle and the unknown unit are reported after edits elsewhere too.
    const edited = analyzeDocument(base.replace("let J = 10 K", "let J = 9 K"), { previous: analyzeDocument(base) });
    expect(edited.diagnostics.map((d) => d.code)).toEqual(expect.arrayContaining(["spw-param-cycle", "spw-unit-unknown"]));
  });

  it("hands out the lattice and the exchange terms of the version before while they read the same, and new ones otherwise", () => {
    const base = [
      'model "kept-objects" {',
      "  spin 1/2",
      "  lattice chain sites Cu",
      "  let J = 10 K",
      "  let D = 0.1 * J",
      "  exchange heisenberg(J) on Cu -> Cu + (1)",
      "  exchange dm(D, (0, 0, 1)) on Cu -> Cu + (1)",
      "  exchange heisenberg(J) on Cu -> Cu + (2)",
      "  g Cu = 2.1",
      "  field 1 T along (0, 0, 1)",
      "}",
      "",
    ].join("\n");
    const before = analyzeDocument(base);
    const next = (text: string, previous: DocumentAnalysis): DocumentAnalysis => {
      const a = analyzeDocument(text, { previous });
      expectSameAnalysis(a, analyzeDocument(text));
      return a;
    };
    const terms = before.model?.exchanges ?? [];
    const lattice = before.model?.lattice;
    expect(terms).toHaveLength(3);
    // A comment above everything moves every statement: the same objects, moved in place.
    const moved = next(base.replace("  spin 1/2", "  # a note\n  spin 1/2"), before);
    expect(moved.model?.lattice).toBe(lattice);
    moved.model?.exchanges.forEach((t, k) => expect(t).toBe(terms[k]));
    // A new value of J: the two terms that read it are new, the DM term follows D = 0.1 * J too.
    const valued = next(moved.text.replace("let J = 10 K", "let J = 11 K"), moved);
    expect(valued.model?.lattice).toBe(lattice);
    expect(valued.model?.exchanges.some((t) => terms.includes(t))).toBe(false);
    // A new g-tensor: a new lattice (the terms' bonds read the same, so they stay).
    const kept = valued.model?.exchanges ?? [];
    const gChanged = next(valued.text.replace("g Cu = 2.1", "g Cu = 2.2"), valued);
    expect(gChanged.model?.lattice).not.toBe(lattice);
    expect(gChanged.model?.lattice?.sites[0]?.g[0][0]).toBeCloseTo(2.2, 12);
    gChanged.model?.exchanges.forEach((t, k) => expect(t).toBe(kept[k]));
    // The convention flips every matrix: new terms.
    const flipped = next(gChanged.text.replace("  spin 1/2", "  spin 1/2\n  convention ferro-positive"), gChanged);
    expect(flipped.model?.exchanges.some((t) => kept.includes(t))).toBe(false);
  });

  it("hands out the physics diagnostics of the version before when a new value leaves them reading the same", () => {
    const base = generatedModel(60);
    const before = analyzeDocument(base);
    const physicsCodes = ["spw-resonance-unprotected", "spw-expect-weaker"];
    const old = before.diagnostics.filter((d) => physicsCodes.includes(d.code));
    expect(old).toHaveLength(2);
    // J1 changes the DM term's value (D1 = 0.02 J1) and the physics is computed again, but
    // the messages read the same at the same statements: the same objects, equal to a fresh analysis.
    const valued = analyzeDocument(base.replace("let J1 = 10.37 K", "let J1 = 110.37 K"), { previous: before });
    expectSameAnalysis(valued, analyzeDocument(valued.text));
    expect(valued.physics).not.toBe(before.physics);
    for (const d of old) expect(valued.diagnostics).toContain(d);
    // A claim that changes the message: a new object with the new text.
    const claimed = analyzeDocument(valued.text.replace("expect none", "expect su2"), { previous: valued });
    expectSameAnalysis(claimed, analyzeDocument(claimed.text));
    const mismatch = claimed.diagnostics.find((d) => d.code === "spw-expect-mismatch");
    expect(mismatch).toBeDefined();
    expect(old).not.toContain(mismatch);
  });
});
