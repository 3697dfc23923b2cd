// Semantic tokens: each name gets the type that matches what it resolves to, tokens are sorted,
// do not overlap and stay on one line.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { semanticTokens } from "../../server/src/service/semanticTokens";
import { CHAIN } from "./fixtures";

describe("semantic tokens", () => {
  const a = analyzeDocument(CHAIN);
  const tokens = semanticTokens(a);
  const at = (needle: string, delta = 0) => tokens.find((t) => t.span.start === CHAIN.indexOf(needle) + delta);

  it("classifies parameters, sites, kinds, presets, units and the model name", () => {
    expect(at("J1 = 14.2")).toMatchObject({ type: "variable", modifiers: ["declaration", "readonly"] });
    expect(at("J1)")).toMatchObject({ type: "variable", modifiers: ["readonly"] });
    expect(at("Cu -> Cu")).toMatchObject({ type: "property" });
    expect(at("heisenberg(J1)")).toMatchObject({ type: "function" });
    expect(at("chain sites")).toMatchObject({ type: "enumMember" });
    expect(at("K\n  let J2")).toMatchObject({ type: "type" });
    expect(at('"chain-A"')).toMatchObject({ type: "namespace" });
    expect(at("antiferro-positive")).toMatchObject({ type: "enumMember" });
  });

  it("gives no token to an unknown name", () => {
    const b = analyzeDocument(CHAIN.replace("heisenberg(J1)", "heisenberg(Jx)"));
    const start = b.text.indexOf("Jx");
    expect(semanticTokens(b).some((t) => t.span.start === start)).toBe(false);
  });

  it("is sorted, without overlaps, each token on one line", () => {
    for (let k = 1; k < tokens.length; k++) expect(tokens[k]!.span.start).toBeGreaterThanOrEqual(tokens[k - 1]!.span.end);
    for (const t of tokens) expect(CHAIN.slice(t.span.start, t.span.end)).not.toMatch(/[\r\n]/);
  });
});
