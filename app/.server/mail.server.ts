/**
 * Outgoing e-mail: nodemailer over SMTP (locally the fake in scripts/mail-fake.ts), the review
 * workflow's messages, and a reader for the fake's stored mailbox. See docs/decisions/0009-mail.md.
 *
 * Mail never decides whether a sign-up or a review succeeds: `sendMail` logs and returns failures
 * instead of throwing, and gives up quickly when the server does not answer.
 */
import { readdir, readFile } from "node:fs/promises";
import { join, resolve } from "node:path";
import { and, eq, inArray } from "drizzle-orm";
import nodemailer, { type Transporter } from "nodemailer";
import { z } from "zod";
import { db } from "./db.server";
import { env } from "./env.server";
import { users } from "./schema";

// Settings env.server.ts does not cover, checked here.
const mailSettingsSchema = z.object({
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  ERGOSHELF_MAIL_DIR: z.string().trim().min(1).default(".data/mail"),
  ERGOSHELF_MAIL_FROM: z.string().trim().min(3).default("Ergoshelf <no-reply@ergoshelf.invalid>"),
});

function mailSettings() {
  const parsed = mailSettingsSchema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    throw new Error(`Mail settings are invalid: ${lines.join("; ")}`);
  }
  return parsed.data;
}

/** Whether this server uses the local fake SMTP server (and so offers /dev/mail). */
export function fakeMailEnabled(): boolean {
  return env().ERGOSHELF_MAIL_FAKE === "1";
}

/** The absolute base URL links in mail point to, without a trailing slash. */
export function mailBaseUrl(): string {
  const configured = env().ERGOSHELF_BASE_URL;
  return (configured ?? `http://127.0.0.1:${mailSettings().PORT}`).replace(/\/+$/, "");
}

// ---------------------------------------------------------------------------------------------
// Sending

export interface OutgoingMail {
  to: string | string[];
  subject: string;
  text: string;
  html: string;
}

export type SendResult =
  | { status: "sent"; messageId: string; accepted: string[] }
  | { status: "skipped"; reason: string }
  | { status: "failed"; error: string };

/**
 * An SMTP transport to `host:port` (defaults: SMTP_HOST and SMTP_PORT), or null when no port is
 * configured. STARTTLS is not attempted: the only server it is meant for is the loopback fake.
 */
export function createTransport(opts: { host?: string; port?: number } = {}): Transporter | null {
  const port = opts.port ?? env().SMTP_PORT;
  if (!port) return null;
  return nodemailer.createTransport({
    host: opts.host ?? env().SMTP_HOST,
    port,
    secure: false,
    ignoreTLS: true,
    // A mail server that hangs must not hold a request for nodemailer's default two minutes.
    connectionTimeout: 5000,
    greetingTimeout: 5000,
    socketTimeout: 10000,
  });
}

let sharedTransport: Transporter | null | undefined;

function defaultTransport(): Transporter | null {
  if (sharedTransport === undefined) sharedTransport = createTransport();
  return sharedTransport;
}

const addressSchema = z.string().trim().email();

/** One line, no control characters, at most 200 characters: a header-safe subject. */
export function headerSafe(value: string, max = 200): string {
  // eslint-disable-next-line no-control-regex
  const line = value.replace(/[\u0000-\u001f\u007f]+/g, " ").replace(/\s+/g, " ").trim();
  return line.length > max ? `${line.slice(0, max - 1)}…` : line;
}

/**
 * Sends one message. Never throws: returns "skipped" when no SMTP_PORT is set or there is no valid
 * recipient, "failed" (and logs it) when the server refuses or cannot be reached.
 */
