import { SyncPanel } from '../../components/SyncPanel';
import { describeConnection } from '../../models/connection';
import { useObservable } from '../../models/observable';
import { formatBytes, storageWarnings } from '../../models/storage';
import { Link } from '../../router';
import { useServices } from '../../services';
import { serviceWorker } from '../../sw-bridge';

/** The first screen: is this tablet ready to go on a round? */
export function Home() {
  const { connection, storage } = useServices();
  const connectionState = useObservable(connection.state);
  const storageState = useObservable(storage.state);
  const worker = useObservable(serviceWorker);
  const connectionText = describeConnection(connectionState, Date.now());
  const warnings = storageWarnings(storageState);

  return (
    <div class="stack">
      <section class="card">
        <h2>Ready for the compressor house?</h2>
        <p>Check these three before you walk out of network reach.</p>
      </section>

      <SyncPanel />

      <section class="card" aria-labelledby="connection-heading">
        <h2 id="connection-heading">Site server</h2>
        <p class="big">{connectionText.label}</p>
        <p>{connectionText.detail}</p>
        <button type="button" class="button" onClick={() => void connection.checkNow()}>
          Check now
        </button>
      </section>

      <section class={`card ${warnings.length ? 'card--watch' : ''}`} aria-labelledby="storage-heading">
        <h2 id="storage-heading">Storage on this tablet</h2>
        {storageState.persisted === null && storageState.supported ? (
          <p>Checking…</p>
        ) : (
          <p class="big">{storageState.persisted ? 'Kept by the browser' : 'May be cleared by the browser'}</p>
        )}
        {storageState.usageBytes !== null && storageState.quotaBytes !== null ? (
          <p>
            {formatBytes(storageState.usageBytes)} used of {formatBytes(storageState.quotaBytes)} available to the app.
          </p>
        ) : null}
        {warnings.map((warning) => (
          <p key={warning.kind} class="warning" data-testid={`storage-warning-${warning.kind}`}>
            {warning.message}
          </p>
        ))}
        {storageState.persisted === false ? (
          <button type="button" class="button" onClick={() => void storage.requestPersistence()}>
            Ask to keep data
          </button>
        ) : null}
      </section>

      <section class="card" aria-labelledby="offline-heading">
        <h2 id="offline-heading">Offline use</h2>
        <p class="big">
          {worker.kind === 'ready-offline' || worker.kind === 'update-waiting'
            ? 'The app is stored on this tablet'
            : worker.kind === 'registering'
              ? 'Storing the app on this tablet…'
              : 'The app cannot work offline here'}
        </p>
        {worker.kind === 'unsupported' || worker.kind === 'failed' ? <p class="warning">{worker.reason}</p> : null}
        <p>
          More on <Link href="/device">this tablet</Link>.
        </p>
      </section>
    </div>
  );
}
