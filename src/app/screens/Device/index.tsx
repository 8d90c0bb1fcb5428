import { useEffect, useState } from 'preact/hooks';
import { describeConnection } from '../../models/connection';
import { useObservable } from '../../models/observable';
import { formatBytes } from '../../models/storage';
import { useServices } from '../../services';
import { serviceWorker } from '../../sw-bridge';

function displayMode(): 'standalone' | 'browser tab' {
  return window.matchMedia('(display-mode: standalone)').matches ? 'standalone' : 'browser tab';
}

/** Everything about this tablet that matters when something does not sync or does not start offline. */
export default function Device() {
  const { connection, storage } = useServices();
  const connectionState = useObservable(connection.state);
  const storageState = useObservable(storage.state);
  const worker = useObservable(serviceWorker);
  const [mode, setMode] = useState(displayMode());

  useEffect(() => {
    void storage.refresh();
    const query = window.matchMedia('(display-mode: standalone)');
    const onChange = () => setMode(displayMode());
    query.addEventListener('change', onChange);
    return () => query.removeEventListener('change', onChange);
  }, [storage]);

  const probe = connectionState.lastProbe;
  const rows: Array<[string, string]> = [
    ['App version', __APP_VERSION__],
    ['Server', describeConnection(connectionState, Date.now()).label],
    ['Server version', probe?.reachable ? probe.serverVersion : '–'],
    ['Last server check', probe ? new Date(probe.checkedAt).toLocaleString() : '–'],
    ['Last failure', probe && !probe.reachable ? `${probe.reason}: ${probe.detail}` : '–'],
    ['Offline copy', worker.kind.replace('-', ' ')],
    ['Running as', mode === 'standalone' ? 'installed app' : 'browser tab'],
    ['Persistent storage', storageState.persisted === null ? 'unknown' : storageState.persisted ? 'yes' : 'no'],
    ['Storage used', storageState.usageBytes === null ? '–' : formatBytes(storageState.usageBytes)],
    ['Storage available', storageState.quotaBytes === null ? '–' : formatBytes(storageState.quotaBytes)],
  ];

  return (
    <div class="stack">
      {mode === 'browser tab' ? (
        <section class="card card--watch">
          <h2>Install before use</h2>
          <p>
            Readings entered in a browser tab can be cleared by the browser. Install Crankhouse from the browser menu
            ("Install app" or "Add to Home screen") and use the installed app on rounds.
          </p>
        </section>
      ) : null}
      <section class="card">
        <h2>This tablet</h2>
        <dl class="facts" data-testid="device-facts">
          {rows.map(([term, value]) => (
            <div key={term} class="facts__row">
              <dt>{term}</dt>
              <dd>{value}</dd>
            </div>
          ))}
        </dl>
        <div class="actions">
          <button type="button" class="button" onClick={() => void connection.checkNow()}>
            Check server
          </button>
          <button type="button" class="button" onClick={() => void storage.requestPersistence()}>
            Ask to keep data
          </button>
        </div>
      </section>
    </div>
  );
}
