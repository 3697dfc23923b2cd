// Architecture invariants of the editor layers: the service layer imports no editor or LSP
// library and nothing above it; only server/src/lsp imports vscode-languageserver; the client
// imports no analysis code (it reaches the server only by requests).
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";

const ROOT = join(__dirname, "..", "..");

function files(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...files(p));
    else if (p.endsWith(".ts")) out.push(p);
  }
  return out;
}

/** Module specifiers a file imports at run time (type-only imports vanish from the bundle). */
function imports(file: string, withTypes = true): string[] {
  const text = readFileSync(file, "utf8");
  return [...text.matchAll(/(?:^|\n)\s*(import|export)\b(\s+type\b)?[^;]*?from\s+"([^"]+)"/g)]
    .filter((m) => withTypes || !m[2])
    .map((m) => m[3] ?? "");
}

describe("layering", () => {
  it("keeps the service layer free of editor libraries and upper layers", () => {
    for (const f of files(join(ROOT, "server/src/service"))) {
      for (const i of imports(f)) {
        expect(i, f).not.toMatch(/^vscode/);
        expect(i, f).not.toMatch(/\/(lsp|cli)\//);
      }
    }
  });

  it("imports vscode-languageserver only in server/src/lsp", () => {
    for (const f of files(join(ROOT, "server/src"))) {
      if (f.includes(`${join("server", "src", "lsp")}`)) continue;
      for (const i of imports(f)) expect(i, f).not.toMatch(/^vscode-languageserver/);
    }
  });

  it("keeps the client away from the analysis code (type-only imports allowed)", () => {
    const clientFiles = files(join(ROOT, "client/src"));
    expect(clientFiles.length).toBeGreaterThan(0);
    for (const f of clientFiles) {
      for (const i of imports(f, false)) expect(i, f).not.toMatch(/server\/src\/(analysis|model|physics|syntax|service)/);
    }
  });
});
