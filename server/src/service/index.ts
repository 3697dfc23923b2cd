// The editor-feature facade: every feature is a plain function of a DocumentAnalysis and offsets.
// The language server, tests and any other client call these. Service layer.
export * from "./common";
export { doHover, type HoverResult } from "./hover";
export { doComplete, type CompletionItem, type CompletionKind } from "./completion";
export { findDefinition, findReferences, documentHighlights, prepareRename, rename, renameProblem, type Highlight } from "./navigation";
export { documentSymbols, type OutlineSymbol, type OutlineKind } from "./symbols";
export { foldingRanges, type FoldingRange } from "./folding";
export { selectionSpans } from "./selectionRanges";
export { semanticTokens, SEMANTIC_TOKEN_TYPES, SEMANTIC_TOKEN_MODIFIERS, type SemanticToken } from "./semanticTokens";
export { formatDocument, formatText } from "./formatting";
export { codeActions, type CodeAction } from "./codeActions";
export { inlayHints, type InlayHint } from "./inlayHints";
export { signatureHelp, type SignatureHelpResult } from "./signatureHelp";
export { codeLenses, clusterSiteCount, EXACT_CHECK_COMMAND, type CodeLens } from "./codeLens";
export { analysisSummary, summaryMarkdown, type AnalysisSummary } from "./summary";
export { physicsItems, type PhysicsItem } from "./physicsView";
export { zeemanLines, zeemanText, parameterValueText, writtenUnitOf } from "./quantities";
