/**
 * Pull: fetch what the server holds after this tablet's cursor, page by page; each page and the new cursor are
 * stored in one transaction, so a pull cut short resumes without skipping or repeating (reliability T5.7).
 */
import type { Store } from '../store';
import type { SyncApi } from './api';

export const PULL_PAGE = 500;

export interface PullProgress {
  pages: number;
  added: number;
  /** The server's sequence number reached. */
  cursor: number;
}

export async function pullAll(
  store: Store,
  api: SyncApi,
  options: { pageSize?: number; onProgress?: (progress: PullProgress) => void; maxPages?: number } = {},
): Promise<PullProgress> {
  const pageSize = options.pageSize ?? PULL_PAGE;
  const progress: PullProgress = { pages: 0, added: 0, cursor: await store.pullCursor() };
  for (let page = 0; page < (options.maxPages ?? 10_000); page += 1) {
    const response = await api.pull(progress.cursor, pageSize);
    const items = response.records.map(({ seq, ...envelope }) => ({ seq, envelope }));
    const result = await store.applyPulled(items, response.next);
    progress.pages += 1;
    progress.added += result.added;
    progress.cursor = result.cursor;
    options.onProgress?.({ ...progress });
    if (!response.more) break;
  }
  return progress;
}
