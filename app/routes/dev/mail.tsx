// The development mailbox: what the local fake SMTP server stored. Exists only while the fake is in
// use (ERGOSHELF_MAIL_FAKE=1); open to any signed-in user (see docs/decisions/0009-mail.md).
import { Fragment } from "react";
import { data, Link } from "react-router";
import { z } from "zod";
import { requireUser } from "~/.server/auth.server";
import { devMailboxView, fakeMailEnabled, storedMailIdPattern } from "~/.server/mail.server";
import type { Route } from "./+types/mail";

export const meta: Route.MetaFunction = () => [{ title: "Development mailbox · Ergoshelf" }, { name: "robots", content: "noindex" }];

const querySchema = z.object({
  id: z.string().regex(storedMailIdPattern, "That is not a message id of the development mailbox.").optional(),
});

export async function loader({ request }: Route.LoaderArgs) {
  if (!fakeMailEnabled()) {
    throw data({ message: "There is no mailbox on this server: it sends real e-mail (the development mailbox exists only with ERGOSHELF_MAIL_FAKE=1)." }, { status: 404 });
  }
  await requireUser(request);
  const query = querySchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!query.success) throw data({ message: query.error.issues[0].message }, { status: 400, statusText: "Bad request" });
  const view = await devMailboxView({ id: query.data.id });
  return data(view, { status: view.missing ? 404 : 200 });
}

/** A fixed, time-zone-free rendering, identical on server and browser. */
function formatTime(iso: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : `${d.toISOString().slice(0, 19).replace("T", " ")} UTC`;
}

/** Plain text with its http(s) addresses turned into links. */
function Linkified({ text }: { text: string }) {
  const parts = text.split(/(https?:\/\/[^\s<>"]+)/g);
  return (
    <>
      {parts.map((part, i) =>
        i % 2 === 1 ? (
          <a key={i} href={part} className="break-all">
            {part}
          </a>
        ) : (
          <Fragment key={i}>{part}</Fragment>
        ),
      )}
    </>
  );
}

/** The HTML part, with links opening in a new tab (outside the sandbox). */
function framedHtml(html: string): string {
  const base = '<base target="_blank">';
  return /<head[^>]*>/i.test(html) ? html.replace(/<head[^>]*>/i, (m) => m + base) : base + html;
}

export default function DevMail({ loaderData }: Route.ComponentProps) {
  const { messages, selected, missing, mailDir } = loaderData;
  return (
    <div>
      <div role="note" className="mb-6 rounded-md border-2 border-warn bg-card px-4 py-3">
        <p className="font-semibold text-warn">
          <span aria-hidden="true">⚠ </span>Development mailbox — every message this server sent; not present in production
        </p>
        <p className="mt-1 text-sm text-ink-soft">
          Mail goes to a local fake SMTP server, which keeps it in <code className="break-all">{mailDir}</code> instead of
          delivering it. Every signed-in user can read it here.
        </p>
      </div>
      <p className="eyebrow">Development</p>
      <h1 className="mt-1 text-3xl font-bold">Mailbox</h1>
      <p className="mt-2 text-ink-soft">
        {messages.length === 0 ? "No messages yet." : `${messages.length} message${messages.length === 1 ? "" : "s"}, newest first.`}
      </p>

      <div className="mt-6 grid gap-6 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
        <nav aria-label="Messages" className="min-w-0">
          {messages.length === 0 ? (
            <div className="card p-4 text-sm text-ink-soft">
              Nothing has been sent since the fake started. Submitting or reviewing a proposal sends mail.
            </div>
          ) : (
            <ul className="card divide-y divide-rule">
              {messages.map((m) => {
                const current = selected?.id === m.id;
                return (
                  <li key={m.id} className={current ? "bg-accent-wash" : undefined}>
                    <Link
                      to={`?id=${m.id}`}
                      aria-current={current ? "true" : undefined}
                      className="block px-4 py-3 text-ink no-underline hover:bg-paper-deep"
                    >
                      <span className="block font-semibold break-words text-accent">{m.subject || "(no subject)"}</span>
                      <span className="mt-0.5 block text-sm break-all text-ink-soft">to {m.to.join(", ")}</span>
                      <time dateTime={m.at} className="figures mt-0.5 block text-xs text-ink-soft">
                        {formatTime(m.at)}
                      </time>
                    </Link>
                  </li>
                );
              })}
            </ul>
          )}
        </nav>

        <section aria-labelledby="message-subject" className="min-w-0">
          {missing ? (
            <div className="card p-4" role="status">
              <h2 id="message-subject" className="font-semibold">
                No such message
              </h2>
              <p className="mt-1 text-sm text-ink-soft">It may have been removed with the mail folder. Choose one from the list.</p>
            </div>
          ) : selected ? (
            <article className="card p-4 sm:p-5">
              <h2 id="message-subject" className="text-xl font-bold break-words">
                {selected.subject || "(no subject)"}
              </h2>
              <dl className="mt-3 grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1 text-sm">
                <dt className="text-ink-soft">From</dt>
                <dd className="break-all">{selected.from}</dd>
                <dt className="text-ink-soft">To</dt>
                <dd className="break-all">{selected.to.join(", ")}</dd>
                <dt className="text-ink-soft">Date</dt>
                <dd className="figures">
                  <time dateTime={selected.date}>{formatTime(selected.date)}</time>
                </dd>
                <dt className="text-ink-soft">Message-ID</dt>
                <dd className="font-mono text-xs break-all">{selected.messageId || "—"}</dd>
              </dl>

              <h3 className="eyebrow mt-5">Plain-text part</h3>
              {selected.text ? (
                <pre className="mt-2 overflow-x-auto rounded border border-rule bg-paper p-3 text-sm break-words whitespace-pre-wrap">
                  <Linkified text={selected.text} />
                </pre>
              ) : (
                <p className="mt-2 text-sm text-ink-soft">This message has no plain-text part.</p>
              )}

              <h3 className="eyebrow mt-5">HTML part</h3>
              {selected.html ? (
                <>
                  <iframe
                    title={`HTML part of “${selected.subject}”`}
                    sandbox="allow-popups allow-popups-to-escape-sandbox"
                    srcDoc={framedHtml(selected.html)}
                    className="mt-2 h-[28rem] w-full rounded border border-rule bg-card"
                  />
                  <p className="mt-1 text-xs text-ink-soft">Shown sandboxed: scripts do not run; links open in a new tab.</p>
                </>
              ) : (
                <p className="mt-2 text-sm text-ink-soft">This message has no HTML part.</p>
              )}
            </article>
          ) : null}
        </section>
      </div>
    </div>
  );
}
