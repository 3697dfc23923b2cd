// Folding ranges: the model block, a custom lattice block, statements that span several lines
// (matrices) and runs of comment lines. Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import { spanLines } from "./common";

export interface FoldingRange {
  readonly startLine: number;
  readonly endLine: number;
  readonly kind?: "comment" | "region";
}

export function foldingRanges(a: DocumentAnalysis): FoldingRange[] {
  const out: FoldingRange[] = [];
  // A block folds up to the line before its closing brace, so the brace stays visible.
  const block = (startLine: number, closeLine: number, closed: boolean): void => {
    const endLine = closed ? closeLine - 1 : closeLine;
    if (endLine > startLine) out.push({ startLine, endLine });
  };
  for (const m of a.parsed.ast.models) {
    const { startLine } = spanLines(a, m.keywordSpan);
    const close = m.closeSpan ? spanLines(a, m.closeSpan).startLine : spanLines(a, m.span).endLine;
    block(startLine, close, m.closeSpan !== undefined);
    for (const s of m.statements) {
      const lines = spanLines(a, s.span);
      if (lines.endLine <= lines.startLine) continue;
      const closed = s.kind === "latticeCustom" && a.text[s.span.end - 1] === "}";
      block(lines.startLine, lines.endLine, closed);
    }
  }
  let run: { start: number; end: number } | null = null;
  const flush = (): void => {
    if (run && run.end > run.start) out.push({ startLine: run.start, endLine: run.end, kind: "comment" });
    run = null;
  };
  for (const c of a.parsed.comments) {
    const line = a.lines.positionAt(c.startOffset).line;
    const lineStart = a.lines.offsetAt({ line, character: 0 });
    const ownLine = a.text.slice(lineStart, c.startOffset).trim() === "";
    if (!ownLine) {
      flush();
      continue;
    }
    if (run && line === run.end + 1) run.end = line;
    else {
      flush();
      run = { start: line, end: line };
    }
  }
  flush();
  return out.sort((x, y) => x.startLine - y.startLine || y.endLine - x.endLine);
}
