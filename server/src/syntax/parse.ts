// Entry point of the syntax layer: text -> tokens -> CST -> AST, always returning a tree and a
// list of syntax diagnostics, never throwing. Syntax layer.
import type { IToken } from "chevrotain";
import { diag, type Diagnostic } from "../base/diagnostics";
import type { SpwFile } from "./ast";
import { spwLexer } from "./lexer";
import { lowerFile } from "./lower";
import { spwParser } from "./parser";

export interface ParsedFile {
  readonly ast: SpwFile;
  readonly tokens: readonly IToken[];
  readonly comments: readonly IToken[];
  readonly diagnostics: readonly Diagnostic[];
}

export function parseSpw(text: string): ParsedFile {
  const diagnostics: Diagnostic[] = [];
  const lexed = spwLexer.tokenize(text);
  for (const e of lexed.errors) {
    const ch = text.slice(e.offset, e.offset + Math.max(1, e.length));
    diagnostics.push(
      diag(
        "spw-character",
        { start: e.offset, end: e.offset + Math.max(1, e.length) },
        `Unexpected character ${JSON.stringify(ch)}: .spw uses # for comments, "..." for the model name, and ( ) [ ] { } , = + - * / ^ -> as punctuation.`,
      ),
    );
  }
  spwParser.input = lexed.tokens;
  const cst = spwParser.file();
  for (const e of spwParser.errors) {
    const token = e.token;
    const previous = (e as { previousToken?: IToken }).previousToken;
    const atEnd = token.tokenType?.name === "EOF" || !Number.isFinite(token.startOffset);
    let start = atEnd ? text.length : token.startOffset;
    let end = atEnd ? text.length : (token.endOffset ?? start) + 1;
    // A token missing at the end of a line is reported where it is missing, not on the next line.
    if (previous && Number.isFinite(previous.startOffset) && (atEnd || (token.startLine ?? 0) > (previous.endLine ?? 0))) {
      end = (previous.endOffset ?? previous.startOffset) + 1;
      start = Math.max(previous.startOffset, end - 1);
    }
    const found = atEnd ? "the end of the file" : `'${token.image}'`;
    diagnostics.push(diag("spw-syntax", { start, end: Math.max(end, start) }, syntaxMessage(e.message, found)));
  }
  const comments = (lexed.groups["comments"] ?? []) as IToken[];
  const lowered = lowerFile(cst, text);
  diagnostics.push(...lowered.diagnostics);
  return { ast: lowered.file, tokens: lexed.tokens, comments, diagnostics };
}

/** Rewrites chevrotain's message into one sentence that says what was expected and found. */
function syntaxMessage(raw: string, found: string): string {
  const expecting = /Expecting (?:token of type )?--> (.*?) <--/.exec(raw);
  if (expecting?.[1]) {
    if (expecting[1] === "'='" && found === "'('")
      return "Function definitions are not allowed: a parameter is a value, e.g. let J2 = 0.2 * J1.";
    const hint = expecting[1] === "'}'" ? " Close the model block with '}'." : "";
    return `Expected ${expecting[1]} here, found ${found}.${hint}`;
  }
  const oneOf = /Expecting: (?:one of these possible Token sequences:|expecting at least one iteration which starts with one of these possible Token sequences::)?\s*([\s\S]*?)\s*but found:/.exec(raw);
  if (oneOf?.[1]) {
    const options = [...oneOf[1].matchAll(/\[([^\]]*)\]/g)].map((m) => (m[1] ?? "").replace(/, /g, " "));
    const unique = [...new Set(options)].slice(0, 8);
    if (unique.includes("a number") && unique.includes("a name"))
      return `Expected a value here (a number with its unit, a parameter name, or an expression in parentheses), found ${found}.`;
    if (unique.length > 0) return `Expected ${unique.join(" or ")} here, found ${found}.`;
  }
  return `${raw.replace(/\s+/g, " ").trim()}`;
}