export async function sendMail(mail: OutgoingMail, opts: { transport?: Transporter } = {}): Promise<SendResult> {
  const subject = headerSafe(mail.subject);
  const wanted = (Array.isArray(mail.to) ? mail.to : [mail.to]).map((a) => a.trim()).filter(Boolean);
  const to = wanted.filter((a) => addressSchema.safeParse(a).success);
  if (to.length < wanted.length) {
    console.warn(`[mail] dropped invalid recipient(s) of "${subject}": ${wanted.filter((a) => !to.includes(a)).join(", ")}`);
  }
  if (to.length === 0) {
    console.info(`[mail] not sent (no recipients): "${subject}"`);
    return { status: "skipped", reason: "no recipients" };
  }
  let transport: Transporter | null;
  let from: string;
  try {
    transport = opts.transport ?? defaultTransport();
    from = mailSettings().ERGOSHELF_MAIL_FROM;
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    console.error(`[mail] not sent ("${subject}"): ${message}`);
    return { status: "failed", error: message };
  }
  if (!transport) {
    console.info(`[mail] not sent (no SMTP_PORT): "${subject}" to ${to.join(", ")}`);
    return { status: "skipped", reason: "no SMTP_PORT" };
  }
  try {
    const info = await transport.sendMail({ from, to, subject, text: mail.text, html: mail.html });
    const accepted = ((info.accepted ?? []) as Array<string | { address: string }>).map((a) =>
      typeof a === "string" ? a : a.address,
    );
    return { status: "sent", messageId: info.messageId, accepted };
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    console.error(`[mail] failed to send "${subject}" to ${to.join(", ")}: ${message}`);
    return { status: "failed", error: message };
  }
}

/** The addresses of enabled curators and administrators: who hears of new proposals. */
export async function curatorAddresses(): Promise<string[]> {
  const rows = await db()
    .select({ email: users.email })
    .from(users)
    .where(and(inArray(users.role, ["curator", "admin"]), eq(users.disabled, false)));
  return rows.map((r) => r.email);
}

// ---------------------------------------------------------------------------------------------
// Templates: each message has a plain-text part and a simple HTML part in Ergoshelf's colours.

export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

/** Escapes text for HTML element content and double-quoted attribute values. */
export function escapeHtml(value: string): string {
  return value
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&#39;");
}

const colours = { paper: "#f6f1e6", card: "#fffdf8", ink: "#26221d", inkSoft: "#5a5247", rule: "#d8cdb8", link: "#9b3d1f" };

interface Layout {
  subject: string;
  /** The first line of the message body. */
  heading: string;
  /** Plain sentences; escaped for HTML. */
  paragraphs: string[];
  /** A user's own words (note, comment), quoted as given. */
  quote?: { label: string; body: string };
  link: { label: string; href: string };
}

function render(layout: Layout): MailContent {
  const subject = headerSafe(layout.subject);
  const quoteText = layout.quote
    ? `${layout.quote.label}:\n${layout.quote.body
        .split(/\r?\n/)
        .map((l) => `> ${l}`)
        .join("\n")}\n\n`
    : "";
  const text =
    `${layout.heading}\n\n` +
    layout.paragraphs.map((p) => `${p}\n\n`).join("") +
    quoteText +
    `${layout.link.label}: ${layout.link.href}\n\n` +
    `-- \nErgoshelf: sent because of your role on this Ergoshelf server.\n`;

  const p = (inner: string) => `<p style="margin:0 0 14px 0;line-height:1.5">${inner}</p>`;
  const quoteHtml = layout.quote
    ? p(`<strong>${escapeHtml(layout.quote.label)}</strong>`) +
      `<blockquote style="margin:0 0 14px 0;padding:8px 12px;border-left:3px solid ${colours.rule};color:${colours.inkSoft};white-space:pre-wrap">${escapeHtml(layout.quote.body)}</blockquote>`
    : "";
  const href = escapeHtml(layout.link.href);
  const html =
    `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(subject)}</title></head>` +
    `<body style="margin:0;padding:24px 12px;background:${colours.paper};color:${colours.ink};font-family:'Noto Sans',Arial,sans-serif;font-size:15px">` +
    `<div style="max-width:560px;margin:0 auto;background:${colours.card};border:1px solid ${colours.rule};border-radius:6px;padding:20px 22px">` +
    `<p style="margin:0 0 4px 0;font-size:12px;letter-spacing:0.08em;text-transform:uppercase;color:${colours.inkSoft}">Ergoshelf</p>` +
    `<h1 style="margin:0 0 16px 0;font-size:19px;line-height:1.3">${escapeHtml(layout.heading)}</h1>` +
    layout.paragraphs.map((para) => p(escapeHtml(para))).join("") +
    quoteHtml +
    p(`<a href="${href}" style="color:${colours.link};font-weight:600">${escapeHtml(layout.link.label)}</a>`) +
    `<p style="margin:18px 0 0 0;font-size:12px;color:${colours.inkSoft}">Or open ${href}</p>` +
    `</div></body></html>`;
  return { subject, text, html };
}

