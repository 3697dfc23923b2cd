// Source positions and ranges shared by every layer (zero-based lines and characters, as in
// LSP, with UTF-16 offsets). Base layer: imports nothing.

export interface Position {
  readonly line: number;
  readonly character: number;
}

export interface Range {
  readonly start: Position;
  readonly end: Position;
}

/** Maps offsets in a text to line/character positions and back. */
export class LineIndex {
  private readonly lineStarts: number[];

  constructor(readonly text: string) {
    const starts = [0];
    if (text.indexOf("\r") < 0) {
      // Only "\n" line ends (the common case): let the engine's indexOf find them.
      for (let i = text.indexOf("\n"); i >= 0; i = text.indexOf("\n", i + 1)) starts.push(i + 1);
      this.lineStarts = starts;
      return;
    }
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      if (c === 10) starts.push(i + 1);
      else if (c === 13) {
        if (text.charCodeAt(i + 1) === 10) i++;
        starts.push(i + 1);
      }
    }
    this.lineStarts = starts;
  }

  get lineCount(): number {
    return this.lineStarts.length;
  }

  positionAt(offset: number): Position {
    const clamped = Math.max(0, Math.min(offset, this.text.length));
    let lo = 0;
    let hi = this.lineStarts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if ((this.lineStarts[mid] ?? 0) <= clamped) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo, character: clamped - (this.lineStarts[lo] ?? 0) };
  }

  offsetAt(position: Position): number {
    if (position.line < 0) return 0;
    if (position.line >= this.lineStarts.length) return this.text.length;
    const start = this.lineStarts[position.line] ?? 0;
    const next = this.lineStarts[position.line + 1] ?? this.text.length + 1;
    return Math.min(start + Math.max(0, position.character), Math.max(start, next - 1), this.text.length);
  }

  range(startOffset: number, endOffset: number): Range {
    return { start: this.positionAt(startOffset), end: this.positionAt(endOffset) };
  }
}

/** Offsets [start, end) of a piece of source. */
export interface Span {
  readonly start: number;
  readonly end: number;
}

export function spanUnion(a: Span, b: Span): Span {
  return { start: Math.min(a.start, b.start), end: Math.max(a.end, b.end) };
}

export function containsOffset(span: Span, offset: number): boolean {
  return offset >= span.start && offset <= span.end;
}
