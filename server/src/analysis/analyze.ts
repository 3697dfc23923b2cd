// The analysis facade: text in, everything Spinwright knows about it out (syntax tree, semantic
// model, physics summary, diagnostics). The CLI, the language server and the tests all call this.
// Analysis layer: no I/O, no editor types.
import type { Diagnostic } from "../base/diagnostics";
import { LineIndex } from "../base/text";
import { BuildMemo, buildModel } from "../model/build";
import type { SpinModel } from "../model/model";
import { parseSpw, type ParsedFile } from "../syntax/parse";
import { analyzePhysicsKept, PhysicsMemo, type AnalysisOptions, type PhysicsSummary } from "./physics";

export interface DocumentAnalysis {
  readonly text: string;
  readonly lines: LineIndex;
  readonly parsed: ParsedFile;
  /** Null only when the file holds no model block at all. */
  readonly model: SpinModel | null;
  /** Symmetry, conventions, frustration, region, resonance and predictions; null without a model. */
  readonly physics: PhysicsSummary | null;
  /** All diagnostics, sorted by position. */
  readonly diagnostics: readonly Diagnostic[];
  /** What the next version's analysis may reuse (see BuildMemo and PhysicsMemo). */
  readonly memo: AnalysisMemo;
}

export interface AnalysisMemo {
  readonly build: BuildMemo;
  readonly physics: PhysicsMemo;
}

export interface DocumentOptions extends AnalysisOptions {
  /**
   * The analysis of the version before, for an incremental parse. It is consumed (its trees move
   * into the new analysis; see parseSpw) and must not be read afterwards.
   */
  readonly previous?: DocumentAnalysis | null;
}

export function analyzeDocument(text: string, options: DocumentOptions = {}): DocumentAnalysis {
  const parsed = parseSpw(text, options.previous?.parsed);
  const memo: AnalysisMemo = options.previous?.memo ?? { build: new BuildMemo(), physics: new PhysicsMemo() };
  const built = buildModel(parsed.ast, text, memo.build);
  const diagnostics: Diagnostic[] = [...parsed.diagnostics, ...withoutEchoes(built.diagnostics, parsed.diagnostics)];
  let physics: PhysicsSummary | null = null;
  if (built.model) {
    const result = analyzePhysicsKept(built.model, options, memo.physics);
    physics = result.summary;
    diagnostics.push(...result.diagnostics);
  }
  diagnostics.sort((a, b) => a.span.start - b.span.start || a.span.end - b.span.end);
  return { text, lines: new LineIndex(text), parsed, model: built.model, physics, diagnostics, memo };
}

/**
 * Model errors that start where a syntax error does: the parser's recovery made what the model
 * then refuses (`site A at (0, 0, 0)` reads as `site A = at(0, 0, 0)` after the missing '='), so
 * the syntax error says it first and alone.
 */
function withoutEchoes(model: readonly Diagnostic[], syntax: readonly Diagnostic[]): readonly Diagnostic[] {
  if (syntax.length === 0) return model;
  const at = new Set(syntax.filter((d) => d.severity === "error").map((d) => d.span.start));
  return model.filter((d) => !(ECHO_CODES.has(d.code) && at.has(d.span.start)));
}

/** Errors about a value, which a recovered parse can make up; block-level ones (no model) stay. */
const ECHO_CODES: ReadonlySet<string> = new Set(["spw-expr-forbidden", "spw-name-unknown", "spw-value-kind", "spw-unit-missing", "spw-unit-mismatch", "spw-unit-unknown"]);
