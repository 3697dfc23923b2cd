// Signature help inside the argument list of an exchange kind: heisenberg(J), xxz(J, delta[, axis]),
// xyz(Jx, Jy, Jz), dm(D, (x, y, z)), matrix([[...]]) or matrix(J, [[...]]), with the active
// argument found by counting top-level commas before the cursor. Service layer.
import type { IToken } from "chevrotain";
import type { DocumentAnalysis } from "../analysis/analyze";
import { inCommentOrString, lastTokenIndexBefore } from "./common";
import { KIND_SIGNATURES, type KindSignature } from "./vocabulary";

export interface SignatureHelpResult {
  readonly signatures: readonly KindSignature[];
  readonly activeSignature: number;
  readonly activeParameter: number;
}

export function signatureHelp(a: DocumentAnalysis, offset: number): SignatureHelpResult | null {
  if (inCommentOrString(a, offset)) return null;
  const tokens = a.parsed.tokens;
  const last = lastTokenIndexBefore(tokens, offset);
  // Walk back to the unclosed `(` that follows `exchange <kind>`, counting commas at its depth.
  let depth = 0;
  let commas = 0;
  for (let i = last; i >= 0; i--) {
    const t = tokens[i] as IToken;
    const image = t.image;
    if (image === ")" || image === "]") depth++;
    else if (image === "(" || image === "[") {
      if (depth > 0) depth--;
      else if (image === "(" && tokens[i - 2]?.image === "exchange") {
        const signatures = KIND_SIGNATURES[tokens[i - 1]?.image ?? ""];
        if (!signatures) return null;
        // The signature with enough parameters for the arguments typed so far.
        let active = signatures.findIndex((s) => s.parameters.length > commas);
        if (active < 0) active = signatures.length - 1;
        const sig = signatures[active] as KindSignature;
        return { signatures, activeSignature: active, activeParameter: Math.min(commas, sig.parameters.length - 1) };
      } else {
        // An unclosed vector or matrix inside the arguments: count the commas one level out.
        commas = 0;
      }
    } else if (image === "," && depth === 0) commas++;
    else if (image === "{" || image === "}" || image === "on" || (t.tokenType.name.startsWith("Kw_") && image !== "exchange")) return null;
  }
  return null;
}
