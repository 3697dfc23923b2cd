// Code lenses on the model: "Run exact check on N sites" for the file's cluster (the command is
// carried out by the client; the server only says what it would run on). Service layer.
import type { DocumentAnalysis } from "../analysis/analyze";
import type { Span } from "../base/text";
import { firstModel, type ServiceSettings } from "./common";

export interface CodeLens {
  readonly span: Span;
  readonly title: string;
  /** Command id and its arguments, run by the client. */
  readonly command: string;
  readonly arguments: readonly unknown[];
}

export const EXACT_CHECK_COMMAND = "spinwright.runExactCheck";

/** Number of sites of the file's finite cluster: cells along each direction times sites per cell. */
export function clusterSiteCount(a: DocumentAnalysis): number | null {
  const m = a.model;
  if (!m?.cluster || !m.lattice) return null;
  return m.cluster.cells.reduce((p, x) => p * x, 1) * m.lattice.sites.length;
}

export function codeLenses(a: DocumentAnalysis, uri: string, settings: ServiceSettings): CodeLens[] {
  const block = firstModel(a);
  const sites = clusterSiteCount(a);
  if (!block || sites === null) return [];
  const fits = sites <= settings.exactCheckMaxSites;
  const title = fits
    ? `Run exact check on ${sites} sites`
    : `Exact check: ${sites} sites exceed spinwright.exactCheck.maxSites = ${settings.exactCheckMaxSites}`;
  return [{ span: block.keywordSpan, title, command: EXACT_CHECK_COMMAND, arguments: [{ uri, sites, fits }] }];
}
