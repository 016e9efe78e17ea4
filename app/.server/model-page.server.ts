/**
 * The model page and its citable edition permalink: one loader function for both routes. It reads
 * stored editions only (no engine computation on the server for display), so a render stays fast.
 */
import { data } from "react-router";
import { citationKey, editionUrl } from "~/citations";
import { diffEditions, paramCells, type EditionDiff, type ParamCell } from "~/components/model/diff";
import { env } from "./env.server";
import { getEdition, getModelWithEditions, type EditionRecord, type EditionSummary, type ModelSummary } from "./library.server";

/** Cells of the newer side of a diff sent for the outlined matrix view; larger models get the change list only. */
export const DIFF_MATRIX_CELL_LIMIT = 400;

export interface ModelPageRequest {
  slug: string;
  /** The edition asked for by the permalink; undefined on /library/:slug (the current edition). */
  edition?: number;
  /** The diff form's choices (?from=&to=); validated against the edition list here. */
  from?: number;
  to?: number;
  /** The request URL, for the absolute permanent URL when ERGOSHELF_BASE_URL is not set. */
  url: string;
  /**
   * Show a synthetic scale-test model too (server code only: the benchmark). The routes never set
   * it, so visitors get the same 404 for a synthetic model as for an unknown slug.
   */
  includeSynthetic?: boolean;
}

export interface ModelPageDiff {
  from: number;
  to: number;
  /** Present when the two sides differ; null when from = to. */
  result: EditionDiff | null;
  /** The newer side's cells, for the matrix view with changed cells outlined (null when too large). */
  toCells: ParamCell[] | null;
  /** A choice that could not be honoured, in words. */
  notice: string | null;
}

export interface ModelPageData {
  model: ModelSummary;
  editions: EditionSummary[];
  edition: Omit<EditionRecord, "model">;
  /** The edition a reader should use: the newest one not retracted (null when all are retracted). */
  currentNumber: number | null;
  /** True on /library/:slug, false on the permalink. */
  viaLatest: boolean;
  citationKey: string;
  permalink: string;
  citeBase: string;
  diff: ModelPageDiff | null;
}

function notFound(message: string, extra: Record<string, string> = {}): never {
  throw data({ message, ...extra }, { status: 404 });
}

function baseUrl(requestUrl: string): string {
  const configured = env().ERGOSHELF_BASE_URL;
  return (configured ?? new URL(requestUrl).origin).replace(/\/+$/, "");
}

/** The number /library/:slug shows: the newest edition not retracted, else the newest. */
export function currentEditionNumber(editions: readonly EditionSummary[]): number | null {
  const live = editions.filter((e) => !e.retractedAt);
  const pick = live.length ? live[live.length - 1] : editions[editions.length - 1];
  return pick ? pick.number : null;
}

function chooseDiff(editions: readonly EditionSummary[], shown: number, from?: number, to?: number): { from: number; to: number; notice: string | null } {
  const numbers = new Set(editions.map((e) => e.number));
  const missing = [from, to].filter((n): n is number => n !== undefined && !numbers.has(n));
  // Default: what the shown edition changed (previous → shown), or what the next one changed when the first is shown.
  const idx = editions.findIndex((e) => e.number === shown);
  const defFrom = idx > 0 ? editions[idx - 1].number : editions[0].number;
  const defTo = idx > 0 ? shown : editions[Math.min(1, editions.length - 1)].number;
  const f = from !== undefined && numbers.has(from) ? from : defFrom;
  const t = to !== undefined && numbers.has(to) ? to : defTo;
  const notice = missing.length ? `There is no edition ${missing.join(" or ")} of this model; the comparison shows editions ${f} and ${t} instead.` : null;
  return { from: f, to: t, notice };
}

/**
 * Everything the model page shows for one edition: the model, its edition list, the stored figures
 * and verification, the citation, and the comparison the diff form asks for. Throws a 404 response
 * for an unknown slug, a synthetic model (unless `includeSynthetic`) or an unknown edition of a
 * known model (the latter names the model's page).
 * Cost: three to four indexed queries; no engine computation.
 */
export async function loadModelPage(req: ModelPageRequest): Promise<ModelPageData> {
  const reading = { includeSynthetic: req.includeSynthetic ?? false };
  const listing = await getModelWithEditions(req.slug, reading);
  if (!listing || listing.editions.length === 0) notFound(`There is no model “${req.slug}” in the library.`);
  const { model, editions } = listing;
  const currentNumber = currentEditionNumber(editions);
  const number = req.edition ?? currentNumber!;
  if (!editions.some((e) => e.number === number)) {
    notFound(`“${model.title}” has no edition ${number}; it has editions 1 to ${editions[editions.length - 1].number}.`, {
      modelHref: `/library/${model.slug}`,
      modelTitle: model.title,
    });
  }
  let diff: ModelPageDiff | null = null;
  const wanted = editions.length > 1 ? chooseDiff(editions, number, req.from, req.to) : null;
  const needed = [...new Set([number, ...(wanted ? [wanted.from, wanted.to] : [])])];
  const loaded = new Map<number, EditionRecord>();
  await Promise.all(
    needed.map(async (n) => {
      const r = await getEdition(model.slug, n, reading);
      if (r) loaded.set(n, r);
    }),
  );
  const record = loaded.get(number);
  if (!record) notFound(`“${model.title}” has no edition ${number}.`, { modelHref: `/library/${model.slug}`, modelTitle: model.title });
  if (wanted) {
    const a = loaded.get(wanted.from);
    const b = loaded.get(wanted.to);
    const same = wanted.from === wanted.to;
    const result = a && b && !same ? diffEditions(a, b) : null;
    const cells = b ? paramCells(b.params) : null;
    diff = {
      from: wanted.from,
      to: wanted.to,
      result,
      toCells: result && cells && cells.length <= DIFF_MATRIX_CELL_LIMIT ? cells : null,
      notice: wanted.notice ?? (same ? `Editions ${wanted.from} and ${wanted.to} are the same edition; choose two different ones.` : null),
    };
  }
  const { model: _m, ...edition } = record;
  const path = `/library/${model.slug}/e/${record.number}`;
  return {
    model,
    editions,
    edition,
    currentNumber,
    viaLatest: req.edition === undefined,
    citationKey: citationKey(model.slug, record.number),
    permalink: editionUrl(baseUrl(req.url), model.slug, record.number),
    citeBase: path,
    diff,
  };
}
