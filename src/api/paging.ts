import type { ListResponse } from '@shared/types/api';
import { MAX_PAGE_SIZE, type PageResponse } from '@shared/schemas/pagination';
import { http, type RequestOptions } from './http';

export type { PageResponse };

/** Pages fetched at the same time when a caller needs a whole list. */
const PARALLEL_PAGES = 4;

/**
 * Every row of a paged list: the first page at the largest size, then the remaining pages a few at a time.
 * For screens that need the whole list (charts, filter choices); tables ask for one page instead.
 */
export async function fetchAllPages<T>(path: string, options: RequestOptions = {}): Promise<ListResponse<T>> {
  const get = (page: number) => http.get<PageResponse<T>>(path, { ...options, query: { ...options.query, page, pageSize: MAX_PAGE_SIZE } });
  const first = await get(1);
  const pages = Math.ceil(first.meta.total / MAX_PAGE_SIZE);
  const rows = [...first.data];
  for (let next = 2; next <= pages; next += PARALLEL_PAGES) {
    const batch = await Promise.all(Array.from({ length: Math.min(PARALLEL_PAGES, pages - next + 1) }, (_, i) => get(next + i)));
    for (const page of batch) rows.push(...page.data);
  }
  return { data: rows, meta: { total: rows.length } };
}
