import { listLibrary } from "~/.server/library.server";
import { familyLabels, formatBits } from "~/families";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Library · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const q = (new URL(request.url).searchParams.get("q") ?? "").trim().toLowerCase();
  const rows = await listLibrary();
  const filtered = q
    ? rows.filter((r) => [r.title, r.summary, r.family, ...r.tags].some((t) => t.toLowerCase().includes(q)))
    : rows;
  return { q, rows: filtered, total: rows.length };
}

export default function Library({ loaderData }: Route.ComponentProps) {
  const { q, rows, total } = loaderData;
  return (
    <div>
      <p className="eyebrow">The library</p>
      <h1 className="mt-1 text-3xl font-bold">Models</h1>
      <form method="get" className="mt-4 flex max-w-xl gap-2" role="search">
        <label htmlFor="library-q" className="sr-only">
          Search the library
        </label>
        <input id="library-q" name="q" type="search" defaultValue={q} className="field" placeholder="Search titles, summaries, tags" />
        <button className="btn btn-primary" type="submit">
          Search
        </button>
      </form>
      <p className="mt-3 text-sm text-ink-soft" role="status">
        {q ? `${rows.length} of ${total} models match “${q}”.` : `${total} models.`}
      </p>
      <div className="card mt-4 overflow-x-auto">
        <table className="w-full text-left text-sm figures">
          <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th scope="col" className="px-4 py-2">Model</th>
              <th scope="col" className="px-4 py-2">Family</th>
              <th scope="col" className="px-4 py-2 text-right">States</th>
              <th scope="col" className="px-4 py-2 text-right">Entropy rate (bits/symbol)</th>
              <th scope="col" className="px-4 py-2 text-right">Edition</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.slug} className="border-b border-rule/60 last:border-0">
                <td className="px-4 py-2">
                  <span className="font-semibold">{r.title}</span>
                  <span className="block font-mono text-xs text-ink-soft">{r.slug}</span>
                </td>
                <td className="px-4 py-2">{familyLabels[r.family] ?? r.family}</td>
                <td className="px-4 py-2 text-right font-mono">{r.states ?? "—"}</td>
                <td className="px-4 py-2 text-right font-mono">{formatBits(r.entropyRateBits)}</td>
                <td className="px-4 py-2 text-right font-mono">{r.latestEdition}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
