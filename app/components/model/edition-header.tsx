/** The page header: title, family, slug, edition, date, tags, and the retraction / supersession notices. */
import { useRouteLoaderData } from "react-router";
import { familyLabels } from "~/families";
import { can, type SessionUser } from "~/permissions";
import type { ModelPageData } from "~/.server/model-page.server";
import { formatDate } from "./format";

export function EditionHeader({ page }: { page: ModelPageData }) {
  const { model, edition, editions, currentNumber } = page;
  const retracted = Boolean(edition.retractedAt);
  const newer = currentNumber !== null && currentNumber > edition.number;
  const viewer = useRouteLoaderData<{ user: SessionUser | null }>("root")?.user ?? null;
  return (
    <header className="mp-header">
      <p className="eyebrow">
        {familyLabels[model.family] ?? model.family}
        {page.edition.params.family === "markov" && (page.edition.params.order ?? 1) > 1 ? ` · order ${page.edition.params.order}` : ""}
      </p>
      <h1 className="mt-1 text-2xl font-bold leading-tight sm:text-3xl">{model.title}</h1>
      <p className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink-soft">
        <span>
          <span className="sr-only">Slug: </span>
          <code className="font-mono text-ink">{model.slug}</code>
        </span>
        <span className="figures">
          Edition <strong className="text-ink">{edition.number}</strong> of {editions.length}
        </span>
        <span className="figures">Published {formatDate(edition.publishedAt)}</span>
        {page.viaLatest ? (
          <a href={page.citeBase} className="mp-screen-only">
            Permanent link to this edition
          </a>
        ) : (
          <a href={`/library/${model.slug}`} className="mp-screen-only">
            Model page (current edition)
          </a>
        )}
        <a href={`/workspace/new?slug=${encodeURIComponent(model.slug)}&edition=${edition.number}`} className="mp-screen-only" data-testid="adjust-copy">
          Adjust a copy in your workspace
        </a>
        {can(viewer, "edition:retract") && !retracted && (
          <a href={`/review/retract/${encodeURIComponent(model.slug)}/${edition.number}`} className="mp-screen-only" data-testid="retract-link">
            Retract this edition…
          </a>
        )}
      </p>
      {model.tags.length > 0 && (
        <ul className="mt-2 flex flex-wrap gap-1.5" aria-label="Tags">
          {model.tags.map((t) => (
            <li key={t} className="rounded border border-rule bg-card px-2 py-0.5 text-xs">
              {t}
            </li>
          ))}
        </ul>
      )}
      {retracted && (
        <div className="mp-retracted mt-4" role="note" aria-labelledby="retracted-title">
          <p id="retracted-title" className="font-bold">
            <span aria-hidden="true">⚠ </span>Edition {edition.number} was retracted on {formatDate(edition.retractedAt)}.
          </p>
          <p className="mt-1">
            <span className="font-semibold">Reason: </span>
            {edition.retractionReason || "No reason was recorded."}
          </p>
          <p className="mt-1">
            Its figures stay here so that existing citations resolve; do not rely on them.{" "}
            {currentNumber !== null && currentNumber !== edition.number ? (
              <>
                <a href={`/library/${model.slug}/e/${currentNumber}`}>Go to the current edition ({currentNumber})</a>
                <span className="mp-print-only font-mono text-xs"> {page.permalink.replace(/\/e\/\d+$/, `/e/${currentNumber}`)}</span>
              </>
            ) : (
              "No edition of this model is currently unretracted."
            )}
          </p>
        </div>
      )}
      {!retracted && newer && (
        <p className="mp-superseded mt-3 text-sm">
          Superseded by{" "}
          <a href={`/library/${model.slug}/e/${currentNumber}`}>edition {currentNumber}</a>
          {" "}({formatDate(editions.find((e) => e.number === currentNumber)?.publishedAt)}).
        </p>
      )}
    </header>
  );
}
