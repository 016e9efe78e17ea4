import { FlexRender, rowSortingFeature, tableFeatures, useTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import { useMemo } from "react";
import { Form, Link, useSearchParams } from "react-router";
import { requireCurator } from "~/.server/auth.server";
import { listReviewQueue, type ProposalListRow } from "~/.server/proposals.server";
import { age, StateBadge, when } from "~/components/review/proposal-parts";
import { familyLabels, familyShort } from "~/families";
import { openProposalStates, proposalKindLabels, proposalStateLabels, type ProposalState } from "~/proposal-forms";
import { reviewQuerySchema, sortQueue, type QueueSort } from "~/review-queue";
import type { Route } from "./+types/index";

export const meta: Route.MetaFunction = () => [{ title: "Review queue · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireCurator(request);
  const url = new URL(request.url);
  const parsed = reviewQuerySchema.safeParse(Object.fromEntries(url.searchParams));
  // An unreadable filter falls back to the default view, and says so.
  const query = parsed.success ? parsed.data : reviewQuerySchema.parse({});
  const notice = parsed.success ? null : `Some filters in the address were not understood (${parsed.error.issues[0].message}); showing the open proposals.`;
  const all = await listReviewQueue();
  const now = Date.now();
  const rows = sortQueue(
    all.filter(
      (p) =>
        (query.state === "open" ? openProposalStates.includes(p.state) : query.state === "all" ? true : p.state === query.state) &&
        (query.family === "any" || p.family === query.family) &&
        (now - new Date(p.createdAt).getTime()) / 86_400_000 >= query.olderThan,
    ),
    query.sort,
    query.dir,
  );
  const openCount = all.filter((p) => openProposalStates.includes(p.state)).length;
  const mineOpen = all.filter((p) => openProposalStates.includes(p.state) && p.authorId === user.id).length;
  return { rows, query, notice, openCount, mineOpen, total: all.length, userId: user.id };
}

type Row = ProposalListRow & { createdAt: string | Date; updatedAt: string | Date };
const features = tableFeatures({ rowSortingFeature });
const sortable: Record<string, QueueSort> = { title: "title", state: "state", family: "family", authorName: "author", createdAt: "age", updatedAt: "updated" };

export default function ReviewQueue({ loaderData }: Route.ComponentProps) {
  const { rows, query, notice, openCount, mineOpen, total, userId } = loaderData;
  const [params] = useSearchParams();
  const sortHref = (sort: QueueSort) => {
    const next = new URLSearchParams(params);
    const dir = query.sort === sort && query.dir === "asc" ? "desc" : "asc";
    next.set("sort", sort);
    next.set("dir", dir);
    return `?${next}`;
  };
  const columns = useMemo<ColumnDef<typeof features, Row>[]>(
    () => [
      {
        accessorKey: "title",
        header: "Proposal",
        cell: (info) => {
          const r = info.row.original;
          return (
            <div>
              <Link to={`/review/${r.id}`} className="font-semibold">
                {r.title}
              </Link>
              <span className="block text-xs text-ink-soft">
                {proposalKindLabels[r.kind]}
                {r.slug && (
                  <>
                    {" · "}
                    <code className="font-mono">{r.slug}</code>
                  </>
                )}
                {r.comments > 0 && ` · ${r.comments} comment${r.comments === 1 ? "" : "s"}`}
              </span>
            </div>
          );
        },
      },
      { accessorKey: "state", header: "State", cell: (info) => <StateBadge state={info.getValue() as ProposalState} /> },
      {
        accessorKey: "family",
        header: "Family",
        cell: (info) => (
          <abbr title={familyLabels[info.getValue() as string]} className="whitespace-nowrap no-underline">
            {familyShort[info.getValue() as string] ?? String(info.getValue())}
          </abbr>
        ),
      },
      {
        accessorKey: "authorName",
        header: "Author",
        cell: (info) => (
          <span>
            {String(info.getValue())}
            {info.row.original.authorId === userId && <span className="block text-xs text-ink-soft">you: another curator decides</span>}
          </span>
        ),
      },
      { accessorKey: "createdAt", header: "Waiting", cell: (info) => <span title={when(info.getValue() as string)}>{age(info.getValue() as string)}</span> },
      { accessorKey: "updatedAt", header: "Last change", cell: (info) => when(info.getValue() as string) },
    ],
    [userId],
  );
  const columnFor = Object.keys(sortable).find((k) => sortable[k] === query.sort) ?? "createdAt";
  const sorting: SortingState = [{ id: columnFor, desc: query.dir === "desc" }];
  const table = useTable({ features, columns, data: rows as Row[], manualSorting: true, state: { sorting } });

  return (
    <div>
      <p className="eyebrow">Curators</p>
      <h1 className="mt-1 text-3xl font-bold">Review queue</h1>
      <p className="mt-2 max-w-2xl text-ink-soft">
        {openCount === 0 ? "No proposal is waiting for a decision." : `${openCount} open proposal${openCount === 1 ? "" : "s"}`}
        {mineOpen > 0 && ` (${mineOpen} of them yours, which another curator must decide)`}. Each decision needs a note for the author; accepting publishes the next
        edition at once.
      </p>

      <Form method="get" className="mt-5 flex flex-wrap items-end gap-3" data-testid="queue-filters">
        <div>
          <label htmlFor="f-state" className="block text-sm font-semibold">State</label>
          <select id="f-state" name="state" defaultValue={query.state} className="field mt-1 w-auto">
            <option value="open">Open (waiting)</option>
            <option value="all">Any state</option>
            {(Object.keys(proposalStateLabels) as ProposalState[]).map((s) => (
              <option key={s} value={s}>
                {proposalStateLabels[s]}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="f-family" className="block text-sm font-semibold">Family</label>
          <select id="f-family" name="family" defaultValue={query.family} className="field mt-1 w-auto">
            <option value="any">Any family</option>
            {Object.entries(familyLabels).map(([k, v]) => (
              <option key={k} value={k}>
                {v}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="f-age" className="block text-sm font-semibold">Waiting</label>
          <select id="f-age" name="olderThan" defaultValue={String(query.olderThan)} className="field mt-1 w-auto">
            <option value="0">Any time</option>
            <option value="1">At least 1 day</option>
            <option value="3">At least 3 days</option>
            <option value="7">At least a week</option>
            <option value="30">At least 30 days</option>
          </select>
        </div>
        <input type="hidden" name="sort" value={query.sort} />
        <input type="hidden" name="dir" value={query.dir} />
        <button type="submit" className="btn btn-quiet">
          Show
        </button>
        <span className="text-sm text-ink-soft" role="status">
          {rows.length} of {total} proposal{total === 1 ? "" : "s"}
        </span>
      </Form>
      {notice && (
        <p className="mt-2 text-sm text-warn" role="status">
          {notice}
        </p>
      )}

      {rows.length === 0 ? (
        <div className="card mt-4 p-6">
          <h2 className="font-semibold">{openCount === 0 && query.state === "open" ? "The queue is empty" : "No proposal matches these filters"}</h2>
          <p className="mt-1 text-sm text-ink-soft">
            {openCount === 0 && query.state === "open" ? "Nothing is waiting for review. " : ""}
            <Link to="/review?state=all">Show every proposal</Link>.
          </p>
        </div>
      ) : (
        <div className="card mt-4 overflow-x-auto">
          <table className="w-full text-left text-sm" data-testid="review-queue">
            <caption className="sr-only">
              Proposals, sorted by {query.sort}, {query.dir === "asc" ? "ascending" : "descending"}
            </caption>
            <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
              {table.getHeaderGroups().map((group) => (
                <tr key={group.id}>
                  {group.headers.map((header) => {
                    const sorted = header.column.getIsSorted();
                    const key = sortable[header.column.id];
                    return (
                      <th key={header.id} scope="col" className="px-3 py-2 align-bottom font-semibold" aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : key ? "none" : undefined}>
                        {key ? (
                          <Link to={sortHref(key)} className="inline-flex items-end gap-1 text-ink-soft no-underline hover:text-ink" preventScrollReset>
                            <FlexRender header={header} />
                            <span aria-hidden="true">{sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}</span>
                          </Link>
                        ) : (
                          <FlexRender header={header} />
                        )}
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              {table.getRowModel().rows.map((row) => (
                <tr key={row.id} className="border-b border-rule/60 align-top last:border-0 hover:bg-paper/60">
                  {row.getAllCells().map((cell) => (
                    <td key={cell.id} className={`px-3 py-2 ${cell.column.id === "updatedAt" ? "figures font-mono text-xs whitespace-nowrap" : ""}`}>
                      <FlexRender cell={cell} />
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
