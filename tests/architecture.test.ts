// Keeps the layering of ARCHITECTURE.md true: a forbidden import fails this test.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";

const root = join(__dirname, "..", "server", "src");

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    // Tests and test utilities may use reference libraries (mathjs eigs) that the layer may not.
    return statSync(p).isDirectory() ? files(p) : p.endsWith(".ts") && !p.endsWith(".test.ts") && !p.endsWith(".testutil.ts") ? [p] : [];
  });
}

const ALLOWED: Record<string, string[]> = {
  base: ["base"],
  syntax: ["base", "syntax"],
  physics: ["physics"],
  model: ["base", "syntax", "model", "physics"],
  analysis: ["base", "syntax", "model", "physics", "analysis"],
  render: ["base", "syntax", "model", "physics", "analysis", "render"],
  service: ["base", "syntax", "model", "physics", "analysis", "render", "service"],
  host: ["base", "syntax", "model", "physics", "analysis", "host"],
  lsp: ["base", "syntax", "model", "physics", "analysis", "render", "service", "host", "lsp"],
  cli: ["base", "syntax", "model", "physics", "analysis", "render", "service", "host", "cli"],
};

const PACKAGES_FORBIDDEN: Record<string, RegExp> = {
  base: /^(chevrotain|mathjs|vscode)/,
  syntax: /^(mathjs|vscode)/,
  physics: /^(chevrotain|mathjs|vscode)/,
  model: /^vscode/,
  analysis: /^vscode/,
  service: /^vscode-languageserver($|\/)|^vscode$/,
  cli: /^vscode/,
  host: /^vscode/,
  render: /^(vscode|chevrotain|mathjs)/,
};

describe("layering", () => {
  it("every import points to an allowed layer", () => {
    const problems: string[] = [];
    for (const file of files(root)) {
      const layer = relative(root, file).split(/[\\/]/)[0] ?? "";
      const allowed = ALLOWED[layer];
      if (!allowed) continue;
      const text = readFileSync(file, "utf8");
      for (const m of text.matchAll(/^\s*(?:import|export)[^'"]*from\s+["']([^"']+)["']/gm)) {
        const spec = m[1] ?? "";
        if (spec.startsWith(".")) {
          const target = relative(root, join(file, "..", spec)).split(/[\\/]/)[0] ?? "";
          if (!allowed.includes(target)) problems.push(`${relative(root, file)} imports ${spec} (${layer} -> ${target})`);
        } else if (PACKAGES_FORBIDDEN[layer]?.test(spec) && !spec.startsWith("node:")) {
          problems.push(`${relative(root, file)} imports package ${spec}`);
        }
      }
    }
    expect(problems).toEqual([]);
  });
});
