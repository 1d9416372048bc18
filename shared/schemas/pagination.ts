/**
 * Paging of the lists that grow with a club (flights, sessions, clips, members): `page` (from 1) and
 * `pageSize` (1 to MAX_PAGE_SIZE) in the query string; answers carry `meta: { page, pageSize, total }`.
 */
import { z } from 'zod';

export const DEFAULT_PAGE_SIZE = 25;
/** Largest page a list answers; a client that needs more asks for the next pages. */
export const MAX_PAGE_SIZE = 200;

const wholeNumber = /^\d+$/;

function pageNumber(name: string, max?: number) {
  const tail = max === undefined ? '' : ` from 1 to ${max}`;
  return z
    .string({ error: `${name} must be one whole number${tail}.` })
    .regex(wholeNumber, { error: `${name} must be a whole number${tail}.` })
    .transform(Number)
    .pipe(
      max === undefined
        ? z.number().int().min(1, { error: `${name} must be 1 or more (the first page is 1).` })
        : z
            .number()
            .int()
            .min(1, { error: `${name} must be 1 or more.` })
            .max(max, { error: `${name} can be at most ${max}; ask for the following pages instead.` }),
    )
    .optional();
}

/** The `page` and `pageSize` of a list query, with the defaults filled in. */
export const paginationQuerySchema = z.object({
  page: pageNumber('page').transform((v) => v ?? 1),
  pageSize: pageNumber('pageSize', MAX_PAGE_SIZE).transform((v) => v ?? DEFAULT_PAGE_SIZE),
});
export type PaginationQuery = z.output<typeof paginationQuerySchema>;

export interface PageMeta {
  page: number;
  pageSize: number;
  total: number;
}

/** Rows to skip for a page. */
export function pageOffset(query: PaginationQuery): number {
  return (query.page - 1) * query.pageSize;
}

/** The answer of a paged list. */
export interface PageResponse<T> {
  data: T[];
  meta: PageMeta;
}
