// The .spw statement grammar as a chevrotain CstParser with error recovery. One parser instance is
// reused (reset through `parser.input`) for every statement piece; the block structure around the
// pieces is read by parse.ts. Semantics live in lower.ts, not here. Syntax layer.
import { CstParser, type IOrAlt, type TokenType } from "chevrotain";
import {
  ALL_TOKENS,
  Arrow,
  Caret,
  Comma,
  Equals,
  Identifier,
  Kw,
  LBrace,
  LBracket,
  LParen,
  Minus,
  NumberLiteral,
  Plus,
  RBrace,
  RBracket,
  RParen,
  Slash,
  Star,
  STATEMENT_KEYWORDS,
  WhiteSpace,
  Comment,
} from "./lexer";

/** Tokens that start a statement inside a model block. */
export const STATEMENT_STARTS: TokenType[] = STATEMENT_KEYWORDS.map((w) => Kw[w]);

/**
 * Tokens that cannot start a statement: consumed one at a time as "junk" so recovery goes on. Inside
 * a statement piece (see parse.ts) that includes a stray '}' or 'model'.
 */
const JUNK_TOKENS: TokenType[] = ALL_TOKENS.filter((t) => t !== WhiteSpace && t !== Comment && !STATEMENT_STARTS.includes(t));

class SpwParser extends CstParser {
  /**
   * Each OR's alternatives, made on its first call and reused: written inline, every call of a
   * rule would allocate the array and a closure per alternative again (most of the garbage of a
   * long file's parse, as an allocation profile showed).
   */
  private readonly alternatives: IOrAlt<unknown>[][] = [];

  constructor() {
    super(ALL_TOKENS, { recoveryEnabled: true, maxLookahead: 3, nodeLocationTracking: "onlyOffset" });
    this.performSelfAnalysis();
  }

  /**
   * One statement piece of a model block: a statement and whatever stray tokens follow it before
   * the next statement keyword. parse.ts cuts the block into such pieces and parses each alone, so
   * that an edit reparses only the piece it touches.
   */
  public piece = this.RULE("piece", () => {
    this.MANY(() => {
      this.OR(this.alternatives[0] ??= [
        { ALT: () => this.SUBRULE(this.spinStmt) },
        { ALT: () => this.SUBRULE(this.conventionStmt) },
        { ALT: () => this.SUBRULE(this.latticeStmt) },
        { ALT: () => this.SUBRULE(this.letStmt) },
        { ALT: () => this.SUBRULE(this.exchangeStmt) },
        { ALT: () => this.SUBRULE(this.anisotropyStmt) },
        { ALT: () => this.SUBRULE(this.gStmt) },
        { ALT: () => this.SUBRULE(this.fieldStmt) },
        { ALT: () => this.SUBRULE(this.clusterStmt) },
        { ALT: () => this.SUBRULE(this.probeStmt) },
        { ALT: () => this.SUBRULE(this.expectStmt) },
        { ALT: () => this.SUBRULE(this.junk) },
      ]);
    });
  });

  private junk = this.RULE("junk", () => {
    this.OR(this.alternatives[1] ??= JUNK_TOKENS.map((t) => ({ ALT: () => this.CONSUME(t) })));
  });

  private siteSelector = this.RULE("siteSelector", () => {
    this.OR(this.alternatives[2] ??= [{ ALT: () => this.CONSUME(Identifier) }, { ALT: () => this.CONSUME(Kw.all) }]);
  });

  private spinStmt = this.RULE("spinStmt", () => {
    this.CONSUME(Kw.spin);
    this.OPTION({
      GATE: () => this.LA(2).tokenType === Equals,
      DEF: () => {
        this.SUBRULE(this.siteSelector);
        this.CONSUME(Equals);
      },
    });
    this.SUBRULE(this.expr);
  });

  private conventionStmt = this.RULE("conventionStmt", () => {
    this.CONSUME(Kw.convention);
    this.CONSUME(Identifier);
    this.MANY(() => {
      this.CONSUME(Minus);
      this.CONSUME2(Identifier);
    });
  });

