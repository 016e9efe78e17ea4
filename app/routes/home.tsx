import { libraryStats, listLibrary } from "~/.server/library.server";
import { familyLabels, formatBits } from "~/families";
import type { Route } from "./+types/home";

export const meta: Route.MetaFunction = () => [
  { title: "Ergoshelf · entropy figures you can cite" },
  { name: "description", content: "A curated library of stationary process models with verified entropy rates." },
];

export async function loader(_: Route.LoaderArgs) {
  const [stats, rows] = await Promise.all([libraryStats(), listLibrary(6)]);
  return { stats, recent: rows };
}

export default function Home({ loaderData }: Route.ComponentProps) {
  const { stats, recent } = loaderData;
  return (
    <div className="space-y-12">
      <section className="grid gap-8 lg:grid-cols-[1.4fr_1fr] lg:items-end">
        <div>
          <p className="eyebrow">A reference shelf for source models</p>
          <h1 className="mt-2 text-4xl font-bold leading-tight tracking-tight sm:text-5xl">
            How many bits per symbol does your source really give?
          </h1>
          <p className="mt-4 max-w-2xl text-lg text-ink-soft">
            Ergoshelf keeps stationary process models — i.i.d. sources, Markov chains, two-state chains, random walks on
            weighted graphs and hidden Markov sources — with entropy figures recomputed by two independent routes on the
            server. Every edition is immutable and citable, so a reviewer can reproduce the number in your report.
          </p>
          <form action="/library" method="get" className="mt-6 flex max-w-xl gap-2" role="search">
            <label htmlFor="home-q" className="sr-only">
              Search the library
            </label>
            <input id="home-q" name="q" type="search" placeholder="Search models: burst errors, ring oscillator, floor graph…" className="field" />
            <button type="submit" className="btn btn-primary">
              Search
            </button>
          </form>
        </div>
        <dl className="card grid grid-cols-2 divide-x divide-rule p-0 figures">
          <div className="p-5">
            <dt className="eyebrow">Models</dt>
            <dd className="mt-1 text-3xl font-bold">{stats.models}</dd>
          </div>
          <div className="p-5">
            <dt className="eyebrow">Editions</dt>
            <dd className="mt-1 text-3xl font-bold">{stats.editions}</dd>
          </div>
          <div className="col-span-2 border-t border-rule p-5 text-sm text-ink-soft">
            Each figure is published only when two computations agree within the stated tolerance.
          </div>
        </dl>
      </section>

      <section aria-labelledby="recent-title">
        <div className="flex items-baseline justify-between gap-4">
          <h2 id="recent-title" className="text-xl font-bold">
            Recently updated
          </h2>
          <a href="/library" className="text-sm font-semibold">
            All models →
          </a>
        </div>
        {recent.length === 0 ? (
          <p className="mt-4 text-ink-soft">The library is empty. Run the seed to load the catalogue.</p>
        ) : (
          <ul className="mt-4 grid gap-4 sm:grid-cols-2 lg:grid-cols-3">
            {recent.map((m) => (
              <li key={m.slug} className="card flex flex-col p-4">
                <p className="eyebrow">{familyLabels[m.family] ?? m.family}</p>
                <h3 className="mt-1 font-semibold leading-snug">{m.title}</h3>
                <dl className="mt-3 grid grid-cols-3 gap-2 text-sm figures">
                  <div>
                    <dt className="text-xs text-ink-soft">Entropy rate</dt>
                    <dd className="font-mono">{formatBits(m.entropyRateBits)}</dd>
                  </div>
                  <div>
                    <dt className="text-xs text-ink-soft">Min-entropy</dt>
                    <dd className="font-mono">{formatBits(m.minEntropyRateBits)}</dd>
                  </div>
                  <div>
                    <dt className="text-xs text-ink-soft">Edition</dt>
                    <dd className="font-mono">{m.latestEdition}</dd>
                  </div>
                </dl>
                <p className="mt-1 text-xs text-ink-soft">bits/symbol</p>
                <p className="mt-3 line-clamp-3 text-sm text-ink-soft">{m.summary}</p>
              </li>
            ))}
          </ul>
        )}
      </section>

      <section className="grid gap-6 md:grid-cols-3" aria-label="What Ergoshelf does">
        <div>
          <h2 className="font-semibold">Verified, then published</h2>
          <p className="mt-1 text-sm text-ink-soft">
            Closed forms are checked against the general formula, one solver against another, bounds against a seeded
            estimate. A figure that fails its check is never published.
          </p>
        </div>
        <div>
          <h2 className="font-semibold">Cite the exact edition</h2>
          <p className="mt-1 text-sm text-ink-soft">
            Each edition has a permanent address, a content hash of its parameters and a citation key of the form{" "}
            <code className="font-mono text-xs">ergoshelf:slug@edition</code>.
          </p>
        </div>
        <div>
          <h2 className="font-semibold">Recompute it yourself</h2>
          <p className="mt-1 text-sm text-ink-soft">
            The compute API is open without an account: send the parameters to <code className="font-mono text-xs">POST /api/v1/compute</code>{" "}
            and compare.
          </p>
        </div>
      </section>
    </div>
  );
}
