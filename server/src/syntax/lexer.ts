// Tokens of the .spw format: chevrotain token types (the parser matches on them) with the patterns
// that define them. scanner.ts reads text into these tokens by hand, and its test holds it to a
// chevrotain Lexer built from these patterns. Syntax layer: imports chevrotain only.
import { createToken, Lexer, type TokenType } from "chevrotain";

export const Identifier = createToken({ name: "Identifier", pattern: /[A-Za-z_][A-Za-z0-9_]*/, label: "a name" });

function keyword(word: string): TokenType {
  return createToken({ name: `Kw_${word}`, pattern: new RegExp(`${word}\\b`), longer_alt: Identifier, label: `'${word}'` });
}

export const WhiteSpace = createToken({ name: "WhiteSpace", pattern: /[ \t\r\n\f\v\u00a0\ufeff]+/, group: Lexer.SKIPPED });
export const Comment = createToken({ name: "Comment", pattern: /#[^\n\r]*/, group: "comments" });
export const StringLiteral = createToken({ name: "StringLiteral", pattern: /"[^"\n\r]*"/, label: "a quoted name" });
export const NumberLiteral = createToken({
  name: "NumberLiteral",
  pattern: /(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/,
  label: "a number",
});
export const Arrow = createToken({ name: "Arrow", pattern: /->/, label: "'->'" });
export const LBrace = createToken({ name: "LBrace", pattern: /\{/, label: "'{'" });
export const RBrace = createToken({ name: "RBrace", pattern: /\}/, label: "'}'" });
export const LParen = createToken({ name: "LParen", pattern: /\(/, label: "'('" });
export const RParen = createToken({ name: "RParen", pattern: /\)/, label: "')'" });
export const LBracket = createToken({ name: "LBracket", pattern: /\[/, label: "'['" });
export const RBracket = createToken({ name: "RBracket", pattern: /\]/, label: "']'" });
export const Comma = createToken({ name: "Comma", pattern: /,/, label: "','" });
export const Equals = createToken({ name: "Equals", pattern: /=/, label: "'='" });
export const Plus = createToken({ name: "Plus", pattern: /\+/, label: "'+'" });
export const Minus = createToken({ name: "Minus", pattern: /-/, label: "'-'" });
export const Star = createToken({ name: "Star", pattern: /\*/, label: "'*'" });
export const Slash = createToken({ name: "Slash", pattern: /\//, label: "'/'" });
export const Caret = createToken({ name: "Caret", pattern: /\^/, label: "'^'" });

/** Statement and clause keywords. Exchange kinds, presets and symmetry names are identifiers. */
export const KEYWORDS = [
  "model", "spin", "convention", "lattice", "sites", "vector", "site", "let", "exchange", "on",
  "shell", "anisotropy", "axis", "g", "field", "along", "sweep", "to", "steps", "cluster",
  "probe", "expect", "about", "all", "periodic", "open",
] as const;

export type Keyword = (typeof KEYWORDS)[number];

/** The keywords a statement starts with, in the order messages list them. */
export const STATEMENT_KEYWORDS: readonly Keyword[] = ["spin", "convention", "lattice", "let", "exchange", "anisotropy", "g", "field", "cluster", "probe", "expect"];

export const Kw: Record<Keyword, TokenType> = Object.fromEntries(KEYWORDS.map((w) => [w, keyword(w)])) as Record<
  Keyword,
  TokenType
>;

export const ALL_TOKENS: TokenType[] = [
  WhiteSpace,
  Comment,
  StringLiteral,
  NumberLiteral,
  Arrow,
  LBrace,
  RBrace,
  LParen,
  RParen,
  LBracket,
  RBracket,
  Comma,
  Equals,
  Plus,
  Minus,
  Star,
  Slash,
  Caret,
  ...KEYWORDS.map((w) => Kw[w]),
  Identifier,
];


export function isKeyword(word: string): word is Keyword {
  return (KEYWORDS as readonly string[]).includes(word);
}
