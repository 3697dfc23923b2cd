// Writes docs/diagnostics.md from the diagnostic catalogue (run by tests/docs.test.ts in check
// mode, so the page can never drift from the code).
import { DIAGNOSTIC_CODES } from "../server/src/base/diagnostics";

export function diagnosticsMarkdown(): string {
  const lines = [
    "# Diagnostic codes",
    "",
    "Stable codes shared by the command line, the language server and quick fixes. Generated from",
    "`server/src/base/diagnostics.ts`; do not edit by hand.",
    "",
    "| code | default severity | meaning |",
    "|---|---|---|",
  ];
  for (const [code, [severity, summary]] of Object.entries(DIAGNOSTIC_CODES)) {
    lines.push(`| <a id="${code}"></a>\`${code}\` | ${severity} | ${summary} |`);
  }
  return lines.join("\n") + "\n";
}