export type ProposalKind = "new-model" | "new-edition";

/** Where curators review a proposal, and where its author follows it. */
export const mailPaths = {
  review: (proposalId: string) => `/review/${encodeURIComponent(proposalId)}`,
  authorProposal: (proposalId: string) => `/workspace/proposals/${encodeURIComponent(proposalId)}`,
  edition: (slug: string, edition: number) => `/library/${encodeURIComponent(slug)}/e/${edition}`,
};

function link(path: string): string {
  return mailBaseUrl() + path;
}

function describeKind(kind: ProposalKind, modelSlug?: string): string {
  return kind === "new-edition" ? `a new edition of ${modelSlug ? `the model ${modelSlug}` : "an existing model"}` : "a new model";
}

/** To curators: a proposal was submitted (or resubmitted) for review. */
export function proposalSubmittedMail(input: {
  proposalId: string;
  title: string;
  authorName: string;
  kind: ProposalKind;
  modelSlug?: string;
  resubmitted?: boolean;
}): MailContent {
  const verb = input.resubmitted ? "resubmitted" : "submitted";
  return render({
    subject: `Proposal ${verb}: ${input.title}`,
    heading: `${input.authorName} ${verb} “${input.title}” for review`,
    paragraphs: [
      `The proposal is for ${describeKind(input.kind, input.modelSlug)}. It waits in the review queue for a curator to accept it, decline it or ask for changes.`,
    ],
    link: { label: "Review the proposal", href: link(mailPaths.review(input.proposalId)) },
  });
}

/** To the author: a curator asked for changes. */
export function changesRequestedMail(input: { proposalId: string; title: string; curatorName: string; note: string }): MailContent {
  return render({
    subject: `Changes requested: ${input.title}`,
    heading: `${input.curatorName} asked for changes to “${input.title}”`,
    paragraphs: ["Edit the draft in your workspace and resubmit it when it is ready; the proposal keeps its history."],
    quote: { label: "The curator's note", body: input.note },
    link: { label: "Open the proposal", href: link(mailPaths.authorProposal(input.proposalId)) },
  });
}

/** To the author: the proposal was accepted and published as an edition. */
export function proposalAcceptedMail(input: {
  proposalId: string;
  title: string;
  curatorName: string;
  citationKey: string;
  note?: string;
}): MailContent {
  // Citation keys read ergoshelf:<slug>@<edition>; link to that edition when the key parses.
  const parsed = /^ergoshelf:([a-z0-9][a-z0-9-]*)@([1-9]\d*)$/.exec(input.citationKey);
  const href = parsed ? link(mailPaths.edition(parsed[1], Number(parsed[2]))) : link(mailPaths.authorProposal(input.proposalId));
  return render({
    subject: `Accepted and published: ${input.title}`,
    heading: `“${input.title}” is published`,
    paragraphs: [
      `${input.curatorName} accepted your proposal. The server verified its figures and published it as an immutable edition.`,
      `Cite it as ${input.citationKey}.`,
    ],
    quote: input.note ? { label: "The curator's note", body: input.note } : undefined,
    link: { label: parsed ? "Open the published edition" : "Open the proposal", href },
  });
}

