/**
 * Citations of a library edition in three open formats: BibTeX, RIS and CSL-JSON.
 * Pure and client-safe (no Node APIs): the resource routes serve these, and a page may build
 * the same text in the browser for a copy button. The choices are recorded in
 * docs/decisions/0006-citations.md.
 */
import { z } from "zod";
import { familyLabels } from "./families";

/** What a citation needs to know about one edition. */
export interface CitationInput {
  slug: string;
  title: string;
  edition: number;
  family: string;
  summary: string;
  /** When the edition was published: a Date or an ISO 8601 string. */
  publishedAt: Date | string;
  contentHash: string;
  engineVersion: string;
  entropyRateBits: number | null;
  /** The edition's absolute permanent URL. */
  url: string;
  /** When the reader accessed the edition; left out of the citation when absent. */
  accessed?: Date | string;
  retracted?: boolean;
}

export type CitationFormat = "bibtex" | "ris" | "csl";

/** The name the library cites under; an organisation, never split into given and family names. */
export const CITATION_AUTHOR = "Ergoshelf library";
export const CITATION_PUBLISHER = "Ergoshelf";

/** The canonical citation key, `ergoshelf:<slug>@<edition>`. */
export function citationKey(slug: string, edition: number): string {
  return `ergoshelf:${slug}@${edition}`;
}

/**
 * The key used inside a BibTeX file, `ergoshelf:<slug>-e<edition>`. BibTeX itself accepts `@`
 * in a key, but general-purpose .bib readers treat `@` as the start of an entry and refuse the
 * file; the exact citation key goes into the entry's note instead. The mapping is one-to-one:
 * the edition is the digits after the last `-e`.
 */
export function bibtexKey(slug: string, edition: number): string {
  return `ergoshelf:${slug}-e${edition}`;
}

/** The download file name for a format, e.g. `ergoshelf-ro-bits-order3-e3.bib`. */
export function citationFileName(slug: string, edition: number, format: CitationFormat): string {
  const ext = format === "bibtex" ? "bib" : format === "ris" ? "ris" : "json";
  return `ergoshelf-${slug}-e${edition}.${ext}`;
}

export const citationContentTypes: Record<CitationFormat, string> = {
  bibtex: "application/x-bibtex; charset=utf-8",
  ris: "application/x-research-info-systems; charset=utf-8",
  csl: "application/vnd.citationstyles.csl+json; charset=utf-8",
};

interface DateParts {
  year: number;
  month: number;
  day: number;
}

