// Completion at the service boundary, one `$0` fixture per context: statement keywords, defined
// names in expressions, sites after `on` and `->`, presets after `lattice`, exchange kinds after
// `exchange`, units after a number, clause words, silence in comments.
import { describe, expect, it } from "vitest";
import { PRESETS } from "../../server/src/model/lattice";
import { EXCHANGE_KINDS } from "../../server/src/model/model";
import { ENERGY_UNIT_NAMES, FIELD_UNIT_NAMES } from "../../server/src/model/units";
import { doComplete } from "../../server/src/service/completion";
import { STATEMENT_WORDS } from "../../server/src/service/vocabulary";
import { analyzeMarked } from "./fixtures";

const HEAD = `model "m" {
  spin 1/2
  convention antiferro-positive
  lattice ladder sites A, B
  let J1 = 1.1 meV
  let Jr = 0.5 * J1
`;

function labels(source: string): string[] {
  const { a, offset } = analyzeMarked(source);
  return doComplete(a, offset).map((i) => i.label);
}

describe("completion", () => {
  it("offers the statement keywords at the start of a statement", () => {
    const got = labels(`${HEAD}  $0\n}\n`);
    expect(got.sort()).toEqual(STATEMENT_WORDS.map((w) => w.word).sort());
  });

  it("offers the model block at the top level", () => {
    expect(labels(`# a comment\n$0`)).toEqual(["model"]);
  });

  it("offers defined names and constants in an expression, not the name being defined", () => {
    const got = labels(`${HEAD}  let J2 = 0.2 * $0\n}\n`);
    expect(got).toEqual(expect.arrayContaining(["J1", "Jr", "pi", "muB"]));
    expect(got).not.toContain("J2");
    expect(got).not.toContain("spin");
  });

  it("offers defined names inside the arguments of an exchange kind", () => {
    expect(labels(`${HEAD}  exchange heisenberg($0) on A -> B\n}\n`)).toEqual(expect.arrayContaining(["J1", "Jr"]));
  });

  it("offers the sites (and shell) after `on`", () => {
    const got = labels(`${HEAD}  exchange heisenberg(J1) on $0\n}\n`);
    expect(got.sort()).toEqual(["A", "B", "shell"]);
  });

  it("offers the sites after `->` and after a comma in the bond list", () => {
    expect(labels(`${HEAD}  exchange heisenberg(J1) on A -> $0\n}\n`).sort()).toEqual(["A", "B"]);
    expect(labels(`${HEAD}  exchange heisenberg(J1) on A -> B, $0\n}\n`).sort()).toEqual(["A", "B", "shell"]);
  });

  it("offers the presets after `lattice`, replacing the typed prefix", () => {
    const { a, offset } = analyzeMarked(`model "m" {\n  lattice tri$0\n}\n`);
    const items = doComplete(a, offset);
    expect(items.map((i) => i.label).sort()).toEqual(Object.keys(PRESETS).sort());
    const start = offset - "tri".length;
    expect(items[0]?.replaceSpan).toEqual({ start, end: offset });
  });

  it("offers the exchange kinds after `exchange`", () => {
    expect(labels(`${HEAD}  exchange $0\n}\n`).sort()).toEqual([...EXCHANGE_KINDS].sort());
  });

  it("offers energy units after a coupling value and field units after a field value", () => {
    const energy = labels(`${HEAD}  anisotropy A D = 2 $0\n}\n`);
    expect(energy.sort()).toEqual([...ENERGY_UNIT_NAMES].sort());
    const field = labels(`${HEAD}  field 3 $0\n}\n`);
    expect(field.sort()).toEqual([...FIELD_UNIT_NAMES].sort());
    const letUnits = labels(`${HEAD}  let h = 3 $0\n}\n`);
    expect(letUnits).toEqual(expect.arrayContaining(["K", "meV", "cm^-1", "T"]));
  });

  it("offers no unit after a spin length or a cell offset, and boundaries after a cluster size", () => {
    expect(labels(`model "m" {\n  spin 1/2 $0\n}\n`)).toEqual([]);
    expect(labels(`${HEAD}  cluster 8 $0\n}\n`).sort()).toEqual(["open", "periodic"]);
  });

  it("offers the clause words a statement may go on with", () => {
    expect(labels(`${HEAD}  exchange heisenberg(J1) $0\n}\n`)).toEqual(["on"]);
    expect(labels(`${HEAD}  field 3 T $0\n}\n`).sort()).toEqual(["along", "sweep"]);
    expect(labels(`${HEAD}  convention $0\n}\n`).sort()).toEqual(["antiferro-positive", "ferro-positive"]);
    expect(labels(`${HEAD}  expect $0\n}\n`).sort()).toEqual(["none", "su2", "u1"]);
  });

  it("stays quiet inside a comment and after `let`", () => {
    expect(labels(`${HEAD}  # exchange $0\n}\n`)).toEqual([]);
    expect(labels(`${HEAD}  let $0\n}\n`)).toEqual([]);
  });
});
