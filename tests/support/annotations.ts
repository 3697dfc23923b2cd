// Test helper: reads expected diagnostics written under the line they point at, as in
//     let x = 1 K + 2 T
//   #         ^^^^^^^^^ error spw-unit-mismatch
// An annotation line is a comment holding carets, a severity and a code.
export interface ExpectedDiagnostic {
  line: number;
  startCharacter: number;
  endCharacter: number;
  severity: string;
  code: string;
}

const ANNOTATION = /^(\s*#\s*)(\^+)\s+(error|warning|information|hint)\s+(spw-[a-z0-9-]+)\s*$/;

export function readAnnotations(text: string): ExpectedDiagnostic[] {
  const lines = text.split(/\r?\n/);
  const out: ExpectedDiagnostic[] = [];
  let target = -1;
  lines.forEach((line, index) => {
    const m = ANNOTATION.exec(line);
    if (!m) {
      target = index;
      return;
    }
    const start = (m[1] ?? "").length;
    out.push({ line: target, startCharacter: start, endCharacter: start + (m[2] ?? "").length, severity: m[3] ?? "", code: m[4] ?? "" });
  });
  return out;
}

export function describe(d: ExpectedDiagnostic): string {
  return `${d.line + 1}:${d.startCharacter + 1}-${d.endCharacter + 1} ${d.severity} ${d.code}`;
}
