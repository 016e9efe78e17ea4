/** How to cite this edition: key (with a copy button), permanent URL, content hash, engine version, downloads. */
import { useEffect, useRef, useState } from "react";
import { citationFileName } from "~/citations";
import type { ModelPageData } from "~/.server/model-page.server";

function CopyButton({ text, what }: { text: string; what: string }) {
  const [status, setStatus] = useState<"" | "copied" | "failed">("");
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  useEffect(() => () => {
    if (timer.current) clearTimeout(timer.current);
  }, []);
  async function copy() {
    try {
      await navigator.clipboard.writeText(text);
      setStatus("copied");
    } catch {
      setStatus("failed");
    }
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => setStatus(""), 4000);
  }
  return (
    <span className="mp-copy inline-flex items-center gap-2">
      <button type="button" className="btn btn-quiet px-2 py-1 text-xs" onClick={copy} aria-label={`Copy the ${what}`}>
        Copy
      </button>
      <span role="status" aria-live="polite" className={`text-xs font-semibold ${status === "failed" ? "text-bad" : "text-ok"}`}>
        {status === "copied" ? "✓ Copied" : status === "failed" ? "Copy failed: select the text and copy it" : ""}
      </span>
    </span>
  );
}

export function CitePanel({ page }: { page: ModelPageData }) {
  const { model, edition } = page;
  const downloads = [
    { format: "bibtex" as const, label: "BibTeX", ext: "cite.bib" },
    { format: "ris" as const, label: "RIS", ext: "cite.ris" },
    { format: "csl" as const, label: "CSL-JSON", ext: "cite.json" },
  ];
  return (
    <div className="mp-cite card p-4">
      <dl className="mp-cite-list">
        <div>
          <dt className="eyebrow">Citation key</dt>
          <dd className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-1">
            <code className="font-mono text-base font-semibold" data-testid="citation-key">
              {page.citationKey}
            </code>
            <CopyButton text={page.citationKey} what="citation key" />
          </dd>
        </div>
        <div>
          <dt className="eyebrow">Permanent URL</dt>
          <dd className="mt-1 flex flex-wrap items-center gap-x-3 gap-y-1">
            <a href={page.citeBase} className="mp-wrap font-mono text-sm">
              {page.permalink}
            </a>
            <CopyButton text={page.permalink} what="permanent URL" />
          </dd>
        </div>
        <div>
          <dt className="eyebrow">Content hash (SHA-256 of the canonical parameters)</dt>
          <dd className="mp-hash mt-1 font-mono text-xs">{edition.contentHash}</dd>
        </div>
        <div>
          <dt className="eyebrow">Engine version</dt>
          <dd className="mt-1 font-mono text-sm">{edition.engineVersion}</dd>
        </div>
      </dl>
      <p className="mp-downloads mt-3 flex flex-wrap items-center gap-2 text-sm">
        <span className="font-semibold">Download the citation:</span>
        {downloads.map((d) => (
          <a key={d.ext} className="btn btn-quiet no-underline" href={`${page.citeBase}/${d.ext}`} download={citationFileName(model.slug, edition.number, d.format)}>
            {d.label}
          </a>
        ))}
      </p>
      {edition.retractedAt && <p className="mt-2 text-sm text-bad">This edition is retracted; cite the current edition instead unless you are documenting earlier work.</p>}
    </div>
  );
}
