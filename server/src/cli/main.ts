// The `spinwright` command line: check, export, report, analyze (more commands plug in here).
// A thin shell over the analysis facade: reads files, prints, sets the exit code. CLI layer.
import { readFileSync, writeFileSync } from "node:fs";
import { analyzeDocument, type DocumentAnalysis } from "../analysis/analyze";
import { analysisJson } from "../analysis/json";
import { diffModels, renderDiff } from "../analysis/diff";
import { exportCluster } from "../model/exportCluster";
import { formatJson, formatSarif, formatText, type FileDiagnostics } from "./format";
import { renderReport } from "./report";
import { renderPlotSvg } from "../render/plot";
import { CliFailure, runCalibration, runSolve, solveJson, solveText } from "./solve";
import type { ExactCalibration } from "../analysis/predictions";

export const VERSION = "0.1.0";

const USAGE = `spinwright ${VERSION}: checks spin-model definition files (.spw)

Usage:
  spinwright check FILE... [--format text|json|sarif] [--output PATH]
  spinwright report FILE... [--exact [--sites N]]
  spinwright analyze FILE... [--format json] [--exact [--sites N]]
  spinwright solve FILE [--sites N] [--format text|json]
  spinwright plot FILE [--exact [--sites N]] -o OUT.svg
  spinwright diff OLD.spw NEW.spw [--format text|json|markdown]
  spinwright export FILE [--cluster N | --cluster N,M] [--output PATH]
  spinwright help

Exit codes: 0 no errors, 1 errors found, 2 usage or file problems.`;

class UsageError extends Error {}

interface Parsed {
  command: string;
  files: string[];
  options: Map<string, string>;
}

const VALUE_OPTIONS = new Set(["--format", "--output", "-o", "--cluster", "--sites"]);
const FLAG_OPTIONS = new Set(["--quiet", "--markdown", "--exact"]);

function parseArgs(argv: readonly string[]): Parsed {
  const [command, ...rest] = argv;
  if (!command) throw new UsageError("no command given");
  const files: string[] = [];
  const options = new Map<string, string>();
  for (let i = 0; i < rest.length; i++) {
    const a = rest[i] as string;
    if (a.startsWith("-")) {
      const [name, inline] = a.split("=", 2) as [string, string | undefined];
      if (VALUE_OPTIONS.has(name)) {
        const v = inline ?? rest[++i];
        if (v === undefined) throw new UsageError(`${name} needs a value`);
        options.set(name === "-o" ? "--output" : name, v);
      } else if (FLAG_OPTIONS.has(name)) options.set(name, "true");
      else throw new UsageError(`unknown option ${name}`);
    } else files.push(a);
  }
  return { command, files, options };
}

