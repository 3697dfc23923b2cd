// The statement at an offset is found by binary search (hover and completion ask on every move of
// the cursor); it must agree with a plain scan for the first statement that contains the offset,
// at every offset of every project file and of randomly edited ones. The hover's shortcut for
// symbols (none inside keywords, numbers, punctuation) is checked at the same offsets.
import { describe, expect, it } from "vitest";
import { analyzeDocument } from "../../server/src/analysis/analyze";
import { spanContains, statementAt, symbolAt, tokenAt } from "../../server/src/service/common";
import { Identifier } from "../../server/src/syntax/lexer";
import { applyEdit, mulberry32, projectTexts, randomEdit } from "../../server/src/syntax/mutations.testutil";

describe("statementAt", () => {
  it("agrees with a plain scan at every offset", () => {
    const r = mulberry32(4);
    const texts = projectTexts();
    for (let k = 0; k < texts.length * 3; k++) {
      let text = texts[k % texts.length] as string;
      if (k >= texts.length) for (let e = 0; e < 3; e++) text = applyEdit(text, randomEdit(text, r));
      const a = analyzeDocument(text);
      const statements = a.parsed.ast.models[0]?.statements ?? [];
      for (let offset = 0; offset <= text.length; offset++) {
        const expected = statements.find((s) => s.kind !== "junk" && spanContains(s.span, offset));
        expect(statementAt(a, offset), `offset ${offset}`).toBe(expected);
        // The hover looks for a symbol only on a name or at a token's start: no symbol lies elsewhere.
        const token = tokenAt(a, offset);
        if (token && symbolAt(a, offset)) expect(token.tokenType === Identifier || offset === token.startOffset, `offset ${offset}`).toBe(true);
      }
    }
  });
});
