// Renders diagnostics for the terminal (file:line:col: severity code: message), as JSON with
// LSP-style zero-based ranges, and as SARIF 2.1.0 for code-review annotations. CLI layer.
import { DIAGNOSTIC_CODES, type Diagnostic } from "../base/diagnostics";
import type { LineIndex, Range } from "../base/text";

export interface FileDiagnostics {
  readonly file: string;
  readonly lines: LineIndex;
  readonly diagnostics: readonly Diagnostic[];
}

export function rangeOf(lines: LineIndex, d: { span: { start: number; end: number } }): Range {
  return lines.range(d.span.start, d.span.end);
}

export function formatText(files: readonly FileDiagnostics[]): string {
  const out: string[] = [];
  for (const f of files) {
    for (const d of f.diagnostics) {
      const p = f.lines.positionAt(d.span.start);
      out.push(`${f.file}:${p.line + 1}:${p.character + 1}: ${d.severity} ${d.code}: ${d.message}`);
      for (const r of d.related ?? []) {
        const q = f.lines.positionAt(r.span.start);
        out.push(`  ${f.file}:${q.line + 1}:${q.character + 1}: note: ${r.message}`);
      }
    }
  }
  return out.join("\n");
}

export function formatJson(files: readonly FileDiagnostics[]): string {
  const items = files.flatMap((f) =>
    f.diagnostics.map((d) => ({
      file: f.file,
      range: rangeOf(f.lines, d),
      severity: d.severity,
      code: d.code,
      message: d.message,
      ...(d.related?.length
        ? { related: d.related.map((r) => ({ range: rangeOf(f.lines, r), message: r.message })) }
        : {}),
    })),
  );
  return JSON.stringify(items, null, 2);
}

const SARIF_LEVEL = { error: "error", warning: "warning", information: "note", hint: "note" } as const;

export function formatSarif(files: readonly FileDiagnostics[], toolVersion: string): string {
  const usedCodes = [...new Set(files.flatMap((f) => f.diagnostics.map((d) => d.code)))].sort();
  const region = (lines: LineIndex, span: { start: number; end: number }): object => {
    const r = lines.range(span.start, span.end);
    return { startLine: r.start.line + 1, startColumn: r.start.character + 1, endLine: r.end.line + 1, endColumn: r.end.character + 1 };
  };
  const sarif = {
    $schema: "https://json.schemastore.org/sarif-2.1.0.json",
    version: "2.1.0",
    runs: [
      {
        tool: {
          driver: {
            name: "spinwright",
            version: toolVersion,
            informationUri: "https://example.invalid/spinwright",
            rules: usedCodes.map((code) => ({
              id: code,
              shortDescription: { text: DIAGNOSTIC_CODES[code][1] },
              defaultConfiguration: { level: SARIF_LEVEL[DIAGNOSTIC_CODES[code][0]] },
              helpUri: `docs/diagnostics.md#${code}`,
            })),
          },
        },
        results: files.flatMap((f) =>
          f.diagnostics.map((d) => ({
            ruleId: d.code,
            ruleIndex: usedCodes.indexOf(d.code),
            level: SARIF_LEVEL[d.severity],
            message: { text: d.message },
            locations: [
              { physicalLocation: { artifactLocation: { uri: f.file.replace(/\\/g, "/") }, region: region(f.lines, d.span) } },
            ],
            ...(d.related?.length
              ? {
                  relatedLocations: d.related.map((r, id) => ({
                    id,
                    message: { text: r.message },
                    physicalLocation: { artifactLocation: { uri: f.file }, region: region(f.lines, r.span) },
                  })),
                }
              : {}),
          })),
        ),
      },
    ],
  };
  return JSON.stringify(sarif, null, 2);
}
