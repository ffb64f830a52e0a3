/**
 * The archive island: filters, a server-sorted and server-paged table, the match count and the
 * export link. Everything the view shows is in the URL (filters, sort, page size, cursor), so a
 * view can be bookmarked or sent to a colleague; Back and Forward walk through the pages.
 * Data comes from /api/archive through react-query; the previous page stays on screen while
 * the next one loads, so the table does not jump.
 */
import { QueryClient, QueryClientProvider, keepPreviousData, useQuery } from '@tanstack/react-query';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type SortingState,
  type Updater,
} from '@tanstack/react-table';
import { useEffect, useMemo, useRef, useState } from 'react';
import type { ArchiveItem } from '@/lib/api/archive';
import {
  ARCHIVE_PAGE_SIZES,
  filterParams,
  viewParams,
  viewStateFrom,
  type ArchiveFilterKey,
  type ArchiveSort,
  type ArchiveViewState,
} from '@/lib/archive-query';
import {
  count as countOf,
  formatDay,
  GATE_KIND_LABEL,
  gateKindLabel,
  rulesetLabel,
  STATUS_LABEL,
  statusLabel,
  usageClassLabel,
  VERDICT_ICON,
  VERDICT_LABEL,
  VERDICT_TEXT_CLASS,
  VERDICT_WORDS,
} from '@/lib/vocabulary';
import type { Verdict } from '@/lib/rules/vocabulary';
import { archiveCount, archivePage, valueOf } from '@/lib/api/client';

export interface ArchiveOptions {
  auditors: { id: string; name: string }[];
  rulesets: { family: string; title: string; versions: string[] }[];
}

interface Props {
  /** The page URL's query string as the server saw it (the island's first state). */
  initialSearch: string;
  options: ArchiveOptions;
  timeZone: string;
}

export default function ArchiveApp(props: Props) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: { queries: { staleTime: 30_000, refetchOnWindowFocus: false, retry: 1 } },
      }),
  );
  return (
    <QueryClientProvider client={client}>
      <ArchiveTable {...props} />
    </QueryClientProvider>
  );
}

const TEXT_FILTERS = ['q', 'client', 'address'] as const;
const SORTABLE = new Set(['date', 'client', 'gate']);

function sortingOf(sort: ArchiveSort): SortingState {
  return [{ id: sort.replace('-', ''), desc: sort.startsWith('-') }];
}

const column = createColumnHelper<ArchiveItem>();

/** Status as a chip and the verdict as coloured text with an icon: a status, not a button. */
function Outcome({ item }: { item: ArchiveItem }) {
  const tone = VERDICT_TEXT_CLASS;
  const icon = VERDICT_ICON;
  const verdict = item.verdict as Verdict | null;
  return (
    <span className="inline-flex flex-wrap items-center gap-x-2 gap-y-1">
      <span className="rounded bg-iron-100 px-2 py-0.5 text-xs font-semibold">
        {statusLabel(item.status)}
      </span>
      {verdict && (
        <span className={`inline-flex items-center gap-1 text-xs font-semibold ${tone[verdict]}`}>
          <span aria-hidden="true">{icon[verdict]}</span>
          {VERDICT_WORDS[verdict].short}
        </span>
      )}
    </span>
  );
}

