// A JSON document of a given number of lines holding the same kind of content as the generated
// .spw benchmark model (named couplings with units, bonds, g, field), and a JSON Schema for it
// with descriptions (so that validation and hover have real work), and the JSON language service
// configured with it, as both the reference server and the in-process comparison use it.
// Invented benchmark data.
import { getLanguageService, type JSONSchema, type LanguageService } from "vscode-json-languageservice";

export const BENCH_JSON_SCHEMA_URI = "spinwright-bench://model.schema.json";

export const BENCH_JSON_SCHEMA: JSONSchema = {
  $schema: "http://json-schema.org/draft-07/schema#",
  type: "object",
  required: ["model", "spin", "couplings", "bonds"],
  additionalProperties: false,
  properties: {
    model: { type: "string", description: "Name of the model." },
    spin: { type: "string", enum: ["1/2", "1", "3/2"], description: "Spin length." },
    couplings: {
      type: "array",
      items: {
        type: "object",
        required: ["name", "value", "unit"],
        additionalProperties: false,
        properties: {
          name: { type: "string", pattern: "^[A-Za-z][A-Za-z0-9_]*$", description: "Coupling name." },
          value: { type: "number", description: "Coupling value in `unit`." },
          unit: { type: "string", enum: ["K", "meV", "GHz"], description: "Energy unit." },
        },
      },
    },
    bonds: {
      type: "array",
      items: {
        type: "object",
        required: ["kind", "coupling", "distance"],
        additionalProperties: false,
        properties: {
          kind: { type: "string", enum: ["heisenberg", "dm", "xxz", "xyz"], description: "Exchange kind." },
          coupling: { type: "string", description: "Name of a coupling." },
          distance: { type: "integer", minimum: 1, description: "Bond length in cells." },
        },
      },
    },
    g: { type: "number", description: "Isotropic g-factor." },
    field: { type: "object", properties: { tesla: { type: "number", description: "Field strength in tesla." } }, description: "Applied field." },
  },
};

/** A pretty-printed JSON model of about `lines` lines (5 lines per coupling). */
export function generatedJson(lines: number): string {
  const couplings: string[] = [];
  const perCoupling = 5;
  const n = Math.max(1, Math.floor((lines - 20) / perCoupling));
  for (let k = 1; k <= n; k++) {
    couplings.push(`    {\n      "name": "J${k}",\n      "value": ${(10 + k * 0.37).toFixed(2)},\n      "unit": "K"\n    }`);
  }
  const bonds = [1, 2, 3].map((d) => `    { "kind": "heisenberg", "coupling": "J${d}", "distance": ${d} }`);
  return `{\n  "model": "bench",\n  "spin": "1/2",\n  "couplings": [\n${couplings.join(",\n")}\n  ],\n  "bonds": [\n${bonds.join(",\n")}\n  ],\n  "g": 2.06,\n  "field": { "tesla": 3.5 }\n}\n`;
}

/** The JSON language service as the benchmark uses it: validation against BENCH_JSON_SCHEMA, no network. */
export function benchJsonService(): LanguageService {
  const service = getLanguageService({ schemaRequestService: () => Promise.reject(new Error("no network")) });
  service.configure({ validate: true, allowComments: false, schemas: [{ uri: BENCH_JSON_SCHEMA_URI, fileMatch: ["*.json"], schema: BENCH_JSON_SCHEMA }] });
  return service;
}