function readSource(file: string): string {
  try {
    return readFileSync(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    const why = code === "ENOENT" ? "no such file" : code === "EISDIR" ? "is a directory" : code === "EACCES" ? "permission denied" : String(code ?? e);
    throw new IoError(`cannot read ${file}: ${why}`);
  }
}

class IoError extends Error {}

function output(text: string, options: Map<string, string>): void {
  const path = options.get("--output");
  if (path) {
    try {
      writeFileSync(path, text.endsWith("\n") ? text : text + "\n");
    } catch (e) {
      throw new IoError(`cannot write ${path}: ${(e as NodeJS.ErrnoException).code ?? e}`);
    }
  } else if (text.length > 0) process.stdout.write(text.endsWith("\n") ? text : text + "\n");
}

function analyzeFiles(files: readonly string[]): { file: string; analysis: DocumentAnalysis }[] {
  if (files.length === 0) throw new UsageError("no input files");
  return files.map((file) => ({ file, analysis: analyzeDocument(readSource(file)) }));
}

function hasErrors(results: readonly { analysis: DocumentAnalysis }[]): boolean {
  return results.some((r) => r.analysis.diagnostics.some((d) => d.severity === "error"));
}

function parseCells(value: string | undefined): number[] | undefined {
  if (value === undefined) return undefined;
  const cells = value.split(/[,x]/).map((s) => Number(s.trim()));
  if (cells.some((c) => !Number.isInteger(c) || c < 1)) throw new UsageError(`--cluster takes whole numbers such as 20 or 6,6 (got ${value})`);
  return cells;
}

export async function main(argv: readonly string[]): Promise<number> {
  try {
    const { command, files, options } = parseArgs(argv);
    switch (command) {
      case "check": {
        const results = analyzeFiles(files);
        const fileDiags: FileDiagnostics[] = results.map((r) => ({ file: r.file, lines: r.analysis.lines, diagnostics: r.analysis.diagnostics }));
        const format = options.get("--format") ?? "text";
        if (format === "text") {
          const text = formatText(fileDiags);
          const counts = summaryLine(results);
          output(text ? `${text}\n${counts}` : counts, options);
        } else if (format === "json") output(formatJson(fileDiags), options);
        else if (format === "sarif") output(formatSarif(fileDiags, VERSION), options);
        else throw new UsageError(`unknown format ${format} (text, json, sarif)`);
        return hasErrors(results) ? 1 : 0;
      }
      case "report": {
        const results = await withExact(analyzeFiles(files), options);
        output(results.map((r) => renderReport(r.file, r.analysis)).join("\n"), options);
        return hasErrors(results) ? 1 : 0;
      }
      case "analyze": {
        const results = await withExact(analyzeFiles(files), options);
        const format = options.get("--format") ?? "json";
        if (format !== "json") throw new UsageError(`analyze prints JSON only (--format json)`);
        const objects = results.map((r) => analysisJson(r.file, r.analysis));
        output(JSON.stringify(objects.length === 1 ? objects[0] : objects, null, 2), options);
        return hasErrors(results) ? 1 : 0;
      }
      case "plot": {
        if (files.length !== 1) throw new UsageError("plot takes exactly one file");
        if (!options.get("--output")) throw new UsageError("plot needs -o OUT.svg");
        const [r] = await withExact(analyzeFiles(files), options);
        if (!r) return 2;
        output(renderPlotSvg(r.analysis, { exact: lastCalibration }), options);
        return 0;
      }
      case "solve": {
        if (files.length !== 1) throw new UsageError("solve takes exactly one file");
        const [r] = analyzeFiles(files);
        if (!r) return 2;
        const errors = r.analysis.diagnostics.filter((d) => d.severity === "error");
        if (errors.length > 0) {
          process.stderr.write(`${formatText([{ file: r.file, lines: r.analysis.lines, diagnostics: errors }])}\n`);
          process.stderr.write(`spinwright: ${r.file} has errors; fix them before solving.\n`);
          return 1;
        }
        const result = await runSolve(r.analysis, sitesOption(options));
        const format = options.get("--format") ?? "text";
        output(format === "json" ? JSON.stringify(solveJson(r.file, r.analysis, result), null, 2) : solveText(r.file, result), options);
        return 0;
      }
      case "diff": {
        // As a git diff driver (diff.<name>.command) git passes seven arguments:
        // path old-file old-hex old-mode new-file new-hex new-mode. Git stops on a non-zero exit
        // of an external diff, so in that mode the exit code is always 0.
        const gitDriver = files.length === 7;
        const oldFile = gitDriver ? files[1] : files[0];
        const newFile = gitDriver ? files[4] : files[1];
        if (!oldFile || !newFile || (!gitDriver && files.length !== 2)) throw new UsageError("diff takes two files: OLD.spw NEW.spw");
        const d = diffModels(analyzeDocument(readSource(oldFile)), analyzeDocument(readSource(newFile)));
        const format = options.get("--format") ?? (options.has("--markdown") ? "markdown" : "text");
        const shownOld = gitDriver ? `a/${files[0]}` : oldFile;
        const shownNew = gitDriver ? `b/${files[0]}` : newFile;
        if (format === "json") output(JSON.stringify(d, null, 2), options);
        else if (format === "markdown" || format === "text") output(renderDiff(d, shownOld, shownNew, format === "markdown"), options);
        else throw new UsageError(`unknown format ${format} (text, json, markdown)`);
        return gitDriver ? 0 : d.significant ? 1 : 0;
      }
      case "export": {
        if (files.length !== 1) throw new UsageError("export takes exactly one file");
        const [r] = analyzeFiles(files);
        if (!r) return 2;
        const errors = r.analysis.diagnostics.filter((d) => d.severity === "error");
        if (errors.length > 0 || !r.analysis.model) {
          process.stderr.write(`${formatText([{ file: r.file, lines: r.analysis.lines, diagnostics: errors }])}\n`);
          process.stderr.write(`spinwright: ${r.file} has errors; fix them before exporting.\n`);
          return 1;
        }
        const exported = exportCluster(r.analysis.model, parseCells(options.get("--cluster")));
        if (!exported.ok) {
          process.stderr.write(`spinwright: ${exported.reason}\n`);
          return 1;
        }
        output(JSON.stringify(exported.json, null, 2), options);
        return 0;
      }
      case "help":
      case "--help":
      case "-h":
        process.stdout.write(USAGE + "\n");
        return 0;
      case "--version":
        process.stdout.write(VERSION + "\n");
        return 0;
      default:
        throw new UsageError(`unknown command '${command}'`);
    }
  } catch (e) {
    if (e instanceof UsageError) {
      process.stderr.write(`spinwright: ${e.message}\n\n${USAGE}\n`);
      return 2;
    }
    if (e instanceof CliFailure) {
      process.stderr.write(`spinwright: ${e.message}\n`);
      return e.message.startsWith("cancelled") ? 130 : 1;
    }
    if (e instanceof IoError) {
      process.stderr.write(`spinwright: ${e.message}\n`);
      return 2;
    }
    process.stderr.write(`spinwright: internal error: ${(e as Error).message}\n`);
    return 2;
  }
}

function sitesOption(options: Map<string, string>): number | undefined {
  const v = options.get("--sites");
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!Number.isInteger(n) || n < 2) throw new UsageError(`--sites takes a whole number of sites (got ${v})`);
  return n;
}

let lastCalibration: ExactCalibration | null = null;

/** With --exact, calibrates each chain model on a ring and analyzes it again with those numbers. */
async function withExact(
  results: { file: string; analysis: DocumentAnalysis }[],
  options: Map<string, string>,
): Promise<{ file: string; analysis: DocumentAnalysis }[]> {
  if (!options.has("--exact")) return results;
  const sites = sitesOption(options) ?? 16;
  const out: { file: string; analysis: DocumentAnalysis }[] = [];
  for (const r of results) {
    const cal: ExactCalibration | null = r.analysis.physics?.predictions.couplings ? await runCalibration(r.analysis, sites) : null;
    lastCalibration = cal;
    out.push(cal ? { file: r.file, analysis: analyzeDocument(r.analysis.text, { exact: () => cal }) } : r);
  }
  return out;
}

function summaryLine(results: readonly { analysis: DocumentAnalysis }[]): string {
  const all = results.flatMap((r) => r.analysis.diagnostics);
  const n = (s: string): number => all.filter((d) => d.severity === s).length;
  return `${results.length} file(s) checked: ${n("error")} error(s), ${n("warning")} warning(s), ${n("information") + n("hint")} note(s).`;
}

if (require.main === module) {
  main(process.argv.slice(2)).then(
    (code) => {
      process.exitCode = code;
    },
    () => {
      process.exitCode = 2;
    },
  );
}