function ArchiveTable({ initialSearch, options, timeZone }: Props) {
  const [state, setState] = useState<ArchiveViewState>(() =>
    viewStateFrom(new URLSearchParams(initialSearch)),
  );
  // What is typed in the text boxes; committed to the state (and the URL) after a short pause.
  const [typed, setTyped] = useState(
    () =>
      Object.fromEntries(TEXT_FILTERS.map((k) => [k, state.filters[k] ?? ''])) as Record<
        (typeof TEXT_FILTERS)[number],
        string
      >,
  );
  const historyMode = useRef<'push' | 'replace'>('replace');

  const update = (change: Partial<ArchiveViewState>, mode: 'push' | 'replace' = 'push') => {
    historyMode.current = mode;
    setState((current) => ({ ...current, after: undefined, before: undefined, ...change }));
  };
  const setFilter = (key: ArchiveFilterKey, value: string, mode: 'push' | 'replace' = 'push') => {
    setState((current) => {
      historyMode.current = mode;
      const filters = { ...current.filters, [key]: value || undefined };
      return { ...current, filters, after: undefined, before: undefined };
    });
  };

  useEffect(() => {
    const timer = setTimeout(() => {
      for (const key of TEXT_FILTERS)
        if ((state.filters[key] ?? '') !== typed[key].trim()) setFilter(key, typed[key].trim(), 'replace');
    }, 300);
    return () => clearTimeout(timer);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [typed]);

  const query = viewParams(state).toString();
  const filterQuery = filterParams(state).toString();

  useEffect(() => {
    const wanted = query ? `?${query}` : window.location.pathname;
    if (`?${query}` === window.location.search || (!query && !window.location.search)) return;
    if (historyMode.current === 'push') window.history.pushState(null, '', wanted);
    else window.history.replaceState(null, '', wanted);
  }, [query]);

  useEffect(() => {
    const onPop = () => {
      const next = viewStateFrom(new URLSearchParams(window.location.search));
      historyMode.current = 'replace';
      setState(next);
      setTyped(Object.fromEntries(TEXT_FILTERS.map((k) => [k, next.filters[k] ?? ''])) as typeof typed);
    };
    window.addEventListener('popstate', onPop);
    return () => window.removeEventListener('popstate', onPop);
  }, []);

  const page = useQuery({
    queryKey: ['archive', query],
    queryFn: ({ signal }) => valueOf(archivePage(query, signal)),
    placeholderData: keepPreviousData,
  });
  const count = useQuery({
    queryKey: ['archive-count', filterQuery],
    queryFn: ({ signal }) => valueOf(archiveCount(filterQuery, signal)),
    placeholderData: keepPreviousData,
  });

  const dateFormat = useMemo(() => ({ format: (date: Date) => formatDay(date, timeZone) }), [timeZone]);
  const titleOf = useMemo(() => {
    const titles = new Map(options.rulesets.map((r) => [r.family, r.title]));
    return (family: string) => titles.get(family) ?? null;
  }, [options.rulesets]);
  // Filters start folded on phones (results first) and open on wider screens.
  const [filtersOpen, setFiltersOpen] = useState(false);
  useEffect(() => setFiltersOpen(window.matchMedia('(min-width: 768px)').matches), []);
  const columns = useMemo(
    () => [
      column.accessor('date', {
        header: 'Visit',
        sortDescFirst: true,
        cell: (c) => (
          <a
            href={`/assessments/${c.row.original.id}`}
            className="inline-flex min-h-11 items-center whitespace-nowrap font-semibold"
          >
            {dateFormat.format(new Date(c.getValue()))}
          </a>
        ),
      }),
      column.accessor((row) => row.client.name, {
        id: 'client',
        header: 'Client',
        cell: (c) => <span className="font-semibold">{c.getValue()}</span>,
      }),
      column.accessor((row) => row.site.addressLine1, {
        id: 'address',
        header: 'Address',
        enableSorting: false,
        cell: (c) => (
          <span>
            {c.getValue()}, {c.row.original.site.city}
            <span className="block text-xs text-iron-600">
              {usageClassLabel(c.row.original.site.usageClass)}
            </span>
          </span>
        ),
      }),
      column.accessor((row) => row.gate.label, {
        id: 'gate',
        header: 'Gate',
        cell: (c) => (
          <span>
            <a
              href={`/archive/gates/${c.row.original.gate.id}`}
              className="inline-flex min-h-11 items-center"
            >
              {c.getValue()}
            </a>
            <span className="block text-xs text-iron-600">{gateKindLabel(c.row.original.gate.kind)}</span>
          </span>
        ),
      }),
      column.display({
        id: 'outcome',
        header: 'Status',
        cell: (c) => <Outcome item={c.row.original} />,
      }),
      column.accessor((row) => rulesetLabel({ ...row.ruleset, title: titleOf(row.ruleset.family) }), {
        id: 'ruleset',
        header: 'Ruleset',
        enableSorting: false,
        cell: (c) => <span className="text-sm">{c.getValue()}</span>,
      }),
      column.accessor((row) => row.auditor.name, { id: 'auditor', header: 'Auditor', enableSorting: false }),
    ],
    [dateFormat, titleOf],
  );

  const table = useReactTable({
    data: page.data?.items ?? [],
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    manualFiltering: true,
    enableSortingRemoval: false,
    state: { sorting: sortingOf(state.sort) },
    onSortingChange: (updater: Updater<SortingState>) => {
      const next = typeof updater === 'function' ? updater(sortingOf(state.sort)) : updater;
      const first = next[0];
      if (!first || !SORTABLE.has(first.id)) return;
      update({ sort: `${first.desc ? '-' : ''}${first.id}` as ArchiveSort });
    },
    getRowId: (row) => row.id,
  });

  const rulesetValue = state.filters.family
    ? `${state.filters.family}${state.filters.version ? ` ${state.filters.version}` : ''}`
    : '';
  const anyFilter = Object.values(state.filters).some(Boolean);
  const activeFilters = Object.entries(state.filters).filter(
    ([k, v]) => v && k !== 'q' && k !== 'version',
  ).length;
  const total = count.data?.total;

  return (
    <div className="mt-4 grid gap-4">
      <form className="card grid gap-3" role="search" onSubmit={(e) => e.preventDefault()}>
        <label>
          <span className="label">Search client, address or gate</span>
          <input
            className="field"
            type="search"
            value={typed.q}
            onChange={(e) => setTyped({ ...typed, q: e.target.value })}
            aria-describedby="archive-search-hint"
            autoComplete="off"
          />
          <span id="archive-search-hint" className="mt-1 block text-sm text-iron-600">
            A name, street, postal code or gate.
          </span>
        </label>
        <details
          className="group"
          open={filtersOpen}
          onToggle={(e) => setFiltersOpen((e.target as HTMLDetailsElement).open)}
        >
          <summary className="flex min-h-11 cursor-pointer items-center font-semibold text-iron-800">
            <span aria-hidden="true" className="mr-2 inline-block transition-transform group-open:rotate-90">
              ▸
            </span>
            More filters{activeFilters > 0 ? ` (${activeFilters} in use)` : ''}
          </summary>
          <div className="mt-2 grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
            <label>
              <span className="label">Client name</span>
              <input
                className="field"
                type="text"
                value={typed.client}
                onChange={(e) => setTyped({ ...typed, client: e.target.value })}
                autoComplete="off"
              />
            </label>
            <label>
              <span className="label">Address</span>
              <input
                className="field"
                type="text"
                value={typed.address}
                onChange={(e) => setTyped({ ...typed, address: e.target.value })}
                autoComplete="off"
              />
            </label>
            <Select
              label="Gate kind"
              value={state.filters.gateKind}
              onChange={(v) => setFilter('gateKind', v)}
              options={Object.entries(GATE_KIND_LABEL)}
            />
            <Select
              label="Usage class"
              value={state.filters.usageClass}
              onChange={(v) => setFilter('usageClass', v)}
              options={['1', '2', '3', '4'].map((c) => [c, usageClassLabel(Number(c)).replace(/^u/, 'U')])}
            />
            <Select
              label="Status"
              value={state.filters.status}
              onChange={(v) => setFilter('status', v)}
              options={Object.entries(STATUS_LABEL)}
            />
            <Select
              label="Verdict"
              value={state.filters.verdict}
              onChange={(v) => setFilter('verdict', v)}
              options={Object.entries(VERDICT_LABEL)}
            />
            <label>
              <span className="label">Ruleset</span>
              <select
                className="field"
                value={rulesetValue}
                onChange={(e) => {
                  const [family, version] = e.target.value.split(' ');
                  update({
                    filters: { ...state.filters, family: family || undefined, version: version || undefined },
                  });
                }}
              >
                <option value="">Any</option>
                {options.rulesets.map((r) => [
                  <option key={r.family} value={r.family}>
                    {r.title}: any version
                  </option>,
                  ...r.versions.map((v) => (
                    <option key={`${r.family} ${v}`} value={`${r.family} ${v}`}>
                      {r.title} {v}
                    </option>
                  )),
                ])}
              </select>
            </label>
            <Select
              label="Auditor"
              value={state.filters.auditorId}
              onChange={(v) => setFilter('auditorId', v)}
              options={options.auditors.map((a) => [a.id, a.name])}
            />
            <label>
              <span className="label">Visited from</span>
              <input
                className="field"
                type="date"
                value={state.filters.from ?? ''}
                onChange={(e) => setFilter('from', e.target.value)}
              />
            </label>
            <label>
              <span className="label">Visited to</span>
              <input
                className="field"
                type="date"
                value={state.filters.to ?? ''}
                onChange={(e) => setFilter('to', e.target.value)}
              />
            </label>
          </div>
          <div className="mt-3">
            <button
              type="button"
              className="btn-secondary"
              disabled={!anyFilter}
              onClick={() => {
                setTyped({ q: '', client: '', address: '' });
                update({ filters: {} });
              }}
            >
              Clear filters
            </button>
          </div>
        </details>
        <div className="flex flex-wrap items-end gap-2">
          <a className="btn" href={`/api/archive/export${filterQuery ? `?${filterQuery}` : ''}`} download>
            Export signed PDFs (ZIP)
          </a>
          <p className="text-sm text-iron-600" aria-live="polite">
            {total === undefined
              ? 'Counting…'
              : `${countOf(total, 'assessment')} ${total === 1 ? 'matches' : 'match'}`}
          </p>
        </div>
      </form>

      {page.isError && (
        <p className="card border-withdraw text-withdraw" role="alert">
          {(page.error as Error).message}
        </p>
      )}

      <ul className="grid gap-2 md:hidden" aria-label="Archived assessments" aria-busy={page.isFetching}>
        {(page.data?.items ?? []).map((item) => (
          <li key={item.id} className="card grid gap-1 p-3">
            <div className="flex flex-wrap items-center justify-between gap-x-2">
              <a href={`/assessments/${item.id}`} className="inline-flex min-h-11 items-center font-semibold">
                {dateFormat.format(new Date(item.date))}
              </a>
              <Outcome item={item} />
            </div>
            <p className="font-semibold text-iron-900">{item.client.name}</p>
            <p className="text-sm text-iron-700">
              {item.site.addressLine1}, {item.site.city} · {usageClassLabel(item.site.usageClass)}
            </p>
            <p className="text-sm">
              <a href={`/archive/gates/${item.gate.id}`} className="inline-flex min-h-11 items-center">
                {item.gate.label}
              </a>
              <span className="text-iron-600"> · {gateKindLabel(item.gate.kind)}</span>
            </p>
            <p className="text-xs text-iron-600">
              {rulesetLabel({ ...item.ruleset, title: titleOf(item.ruleset.family) })} · {item.auditor.name}
            </p>
          </li>
        ))}
        {page.isSuccess && page.data.items.length === 0 && (
          <li className="card text-iron-600">Nothing in the archive matches these filters.</li>
        )}
        {page.isPending && <li className="card text-iron-600">Loading…</li>}
      </ul>

      <div className="card hidden overflow-x-auto p-0 md:block" aria-busy={page.isFetching}>
        <table className="w-full min-w-[52rem] border-collapse text-left text-sm">
          <caption className="sr-only">
            Archived assessments,{' '}
            {state.sort.includes('date') ? 'by visit date' : `by ${state.sort.replace('-', '')}`}
          </caption>
          <thead className="bg-iron-50">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      className="px-3 py-2 font-semibold text-iron-800"
                      aria-sort={sorted ? (sorted === 'desc' ? 'descending' : 'ascending') : undefined}
                    >
                      {header.column.getCanSort() ? (
                        <button
                          type="button"
                          className="inline-flex min-h-11 items-center gap-1 font-semibold"
                          onClick={header.column.getToggleSortingHandler()}
                        >
                          {flexRender(header.column.columnDef.header, header.getContext())}
                          <span aria-hidden="true">
                            {sorted === 'desc' ? '▼' : sorted === 'asc' ? '▲' : '↕'}
                          </span>
                        </button>
                      ) : (
                        flexRender(header.column.columnDef.header, header.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-t border-iron-100 align-top">
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
            {page.isSuccess && page.data.items.length === 0 && (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-iron-600">
                  Nothing in the archive matches these filters.
                </td>
              </tr>
            )}
            {page.isPending && (
              <tr>
                <td colSpan={columns.length} className="px-3 py-6 text-center text-iron-600">
                  Loading…
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>

      <nav className="flex flex-wrap items-center justify-between gap-2" aria-label="Archive pages">
        <button
          type="button"
          className="btn-secondary"
          disabled={!page.data?.prevCursor}
          onClick={() => update({ before: page.data?.prevCursor ?? undefined })}
        >
          ← Previous
        </button>
        <label className="flex items-center gap-2 text-sm">
          Rows per page
          <select
            className="field w-auto"
            value={state.limit}
            onChange={(e) => update({ limit: Number(e.target.value) })}
          >
            {ARCHIVE_PAGE_SIZES.map((size) => (
              <option key={size} value={size}>
                {size}
              </option>
            ))}
          </select>
        </label>
        <button
          type="button"
          className="btn-secondary"
          disabled={!page.data?.nextCursor}
          onClick={() => update({ after: page.data?.nextCursor ?? undefined })}
        >
          Next →
        </button>
      </nav>
    </div>
  );
}

function Select({
  label,
  value,
  onChange,
  options,
}: {
  label: string;
  value: string | undefined;
  onChange: (value: string) => void;
  options: [string, string][];
}) {
  return (
    <label>
      <span className="label">{label}</span>
      <select className="field" value={value ?? ''} onChange={(e) => onChange(e.target.value)}>
        <option value="">Any</option>
        {options.map(([v, text]) => (
          <option key={v} value={v}>
            {text}
          </option>
        ))}
      </select>
    </label>
  );
}
