// The analysis cache of the language server, keyed by document uri and version (each new version
// is parsed incrementally from the one before, which it replaces), and the debouncer that analyses after a pause in typing and drops work for versions that are no
// longer current. LSP layer (no vscode-languageserver import needed: plain TypeScript).
import { analyzeDocument, type DocumentAnalysis } from "../analysis/analyze";

export interface VersionedText {
  readonly uri: string;
  readonly version: number;
  getText(): string;
}

export interface CachedAnalysis {
  readonly uri: string;
  readonly version: number;
  /** Null when the analysis itself failed (logged); features then answer with nothing. */
  readonly analysis: DocumentAnalysis | null;
  /** Changes with every new analysis: the pull-diagnostics result id. */
  readonly resultId: string;
  /** Milliseconds the analysis took. */
  readonly elapsedMs: number;
}

export class AnalysisCache {
  private readonly entries = new Map<string, CachedAnalysis>();
  private serial = 0;

  constructor(
    private readonly onError: (uri: string, error: unknown) => void,
    /** Analyses a text; `previous` is the analysis of an earlier version, which it consumes. */
    private readonly analyze: (text: string, previous: DocumentAnalysis | null) => DocumentAnalysis = (text, previous) => analyzeDocument(text, { previous }),
  ) {}

  /** The analysis of exactly this version, computed now if it is not cached. */
  get(doc: VersionedText): CachedAnalysis {
    const cached = this.entries.get(doc.uri);
    if (cached && cached.version === doc.version) return cached;
    const started = performance.now();
    let analysis: DocumentAnalysis | null = null;
    // The cached analysis is replaced below, so the new one may take over its trees.
    const previous = cached && cached.version < doc.version ? cached.analysis : null;
    try {
      analysis = this.analyze(doc.getText(), previous);
    } catch (error) {
      this.onError(doc.uri, error);
    }
    const entry: CachedAnalysis = { uri: doc.uri, version: doc.version, analysis, resultId: `${++this.serial}`, elapsedMs: performance.now() - started };
    this.entries.set(doc.uri, entry);
    return entry;
  }

  peek(uri: string): CachedAnalysis | undefined {
    return this.entries.get(uri);
  }

  delete(uri: string): void {
    this.entries.delete(uri);
  }
}

/**
 * Runs one job per document after `delayMs` of quiet; a newer schedule replaces the older. One
 * timer per quiet spell: a keystroke only moves the due time, and a timer that fires early sets
 * itself again for the rest (clearing and setting a timer on every keystroke costs more than the
 * rest of a small keystroke's bookkeeping).
 */
export class Debouncer {
  private readonly pending = new Map<string, { job: () => void; due: number; timer: ReturnType<typeof setTimeout> }>();

  constructor(private readonly delayMs: number) {}

  schedule(uri: string, job: () => void): void {
    const due = Date.now() + this.delayMs;
    const p = this.pending.get(uri);
    if (p) {
      p.job = job;
      p.due = due;
    } else this.pending.set(uri, { job, due, timer: setTimeout(() => this.fire(uri), this.delayMs) });
  }

  private fire(uri: string): void {
    const p = this.pending.get(uri);
    if (!p) return;
    const wait = p.due - Date.now();
    if (wait > 0) {
      p.timer = setTimeout(() => this.fire(uri), wait);
      return;
    }
    this.pending.delete(uri);
    p.job();
  }

  cancel(uri: string): void {
    const p = this.pending.get(uri);
    if (p) clearTimeout(p.timer);
    this.pending.delete(uri);
  }

  cancelAll(): void {
    for (const uri of [...this.pending.keys()]) this.cancel(uri);
  }
}
