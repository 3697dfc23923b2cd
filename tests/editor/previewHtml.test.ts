// The preview panel's HTML: a strict CSP with one nonce, no network sources, every text from the
// file escaped, theme colours from VS Code's CSS variables.
import { describe, expect, it } from "vitest";
import { escapeHtml, makeNonce, previewDocument, summaryBody } from "../../client/src/previewHtml";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { DEFAULT_SETTINGS } from "../../server/src/service/common";
import { analysisSummary } from "../../server/src/service/summary";
import { CHAIN } from "../service/fixtures";

describe("preview HTML", () => {
  const summary = analysisSummary(analyzeDocument(CHAIN.replace('"chain-A"', '"<script>alert(1)</script>"')), DEFAULT_SETTINGS);
  const body = summaryBody(summary, "chain.spw");
  const nonce = makeNonce();
  const html = previewDocument(body, nonce, "vscode-webview://abc");

  it("uses a CSP that allows only the nonce's style and script and no network", () => {
    const csp = /Content-Security-Policy" content="([^"]*)"/.exec(html)?.[1] ?? "";
    expect(csp).toContain("default-src 'none'");
    expect(csp).toContain(`script-src 'nonce-${nonce}'`);
    expect(html).not.toMatch(/https?:\/\//);
    const scripts = html.match(/<script[^>]*>/g) ?? [];
    expect(scripts).toEqual([`<script nonce="${nonce}">`]);
  });

  it("escapes text taken from the file", () => {
    expect(body).not.toContain("<script>alert(1)</script>");
    expect(body).toContain(escapeHtml("<script>alert(1)</script>"));
  });

  it("shows parameters, the Zeeman energy and the diagnostics, in theme colours", () => {
    expect(body).toContain("<td>J1</td>");
    expect(body).toMatch(/g μB B = [0-9.]+ meV/);
    expect(body).toContain("spw-bond-duplicate");
    expect(html).toContain("var(--vscode-foreground)");
  });

  it("lists each breaking term by its line and its sentence, without a kind prefix", () => {
    // CHAIN: the DM term is on line 11; its sentence names it ("A DM vector breaks SU(2): ...").
    const symmetry = summary.physics.find((i) => i.title === "Symmetry");
    expect(symmetry?.lines.filter((l) => l.startsWith("line "))).toEqual([expect.stringMatching(/^line 11: A DM vector breaks SU\(2\): /)]);
    expect(symmetry?.lines.some((l) => l.startsWith("dm: "))).toBe(false);
  });

  it("makes a different 32-character nonce each time", () => {
    expect(makeNonce()).toMatch(/^[A-Za-z0-9]{32}$/);
    expect(makeNonce()).not.toBe(makeNonce());
  });
});
