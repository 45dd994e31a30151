import { z } from 'zod';

/**
 * Paging and sorting for every list endpoint: `?page=1&pageSize=50&sort=field&order=asc|desc`.
 * Query strings arrive as text, so these schemas coerce; body schemas elsewhere never do.
 * Shared by the client (parsing its URL search params) and the server (parsing `req.query`).
 */
export const maxPageSize = 100;
export const defaultPageSize = 50;

export const sortOrderSchema = z.enum(['asc', 'desc']);
export type SortOrder = z.infer<typeof sortOrderSchema>;

export const listQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(maxPageSize).default(defaultPageSize),
  sort: z.string().trim().min(1).max(64).optional(),
  order: sortOrderSchema.default('asc'),
});
export type ListQuery = z.infer<typeof listQuerySchema>;
export type ListQueryInput = z.input<typeof listQuerySchema>;

/**
 * A list query whose `sort` must be one of `fields` (an allowlist the repository maps to columns,
 * so no user string ever reaches ORDER BY).
 */
export function sortableListQuerySchema<const Fields extends readonly [string, ...string[]]>(fields: Fields, defaultSort: Fields[number]) {
  return listQuerySchema.extend({
    sort: z.enum(fields).default(defaultSort as never),
  });
}

/** One page of a list: what every list endpoint returns. */
export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

export function pageSchema<Item extends z.ZodType>(item: Item) {
  return z.object({
    items: z.array(item),
    total: z.number().int().min(0),
    page: z.number().int().min(1),
    pageSize: z.number().int().min(1).max(maxPageSize),
  });
}

/** An optional text filter: blank means "no filter". */
export const searchTextSchema = z
  .string()
  .trim()
  .max(200)
  .optional()
  .transform((value) => (value ? value : undefined));

/** `true` / `false` in a query string (z.coerce.boolean would read "false" as true). */
export const queryBooleanSchema = z
  .enum(['true', 'false'])
  .transform((value) => value === 'true')
  .optional();

/**
 * Ids in a query string: the parameter repeated, a comma list, or both (`?id=a&id=b,c`); blanks dropped,
 * each a UUID, at least `min` and at most `max` of them.
 */
export function idListSchema({ each, min = 0, tooFew, max, tooMany }: { each: string; min?: number; tooFew?: string; max: number; tooMany?: string }) {
  return z
    .union([z.string(), z.array(z.string())])
    .transform((v) =>
      (Array.isArray(v) ? v : [v])
        .flatMap((s) => s.split(','))
        .map((s) => s.trim())
        .filter(Boolean),
    )
    .pipe(z.array(z.uuid(each)).min(min, tooFew).max(max, tooMany));
}
