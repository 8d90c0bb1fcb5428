import { SiteSummary } from '../../schema/health';
import { type Observable, observable } from './observable';

const SITE_NAME_KEY = 'crankhouse.siteName';

/** The site name last received from the server, so the shell shows it offline on the next start. */
export interface SiteModel {
  name: Observable<string | null>;
  refresh(): Promise<void>;
}

export function startSiteModel(storage: Storage = localStorage): SiteModel {
  const name = observable<string | null>(readCached(storage));
  return {
    name,
    async refresh() {
      try {
        const response = await fetch('/api/v1/site', { cache: 'no-store', headers: { Accept: 'application/json' } });
        if (!response.ok) return;
        const parsed = SiteSummary.safeParse(await response.json());
        if (!parsed.success) return;
        name.set(parsed.data.name);
        storage.setItem(SITE_NAME_KEY, parsed.data.name);
      } catch {
        // Offline or storage refused: keep showing the cached name.
      }
    },
  };
}

function readCached(storage: Storage): string | null {
  try {
    return storage.getItem(SITE_NAME_KEY);
  } catch {
    return null;
  }
}