  private latticeStmt = this.RULE("latticeStmt", () => {
    this.CONSUME(Kw.lattice);
    this.OR(this.alternatives[3] ??= [
      {
        // A custom cell. A name before its '{' (`lattice custom {`) is read so that the cell
        // still parses; the builder reports it.
        ALT: () => {
          this.OPTION2(() => this.CONSUME4(Identifier));
          this.CONSUME(LBrace);
          this.MANY2(() => {
            this.OR2([
              { ALT: () => this.SUBRULE(this.vectorStmt) },
              { ALT: () => this.SUBRULE(this.siteStmt) },
            ]);
          });
          this.CONSUME(RBrace);
        },
      },
      {
        ALT: () => {
          this.CONSUME(Identifier);
          this.OPTION(() => {
            this.CONSUME(Kw.sites);
            this.CONSUME2(Identifier);
            this.MANY(() => {
              this.CONSUME(Comma);
              this.CONSUME3(Identifier);
            });
          });
        },
      },
    ]);
  });

  private vectorStmt = this.RULE("vectorStmt", () => {
    this.CONSUME(Kw.vector);
    this.CONSUME(Identifier);
    this.CONSUME(Equals);
    this.SUBRULE(this.expr);
  });

  private siteStmt = this.RULE("siteStmt", () => {
    this.CONSUME(Kw.site);
    this.CONSUME(Identifier);
    this.CONSUME(Equals);
    this.SUBRULE(this.expr);
    this.OPTION(() => {
      this.CONSUME(Kw.spin);
      this.SUBRULE2(this.expr);
    });
  });

  private letStmt = this.RULE("letStmt", () => {
    this.CONSUME(Kw.let);
    this.CONSUME(Identifier);
    this.CONSUME(Equals);
    this.SUBRULE(this.expr);
  });

  private exchangeStmt = this.RULE("exchangeStmt", () => {
    this.CONSUME(Kw.exchange);
    this.CONSUME(Identifier);
    // The arguments in parentheses; without them (`exchange J on ...`) the statement still reads
    // to its bonds, and the builder says what is missing.
    this.OPTION2(() => {
      this.CONSUME(LParen);
      this.OPTION(() => this.SUBRULE(this.argList));
      this.CONSUME(RParen);
    });
    this.CONSUME(Kw.on);
    this.SUBRULE(this.bondSpec);
    this.MANY(() => {
      this.CONSUME(Comma);
      this.SUBRULE2(this.bondSpec);
    });
  });

  private argList = this.RULE("argList", () => {
    this.SUBRULE(this.expr);
    this.MANY(() => {
      this.CONSUME(Comma);
      this.SUBRULE2(this.expr);
    });
  });

  private bondSpec = this.RULE("bondSpec", () => {
    this.OR(this.alternatives[4] ??= [
      {
        ALT: () => {
          this.CONSUME(Kw.shell);
          this.CONSUME(NumberLiteral);
        },
      },
      {
        ALT: () => {
          this.CONSUME(Identifier);
          this.CONSUME(Arrow);
          this.CONSUME2(Identifier);
          this.OPTION(() => {
            this.CONSUME(Plus);
            this.SUBRULE(this.primary);
          });
        },
      },
    ]);
  });

  private anisotropyStmt = this.RULE("anisotropyStmt", () => {
    this.CONSUME(Kw.anisotropy);
    this.SUBRULE(this.siteSelector);
    this.MANY(() => {
      this.OR(this.alternatives[5] ??= [
        {
          ALT: () => {
            this.CONSUME(Identifier);
            this.CONSUME(Equals);
            this.SUBRULE(this.expr);
          },
        },
        {
          ALT: () => {
            this.CONSUME(Kw.axis);
            this.SUBRULE2(this.expr);
          },
        },
      ]);
    });
  });

  private gStmt = this.RULE("gStmt", () => {
    this.CONSUME(Kw.g);
    this.SUBRULE(this.siteSelector);
    this.CONSUME(Equals);
    this.SUBRULE(this.expr);
  });

  private fieldStmt = this.RULE("fieldStmt", () => {
    this.CONSUME(Kw.field);
    this.SUBRULE(this.expr);
    this.OPTION(() => {
      this.CONSUME(Kw.along);
      this.SUBRULE2(this.expr);
    });
    this.OPTION2(() => {
      this.CONSUME(Kw.sweep);
      this.SUBRULE3(this.expr);
      this.CONSUME(Kw.to);
      this.SUBRULE4(this.expr);
      this.OPTION3(() => {
        this.CONSUME(Kw.steps);
        this.SUBRULE5(this.expr);
      });
    });
  });

