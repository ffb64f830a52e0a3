/**
 * The archive view's state as URL query parameters, and back: filters, sort, page size and the
 * page cursor. Pure, so the page (server) and the island (browser) read a bookmarked URL the
 * same way. Unknown keys are dropped; values are validated by the API, not here.
 */

/** The archive's filters (src/lib/api/archive.ts parses each), in the order URLs write them. */
export const ARCHIVE_FILTER_KEYS = [
  'q',
  'client',
  'clientId',
  'address',
  'gateKind',
  'usageClass',
  'status',
  'verdict',
  'family',
  'version',
  'auditorId',
  'gateId',
  'from',
  'to',
] as const;
export type ArchiveFilterKey = (typeof ARCHIVE_FILTER_KEYS)[number];

export const ARCHIVE_SORTS = ['-date', 'date', 'client', '-client', 'gate', '-gate'] as const;
export type ArchiveSort = (typeof ARCHIVE_SORTS)[number];

export interface ArchiveViewState {
  filters: Partial<Record<ArchiveFilterKey, string>>;
  sort: ArchiveSort;
  limit: number;
  after?: string;
  before?: string;
}

export const ARCHIVE_PAGE_SIZES = [25, 50, 100] as const;

export function viewStateFrom(params: URLSearchParams): ArchiveViewState {
  const filters: ArchiveViewState['filters'] = {};
  for (const key of ARCHIVE_FILTER_KEYS) {
    const value = params.get(key)?.trim();
    if (value) filters[key] = value;
  }
  const sort = params.get('sort') as ArchiveSort | null;
  const limit = Number(params.get('limit'));
  return {
    filters,
    sort: sort && (ARCHIVE_SORTS as readonly string[]).includes(sort) ? sort : '-date',
    limit: (ARCHIVE_PAGE_SIZES as readonly number[]).includes(limit) ? limit : 25,
    after: params.get('after') ?? undefined,
    before: params.get('before') ?? undefined,
  };
}

/** Only the filters: for the count and the export, which page nothing. */
export function filterParams(state: Pick<ArchiveViewState, 'filters'>): URLSearchParams {
  const params = new URLSearchParams();
  for (const key of ARCHIVE_FILTER_KEYS) {
    const value = state.filters[key];
    if (value) params.set(key, value);
  }
  return params;
}

/** The whole view, defaults left out so shared links stay short. */
export function viewParams(state: ArchiveViewState): URLSearchParams {
  const params = filterParams(state);
  if (state.sort !== '-date') params.set('sort', state.sort);
  if (state.limit !== 25) params.set('limit', String(state.limit));
  if (state.after) params.set('after', state.after);
  else if (state.before) params.set('before', state.before);
  return params;
}
