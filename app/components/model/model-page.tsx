/**
 * The model page, figures first: header, key-figures strip, parameters, diagram, verified figures,
 * plots, edition history with the diff, the citation, and the provenance. One component serves the
 * current-edition page and the edition permalink.
 */
import { isRouteErrorResponse, useRouteError } from "react-router";
import type { ModelPageData } from "~/.server/model-page.server";
import { CitePanel } from "./cite-panel";
import { EditionDiffView, EditionHistory } from "./edition-history";
import { EditionHeader } from "./edition-header";
import { FiguresSection } from "./figures-section";
import { KeyFigures } from "./key-figures";
import { Parameters } from "./parameters";
import { ConvergencePlot, RenyiPlot } from "./plots";
import { Provenance } from "./provenance";
import { StateDiagram } from "./state-diagram";

/** `<title> · edition N · Ergoshelf`, plus a description and the canonical permanent URL. */
export function modelPageMeta(page: ModelPageData | undefined) {
  if (!page) return [{ title: "Model not found · Ergoshelf" }];
  return [
    { title: `${page.model.title} · edition ${page.edition.number} · Ergoshelf` },
    { name: "description", content: page.model.summary },
    { tagName: "link", rel: "canonical", href: page.permalink },
  ];
}

function Section({ id, title, children, className = "" }: { id: string; title: string; children: React.ReactNode; className?: string }) {
  return (
    <section id={id} aria-labelledby={`${id}-title`} className={`mp-section ${className}`}>
      <h2 id={`${id}-title`} className="mp-h2">
        {title}
      </h2>
      <div className="mt-3">{children}</div>
    </section>
  );
}

const SECTIONS = [
  ["parameters", "Parameters"],
  ["diagram", "Diagram"],
  ["figures", "Figures"],
  ["plots", "Plots"],
  ["history", "Editions"],
  ["cite", "Cite"],
  ["about", "Provenance"],
] as const;

export function ModelPage({ page }: { page: ModelPageData }) {
  const { edition, model } = page;
  const f = edition.figures;
  return (
    <article className="mp-page" data-family={model.family}>
      <EditionHeader page={page} />
      <nav aria-label="On this page" className="mp-toc mt-4">
        <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm">
          {SECTIONS.map(([id, label]) => (
            <li key={id}>
              <a href={`#${id}`}>{label}</a>
            </li>
          ))}
        </ul>
      </nav>
      <div className="mp-kf-wrap mt-4">
        <KeyFigures figures={f} edition={edition.number} total={page.editions.length} publishedAt={edition.publishedAt} retracted={Boolean(edition.retractedAt)} />
      </div>
      <Section id="parameters" title="Parameters">
        <Parameters params={edition.params} figures={f} />
      </Section>
      <Section id="diagram" title="State-transition diagram" className="mp-screen-only">
        <StateDiagram params={edition.params} states={f.states} />
      </Section>
      <Section id="figures" title="Figures and their verification">
        <FiguresSection figures={f} verification={edition.verification} />
      </Section>
      <Section id="plots" title="Plots" className="mp-screen-only">
        <div className="grid gap-6 lg:grid-cols-2">
          <div>
            <h3 className="text-base font-bold">Convergence to the rate</h3>
            <ConvergencePlot figures={f} verification={edition.verification} />
          </div>
          <div>
            <h3 className="text-base font-bold">Rényi rate against the order</h3>
            <RenyiPlot figures={f} />
          </div>
        </div>
      </Section>
      <Section id="history" title="Edition history">
        <EditionHistory page={page} />
        <div id="compare" className="mp-compare mt-5">
          <h3 className="text-base font-bold">Compare two editions</h3>
          {page.diff ? (
            <div className="mt-2">
              <EditionDiffView page={page} diff={page.diff} />
            </div>
          ) : (
            <p className="mt-1 text-sm text-ink-soft">This model has one edition, so there is nothing to compare yet.</p>
          )}
        </div>
      </Section>
      <Section id="cite" title="Cite this edition" className="mp-cite-section">
        <CitePanel page={page} />
      </Section>
      <Section id="about" title="Provenance and methods">
        <Provenance model={model} />
      </Section>
    </article>
  );
}

/** Errors of the model routes: 404 for an unknown edition names the model's page; 400 explains the address. */
export function ModelPageError() {
  const error = useRouteError();
  let status = 500;
  let message = "Something went wrong on our side while showing this model. Try again in a moment.";
  let modelHref: string | null = null;
  let modelTitle: string | null = null;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const d = (error.data ?? {}) as { message?: unknown; modelHref?: unknown; modelTitle?: unknown };
    if (typeof d.message === "string") message = d.message;
    else if (status === 404) message = "We could not find that model or edition.";
    if (typeof d.modelHref === "string") modelHref = d.modelHref;
    if (typeof d.modelTitle === "string") modelTitle = d.modelTitle;
  }
  const title = status === 404 ? "We could not find that edition" : status === 400 ? "That address is not a valid edition" : "Something went wrong";
  return (
    <section className="mx-auto max-w-2xl py-10" aria-labelledby="error-title">
      <p className="eyebrow">Error {status}</p>
      <h1 id="error-title" className="mt-2 text-3xl font-bold">
        {title}
      </h1>
      <p className="mt-3 text-ink-soft">{message}</p>
      <div className="mt-6 flex flex-wrap gap-3">
        {modelHref && (
          <a className="btn btn-primary" href={modelHref}>
            Go to {modelTitle ?? "the model"}
          </a>
        )}
        <a className={`btn ${modelHref ? "btn-quiet" : "btn-primary"}`} href="/library">
          Browse the library
        </a>
      </div>
    </section>
  );
}