  private clusterStmt = this.RULE("clusterStmt", () => {
    this.CONSUME(Kw.cluster);
    this.SUBRULE(this.expr);
    this.OPTION(() => {
      this.OR(this.alternatives[6] ??= [{ ALT: () => this.CONSUME(Kw.periodic) }, { ALT: () => this.CONSUME(Kw.open) }]);
    });
  });

  private probeStmt = this.RULE("probeStmt", () => {
    this.CONSUME(Kw.probe);
    this.SUBRULE(this.expr);
  });

  private expectStmt = this.RULE("expectStmt", () => {
    this.CONSUME(Kw.expect);
    this.CONSUME(Identifier);
    // `U(1)`, `SU(2)` as in print: read whole, so that the builder can say how .spw spells them.
    this.OPTION2(() => {
      this.CONSUME(LParen);
      this.CONSUME(NumberLiteral);
      this.CONSUME(RParen);
    });
    this.OPTION(() => {
      this.CONSUME(Kw.about);
      this.SUBRULE(this.expr);
    });
  });

  // Expressions as a flat alternation of operands and binary operators; precedence (^ right,
  // then * /, then + -, with a leading sign binding looser than ^) is applied in lower.ts. One
  // CST level per operand instead of one per precedence level keeps parsing fast.
  public expr = this.RULE("expr", () => {
    this.SUBRULE(this.operand);
    this.MANY(() => {
      this.OR(this.alternatives[7] ??= [
        { ALT: () => this.CONSUME(Plus) },
        { ALT: () => this.CONSUME(Minus) },
        { ALT: () => this.CONSUME(Star) },
        { ALT: () => this.CONSUME(Slash) },
        { ALT: () => this.CONSUME(Caret) },
      ]);
      this.SUBRULE2(this.operand);
    });
  });

  private operand = this.RULE("operand", () => {
    this.MANY(() => {
      this.OR(this.alternatives[8] ??= [{ ALT: () => this.CONSUME(Minus) }, { ALT: () => this.CONSUME(Plus) }]);
    });
    this.SUBRULE(this.primary);
  });

  private primary = this.RULE("primary", () => {
    this.OR(this.alternatives[9] ??= [
      {
        ALT: () => {
          this.CONSUME(NumberLiteral);
          // A name right after a number on the same line is its unit (`14.2 K`, `3 cm^-1`),
          // unless it starts a clause of its own (`D = ...`).
          this.OPTION({
            GATE: () => this.unitFollows(),
            DEF: () => {
              this.CONSUME(Identifier);
              this.OPTION2({
                GATE: () => this.LA(2).tokenType === Minus || this.LA(2).tokenType === NumberLiteral,
                DEF: () => {
                  this.CONSUME(Caret);
                  this.OPTION3(() => this.CONSUME2(Minus));
                  this.CONSUME2(NumberLiteral);
                },
              });
            },
          });
        },
      },
      {
        ALT: () => {
          this.CONSUME3(Identifier);
          this.OPTION4(() => {
            this.CONSUME(LParen);
            this.OPTION5(() => this.SUBRULE(this.argList));
            this.CONSUME(RParen);
          });
        },
      },
      {
        ALT: () => {
          this.CONSUME2(LParen);
          this.SUBRULE(this.expr);
          this.MANY(() => {
            this.CONSUME(Comma);
            this.SUBRULE2(this.expr);
          });
          this.CONSUME2(RParen);
        },
      },
      {
        ALT: () => {
          this.CONSUME(LBracket);
          this.OPTION6(() => {
            this.SUBRULE3(this.expr);
            this.MANY2(() => {
              this.CONSUME2(Comma);
              this.SUBRULE4(this.expr);
            });
          });
          this.CONSUME(RBracket);
        },
      },
    ]);
  });

  private unitFollows(): boolean {
    const next = this.LA(1);
    if (next.tokenType !== Identifier) return false;
    if (this.LA(2).tokenType === Equals) return false;
    const previous = this.LA(0);
    return previous.endLine === undefined || next.startLine === previous.endLine;
  }
}

/** The single parser instance. */
export const spwParser = new SpwParser();
