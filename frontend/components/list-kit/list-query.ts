import { z } from 'zod';
import { defaultPageSize, listQuerySchema, maxPageSize } from '../../../shared/schemas/pagination.ts';

/** What every list's state holds, whatever its filters. */
export interface ListState {
  page: number;
  pageSize: number;
  sort?: string;
  order?: 'asc' | 'desc';
}

/** A change to a list's state: a key set to `undefined` goes back to its default. */
export type ListPatch<Q> = { [K in keyof Q]?: Q[K] | undefined };

export interface SetListQueryOptions {
  /** Replace the current history entry instead of adding one (the search box while you type). */
  replace?: boolean;
}

export type SetListQuery<Q> = (patch: ListPatch<Q>, options?: SetListQueryOptions) => void;

const listKeyOrder = ['sort', 'order', 'page', 'pageSize'];
const listKeys = new Set(listKeyOrder);
const listOrder = (key: string) => listKeyOrder.indexOf(key);

/**
 * One list's state as it lives in the URL: parsed and defaulted with a zod schema (the server's own
 * list query schema where there is one), written back with only what differs from the defaults.
 * `base` gives the screen's own defaults for keys the schema defaults otherwise (newest first, say).
 */
export interface ListQueryDefinition<Q extends ListState> {
  defaults: Q;
  parse: (params: URLSearchParams) => Q;
  toParams: (query: Q) => URLSearchParams;
  /** The filter keys that differ from their defaults (everything but paging and sorting). */
  activeFilters: (query: Q) => (keyof Q & string)[];
}

// The output is what the screen works with; the input is the URL's text.
export function defineListQuery<Q extends ListState>(schema: z.ZodType<Q, Record<string, unknown>>, base: Record<string, string> = {}): ListQueryDefinition<Q> {
  /** Bad values in a hand-edited URL fall back to their defaults instead of breaking the page. */
  const parse = (params: URLSearchParams): Q => {
    const raw: Record<string, string> = { ...base, ...Object.fromEntries(params) };
    const first = schema.safeParse(raw);
    if (first.success) return first.data;
    for (const issue of first.error.issues) {
      const key = issue.path[0];
      if (typeof key === 'string') delete raw[key];
    }
    const second = schema.safeParse({ ...base, ...raw });
    return second.success ? second.data : schema.parse(base);
  };
  const defaults = parse(new URLSearchParams());
  const defaultOf = (key: string): unknown => (defaults as Record<string, unknown>)[key];

  const toParams = (query: Q): URLSearchParams => {
    const params = new URLSearchParams();
    // Filters first, then sorting and paging, as people read them.
    const entries = Object.entries(query).sort(([a], [b]) => listOrder(a) - listOrder(b));
    for (const [key, value] of entries) {
      if (value === undefined || value === null || value === '' || value === defaultOf(key)) continue;
      params.set(key, String(value));
    }
    return params;
  };

  const activeFilters = (query: Q) =>
    Object.entries(query)
      .filter(([key, value]) => !listKeys.has(key) && value !== undefined && value !== defaultOf(key))
      .map(([key]) => key as keyof Q & string);

  return { defaults, parse, toParams, activeFilters };
}

/**
 * The state after a change: keys set to `undefined` take their defaults again, the page size stays
 * unless changed, and anything but paging goes back to page 1.
 */
export function applyListPatch<Q extends ListState>(definition: ListQueryDefinition<Q>, current: Q, patch: ListPatch<Q>): Q {
  const next: Record<string, unknown> = { ...current, ...patch, page: patch.page ?? 1 };
  for (const [key, value] of Object.entries(patch)) {
    if (value === undefined) next[key] = (definition.defaults as Record<string, unknown>)[key];
  }
  if (patch.pageSize === undefined) next.pageSize = current.pageSize;
  return next as Q;
}

/** A list that only pages (no sort or filters of its own): `?page&pageSize`, with the screen's page size. */
export const pagingQuerySchema = (pageSize: number = defaultPageSize) =>
  z.object({
    page: listQuerySchema.shape.page,
    pageSize: z.coerce.number().int().min(1).max(maxPageSize).default(pageSize),
  });