/** To the author: the proposal was declined. */
export function proposalDeclinedMail(input: { proposalId: string; title: string; curatorName: string; reason: string }): MailContent {
  return render({
    subject: `Declined: ${input.title}`,
    heading: `${input.curatorName} declined “${input.title}”`,
    paragraphs: ["Your draft stays in your workspace; you may revise it and submit a new proposal."],
    quote: { label: "The reason given", body: input.reason },
    link: { label: "Open the proposal", href: link(mailPaths.authorProposal(input.proposalId)) },
  });
}

/** To the author: someone commented on the proposal. */
export function newCommentMail(input: { proposalId: string; title: string; commenterName: string; comment: string; forCurators?: boolean }): MailContent {
  return render({
    subject: `New comment on ${input.title}`,
    heading: `${input.commenterName} commented on “${input.title}”`,
    paragraphs: [],
    quote: { label: "The comment", body: input.comment },
    link: { label: "Read and reply", href: link(input.forCurators ? mailPaths.review(input.proposalId) : mailPaths.authorProposal(input.proposalId)) },
  });
}

// ---------------------------------------------------------------------------------------------
// The fake's mailbox (written by scripts/mail-fake.ts)

/** The fake names each message by receive time, a counter and random hex; nothing else is read. */
export const storedMailIdPattern = /^\d{13}-\d{4}-[0-9a-f]{6}$/;

const storedMailSchema = z.object({
  id: z.string().regex(storedMailIdPattern),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string(),
  date: z.string(),
  receivedAt: z.string().optional(),
  messageId: z.string(),
});
export type StoredMail = z.infer<typeof storedMailSchema>;

function mailDir(): string {
  return resolve(mailSettings().ERGOSHELF_MAIL_DIR);
}

/** The stored messages, newest first (at most `limit`, default 200); an absent folder is empty. */
export async function readFakeMailbox(opts: { limit?: number } = {}): Promise<StoredMail[]> {
  const limit = Math.max(0, Math.min(opts.limit ?? 200, 5000));
  const dir = mailDir();
  let names: string[];
  try {
    names = await readdir(dir);
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === "ENOENT") return [];
    throw error;
  }
  const ids = names
    .filter((n) => n.endsWith(".json"))
    .map((n) => n.slice(0, -5))
    .filter((id) => storedMailIdPattern.test(id))
    .sort()
    .reverse()
    .slice(0, limit);
  const messages: StoredMail[] = [];
  for (const id of ids) {
    const message = await readStored(dir, id);
    if (message) messages.push(message);
  }
  return messages;
}

/** One stored message by id, or null when the id is malformed or unknown. */
export async function readFakeMail(id: string): Promise<StoredMail | null> {
  if (!storedMailIdPattern.test(id)) return null;
  return readStored(mailDir(), id);
}

async function readStored(dir: string, id: string): Promise<StoredMail | null> {
  try {
    const parsed = storedMailSchema.safeParse(JSON.parse(await readFile(join(dir, `${id}.json`), "utf8")));
    return parsed.success && parsed.data.id === id ? parsed.data : null;
  } catch {
    // A file removed meanwhile or not written by the fake is simply not listed.
    return null;
  }
}

/** For /dev/mail: the list (newest first, without bodies) and the chosen message, if any. */
export async function devMailboxView(input: { id?: string }) {
  const messages = await readFakeMailbox({ limit: 200 });
  const chosenId = input.id ?? messages[0]?.id;
  const selected = chosenId ? await readFakeMail(chosenId) : null;
  return {
    mailDir: mailDir(),
    messages: messages.map(({ id, to, subject, receivedAt, date }) => ({ id, to, subject, at: receivedAt ?? date })),
    selected,
    missing: input.id !== undefined && !selected,
  };
}