/** Calendar date (UTC) of a Date or ISO string; throws RangeError for an unreadable date. */
function dateParts(value: Date | string, what: string): DateParts {
  const d = value instanceof Date ? value : new Date(/^\d{4}-\d{2}-\d{2}$/.test(value) ? `${value}T00:00:00Z` : value);
  if (Number.isNaN(d.getTime())) throw new RangeError(`${what} is not a valid date: ${String(value)}`);
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

const pad2 = (n: number) => String(n).padStart(2, "0");
const isoDay = (p: DateParts) => `${p.year}-${pad2(p.month)}-${pad2(p.day)}`;

/** Ten significant digits, enough to tell editions apart and to check a recomputation. */
function formatFigure(bits: number): string {
  return String(Number(bits.toPrecision(10)));
}

/** Text on one line: line breaks and runs of white space become one space. */
function oneLine(s: string): string {
  return s.replace(/\s+/g, " ").trim();
}

/**
 * The citation note, shared by the three formats: the exact citation key, the figure, and what a
 * reviewer needs to reproduce it (content hash of the parameters, engine version).
 */
export function citationNote(c: CitationInput): string {
  const parts = [`Citation key ${citationKey(c.slug, c.edition)}.`];
  if (c.retracted) parts.push("This edition has been retracted; see its page for the reason.");
  const family = familyLabels[c.family] ?? c.family;
  parts.push(`Process model: ${family}.`);
  parts.push(
    c.entropyRateBits === null || !Number.isFinite(c.entropyRateBits)
      ? "Entropy rate: none (no single rate; it depends on the initial state)."
      : `Entropy rate ${formatFigure(c.entropyRateBits)} bits/symbol.`,
  );
  parts.push(`Parameters SHA-256 ${c.contentHash}.`);
  parts.push(`Engine version ${c.engineVersion}.`);
  return parts.join(" ");
}

const texReplacements: Record<string, string> = {
  "\\": "\\textbackslash{}",
  // Braces as text commands keep the field's own braces balanced, which BibTeX requires.
  "{": "\\textbraceleft{}",
  "}": "\\textbraceright{}",
  "&": "\\&",
  "%": "\\%",
  $: "\\$",
  "#": "\\#",
  _: "\\_",
  "~": "\\textasciitilde{}",
  "^": "\\textasciicircum{}",
};

/** Escapes TeX's special characters in plain text; other characters (UTF-8) pass unchanged. */
export function escapeTeX(text: string): string {
  return oneLine(text).replace(/[\\{}&%$#_~^]/g, (ch) => texReplacements[ch]);
}

/** A URL inside `\url{…}`: only `%` and `#` need a backslash there (a parsed URL has no braces). */
function escapeUrlArgument(url: string): string {
  return url.replace(/[%#]/g, (ch) => `\\${ch}`);
}

const bibMonths = ["jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec"];

/**
 * A BibTeX `@misc` entry (the standard styles have no dataset type). The title is wrapped in an
 * extra pair of braces so styles keep its capitals; `month` uses the standard month macro;
 * `url`, `urldate` and `version` are read by biblatex and natbib-style files and ignored by the
 * classic styles, which show `howpublished` instead.
 */
export function toBibTeX(c: CitationInput): string {
  const issued = dateParts(c.publishedAt, "publishedAt");
  const fields: [string, string][] = [
    ["author", `{{${CITATION_AUTHOR}}}`],
    ["title", `{{${escapeTeX(c.title)}}, edition ${c.edition}${c.retracted ? " (retracted)" : ""}}`],
    ["howpublished", `{\\url{${escapeUrlArgument(c.url)}}}`],
    ["publisher", `{${CITATION_PUBLISHER}}`],
    ["year", `{${issued.year}}`],
    ["month", bibMonths[issued.month - 1]],
    ["version", `{${c.edition}}`],
    ["url", `{${c.url}}`],
  ];
  if (c.accessed !== undefined) fields.push(["urldate", `{${isoDay(dateParts(c.accessed, "accessed"))}}`]);
  fields.push(["abstract", `{${escapeTeX(c.summary)}}`]);
  fields.push(["note", `{${escapeTeX(citationNote(c))}}`]);
  const width = Math.max(...fields.map(([name]) => name.length));
  const body = fields.map(([name, value]) => `  ${name.padEnd(width)} = ${value}`).join(",\n");
  return `@misc{${bibtexKey(c.slug, c.edition)},\n${body}\n}\n`;
}

/** One RIS line: two-letter tag, two spaces, hyphen, space, value on one line. */
function risLine(tag: string, value: string): string {
  return `${tag}  - ${oneLine(value)}`;
}

const risDate = (p: DateParts) => `${p.year}/${pad2(p.month)}/${pad2(p.day)}/`;

/**
 * An RIS record of type DATA (data file), with CRLF line ends: TY first, ER last.
 * DA and Y2 use the RIS date form `YYYY/MM/DD/`.
 */
export function toRIS(c: CitationInput): string {
  const issued = dateParts(c.publishedAt, "publishedAt");
  const lines = [
    risLine("TY", "DATA"),
    risLine("ID", citationKey(c.slug, c.edition)),
    risLine("TI", c.retracted ? `${c.title} (retracted)` : c.title),
    risLine("AU", CITATION_AUTHOR),
    risLine("PB", CITATION_PUBLISHER),
    risLine("ET", String(c.edition)),
    risLine("PY", String(issued.year)),
    risLine("DA", risDate(issued)),
    risLine("UR", c.url),
  ];
  if (c.accessed !== undefined) lines.push(risLine("Y2", risDate(dateParts(c.accessed, "accessed"))));
  lines.push(risLine("AB", c.summary));
  lines.push(risLine("N1", citationNote(c)));
  lines.push("ER  - ");
  return lines.join("\r\n") + "\r\n";
}

/** One CSL-JSON item, typed after the CSL data schema's fields used here. */
export interface CslItem {
  id: string;
  type: "dataset";
  title: string;
  version: string;
  author: { literal: string }[];
  publisher: string;
  issued: { "date-parts": [[number, number, number]] };
  accessed?: { "date-parts": [[number, number, number]] };
  URL: string;
  abstract: string;
  genre: string;
  status?: string;
  note: string;
}

const cslDate = (p: DateParts): { "date-parts": [[number, number, number]] } => ({ "date-parts": [[p.year, p.month, p.day]] });

/** A CSL-JSON array with one item of type "dataset"; its id is the citation key. */
export function toCSL(c: CitationInput): CslItem[] {
  const item: CslItem = {
    id: citationKey(c.slug, c.edition),
    type: "dataset",
    title: oneLine(c.title),
    version: String(c.edition),
    author: [{ literal: CITATION_AUTHOR }],
    publisher: CITATION_PUBLISHER,
    issued: cslDate(dateParts(c.publishedAt, "publishedAt")),
    URL: c.url,
    abstract: oneLine(c.summary),
    genre: "Stationary process model",
    note: citationNote(c),
  };
  if (c.accessed !== undefined) item.accessed = cslDate(dateParts(c.accessed, "accessed"));
  if (c.retracted) item.status = "retracted";
  return [item];
}

/** The citation text of one format, CSL-JSON as 2-space JSON with a final newline. */
export function renderCitation(format: CitationFormat, c: CitationInput): string {
  if (format === "bibtex") return toBibTeX(c);
  if (format === "ris") return toRIS(c);
  return JSON.stringify(toCSL(c), null, 2) + "\n";
}

/**
 * A strong ETag for a body: FNV-1a 64-bit of its UTF-8 bytes. Anything that changes the text
 * (a retraction, another origin, an access date) changes the tag.
 */
export function bodyETag(body: string): string {
  const bytes = new TextEncoder().encode(body);
  let h = 0xcbf29ce484222325n;
  for (const b of bytes) {
    h ^= BigInt(b);
    h = (h * 0x100000001b3n) & 0xffffffffffffffffn;
  }
  return `"${h.toString(16).padStart(16, "0")}"`;
}

/** Whether an If-None-Match header names the tag (weak comparison, as RFC 9110 asks for GET). */
export function etagMatches(ifNoneMatch: string | null, etag: string): boolean {
  if (!ifNoneMatch) return false;
  if (ifNoneMatch.trim() === "*") return true;
  const bare = etag.replace(/^W\//, "");
  return ifNoneMatch.split(",").some((t) => t.trim().replace(/^W\//, "") === bare);
}

/**
 * Editions are immutable except for a retraction, so caches may keep a citation for an hour and
 * then revalidate with the ETag (a 304 costs nothing); a year-long `immutable` would hide a later
 * retraction.
 */
export const CITATION_CACHE_CONTROL = "public, max-age=3600, must-revalidate";

/** The HTTP answer for a citation download: 200 with the file, or 304 when the ETag matches. */
export function citationResponse(request: Request, format: CitationFormat, c: CitationInput): Response {
  const body = renderCitation(format, c);
  const etag = bodyETag(body);
  const headers = new Headers({ ETag: etag, "Cache-Control": CITATION_CACHE_CONTROL });
  if (etagMatches(request.headers.get("if-none-match"), etag)) return new Response(null, { status: 304, headers });
  headers.set("Content-Type", citationContentTypes[format]);
  headers.set("Content-Disposition", `attachment; filename="${citationFileName(c.slug, c.edition, format)}"`);
  headers.set("X-Content-Type-Options", "nosniff");
  return new Response(request.method === "HEAD" ? null : body, { status: 200, headers });
}

/** The parts of a stored edition a citation uses (structurally, so this file stays client-safe). */
export interface EditionForCitation {
  model: { slug: string; title: string; family: string; summary: string };
  number: number;
  publishedAt: Date;
  retractedAt: Date | null;
  contentHash: string;
  engineVersion: string;
  entropyRateBits: number | null;
}

/** The permanent URL of an edition on a given origin (`https://host[:port]`). */
export function editionUrl(origin: string, slug: string, edition: number): string {
  return `${origin.replace(/\/+$/, "")}/library/${encodeURIComponent(slug)}/e/${edition}`;
}

/** A stored edition as citation input, with its permanent URL on `origin`. */
export function citationInputFromEdition(e: EditionForCitation, origin: string, accessed?: string): CitationInput {
  return {
    slug: e.model.slug,
    title: e.model.title,
    edition: e.number,
    family: e.model.family,
    summary: e.model.summary,
    publishedAt: e.publishedAt,
    contentHash: e.contentHash,
    engineVersion: e.engineVersion,
    entropyRateBits: e.entropyRateBits,
    url: editionUrl(origin, e.model.slug, e.number),
    accessed,
    retracted: e.retractedAt !== null,
  };
}

/** Route parameters and the optional `?accessed=YYYY-MM-DD` of a citation download. */
export const citationRequestSchema = z.object({
  slug: z.string().min(1),
  edition: z
    .string({ error: "The edition is missing from the address." })
    .regex(/^[1-9][0-9]{0,8}$/, { error: (issue) => `The edition must be a whole number from 1 up, such as 3; got "${String(issue.input)}".` })
    .transform(Number),
  accessed: z.iso.date({ error: "accessed must be a calendar date in the form YYYY-MM-DD." }).optional(),
});

/** How a citation route finds an edition (the server's library functions, or fakes in tests). */
export interface CitationLookup {
  edition(slug: string, number: number): Promise<EditionForCitation | null>;
  /** The model's edition numbers, or null when there is no such model. */
  editionNumbers(slug: string): Promise<number[] | null>;
}

function plainText(status: number, message: string): Response {
  return new Response(message + "\n", {
    status,
    headers: { "Content-Type": "text/plain; charset=utf-8", "Cache-Control": "no-store", "X-Content-Type-Options": "nosniff" },
  });
}

/**
 * Answers a citation download: 400 (text) for a malformed edition number or access date,
 * 404 (text) naming what is missing, else the file (or 304) from citationResponse.
 */
export async function answerCitation(
  request: Request,
  params: { slug?: string; edition?: string },
  format: CitationFormat,
  lookup: CitationLookup,
): Promise<Response> {
  const url = new URL(request.url);
  const accessed = url.searchParams.get("accessed");
  const parsed = citationRequestSchema.safeParse({ ...params, accessed: accessed ?? undefined });
  if (!parsed.success) return plainText(400, parsed.error.issues[0].message);
  const { slug, edition, accessed: accessedDay } = parsed.data;
  const record = await lookup.edition(slug, edition);
  if (!record) {
    const numbers = await lookup.editionNumbers(slug);
    if (!numbers) return plainText(404, `There is no model "${slug}" in the Ergoshelf library.`);
    const have = numbers.length === 1 ? `edition ${numbers[0]}` : `editions ${numbers.join(", ")}`;
    return plainText(404, `Model "${slug}" has no edition ${edition}; it has ${have}.`);
  }
  return citationResponse(request, format, citationInputFromEdition(record, url.origin, accessedDay));
}
