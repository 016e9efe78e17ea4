/**
 * The library's result table (TanStack Table v9). Sorting and paging are done by the server: the
 * table reflects the URL's sort state and asks for a new order through `onSort`.
 */
import { FlexRender, rowSortingFeature, tableFeatures, useTable, type ColumnDef, type SortingState } from "@tanstack/react-table";
import { useMemo } from "react";
import { familyLabels, familyShort } from "~/families";
import { fromBits, unitLabel, useUnits } from "~/units";

export interface ResultRow {
  slug: string;
  title: string;
  family: string;
  summary: string;
  tags: string[];
  latestEdition: number;
  states: number | null;
  entropyRateBits: number | null;
  minEntropyRateBits: number | null;
  updatedAt: string;
}

export type SortKey = "relevance" | "title" | "rate" | "states" | "updated";
const columnSortKey: Record<string, SortKey> = { title: "title", states: "states", rate: "rate", updatedAt: "updated" };

const features = tableFeatures({ rowSortingFeature });

/**
 * A rate in the table: four decimals, lined up. A non-zero rate below 0.001 would print as 0.0000 or
 * 0.0001 and hide its size, so it gets scientific form with three significant digits instead.
 */
function figure(value: number | null, digits = 4) {
  if (value === null || !Number.isFinite(value)) return "—";
  if (value !== 0 && Math.abs(value) < 1e-3) return value.toExponential(2).replace("e+", "e");
  return value.toFixed(digits);
}

/** Columns that fold into the model cell's second line below the md breakpoint, so a phone shows the rates. */
const wideOnly = new Set(["family", "states", "latestEdition", "updatedAt"]);

export function ResultsTable({
  rows,
  sort,
  dir,
  onSort,
}: {
  rows: ResultRow[];
  sort: SortKey;
  dir: "asc" | "desc";
  onSort: (sort: SortKey, dir: "asc" | "desc") => void;
}) {
  const { unit } = useUnits();
  const columns = useMemo<ColumnDef<typeof features, ResultRow>[]>(
    () => [
      {
        accessorKey: "title",
        header: "Model",
        cell: (info) => {
          const r = info.row.original;
          return (
            <div>
              <a href={`/library/${r.slug}`} className="font-semibold">
                {r.title}
              </a>
              <span className="mt-0.5 line-clamp-2 max-w-md text-xs text-ink-soft">{r.summary}</span>
              <span className="mt-1 block text-xs text-ink-soft md:hidden">
                {familyLabels[r.family] ?? r.family}
                {r.states !== null ? ` · ${r.states} states` : ""} · edition {r.latestEdition}
              </span>
            </div>
          );
        },
      },
      { accessorKey: "family", header: "Family", enableSorting: false, cell: (info) => <abbr title={familyLabels[info.getValue() as string]} className="whitespace-nowrap no-underline">{familyShort[info.getValue() as string] ?? String(info.getValue())}</abbr> },
      { accessorKey: "states", header: "States", cell: (info) => info.getValue() ?? "—" },
      {
        id: "rate",
        accessorFn: (r) => r.entropyRateBits,
        header: () => (
          <span>
            Entropy rate <span className="block text-[0.65rem] normal-case tracking-normal">{unitLabel(unit)}</span>
          </span>
        ),
        cell: (info) => figure(fromBits(info.row.original.entropyRateBits, unit)),
      },
      {
        id: "minEntropy",
        accessorFn: (r) => r.minEntropyRateBits,
        header: () => (
          <span>
            Min-entropy <span className="block text-[0.65rem] normal-case tracking-normal">{unitLabel(unit)}</span>
          </span>
        ),
        enableSorting: false,
        cell: (info) => figure(fromBits(info.row.original.minEntropyRateBits, unit)),
      },
      { accessorKey: "latestEdition", header: "Edition", enableSorting: false },
      { accessorKey: "updatedAt", header: "Updated", cell: (info) => String(info.getValue()).slice(0, 10) },
    ],
    [unit],
  );
  const sorting: SortingState = sort === "relevance" ? [] : [{ id: Object.keys(columnSortKey).find((k) => columnSortKey[k] === sort) ?? "title", desc: dir === "desc" }];
  const table = useTable({
    features,
    columns,
    data: rows,
    manualSorting: true,
    enableSortingRemoval: true,
    state: { sorting },
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      const first = next[0];
      if (!first) onSort("relevance", "desc");
      else onSort(columnSortKey[first.id] ?? "title", first.desc ? "desc" : "asc");
    },
  });
  const numeric = new Set(["states", "rate", "minEntropy", "latestEdition"]);
  return (
    <div className="card overflow-x-auto">
      <table className="w-full text-left text-sm figures">
        <caption className="sr-only">Library models{sort !== "relevance" ? `, sorted by ${sort}, ${dir === "asc" ? "ascending" : "descending"}` : ", by relevance"}</caption>
        <thead className="border-b border-rule bg-paper-deep/50 text-xs uppercase tracking-wide text-ink-soft">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const sorted = header.column.getIsSorted();
                const canSort = header.column.getCanSort();
                return (
                  <th
                    key={header.id}
                    scope="col"
                    className={`px-3 py-2 align-bottom font-semibold ${numeric.has(header.column.id) ? "text-right" : ""} ${wideOnly.has(header.column.id) ? "max-md:hidden" : ""}`}
                    aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : canSort ? "none" : undefined}
                  >
                    {canSort ? (
                      <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-end gap-1 text-left uppercase tracking-wide hover:text-ink">
                        <FlexRender header={header} />
                        <span aria-hidden="true">{sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}</span>
                      </button>
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
                <td
                  key={cell.id}
                  className={`px-3 py-2 ${numeric.has(cell.column.id) ? "text-right font-mono" : ""} ${cell.column.id === "updatedAt" ? "whitespace-nowrap font-mono text-xs leading-5" : ""} ${wideOnly.has(cell.column.id) ? "max-md:hidden" : ""}`}
                >
                  <FlexRender cell={cell} />
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
