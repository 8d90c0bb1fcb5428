import { useState } from 'preact/hooks';
import { useObservable } from '../models/observable';
import { applyUpdate, serviceWorker } from '../sw-bridge';

/** Offers a waiting app version. The page only reloads when the person asks and no form holds unsaved input. */
export function UpdateBanner() {
  const worker = useObservable(serviceWorker);
  const [blocked, setBlocked] = useState(false);
  if (worker.kind !== 'update-waiting') return null;
  return (
    <section class="banner" role="status" data-testid="update-banner">
      <p>
        A new version of Crankhouse is ready.
        {blocked ? ' Save or discard the open entry first, then reload.' : ' Reload when you are between readings.'}
      </p>
      <button
        type="button"
        class="button"
        data-testid="update-reload"
        onClick={() => setBlocked(applyUpdate() === 'blocked-unsaved-input')}
      >
        Reload to update
      </button>
    </section>
  );
}
