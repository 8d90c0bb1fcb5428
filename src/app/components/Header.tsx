import { describeConnection } from '../models/connection';
import { useObservable } from '../models/observable';
import { storageWarnings } from '../models/storage';
import { useServices } from '../services';
import { serviceWorker } from '../sw-bridge';
import { ThemeSwitch } from './ThemeSwitch';

export function Header() {
  const { connection, storage, site } = useServices();
  const siteName = useObservable(site.name);
  const connectionState = useObservable(connection.state);
  const storageState = useObservable(storage.state);
  const worker = useObservable(serviceWorker);
  const connectionText = describeConnection(connectionState, Date.now());
  const storageOk = storageWarnings(storageState).length === 0 && storageState.persisted === true;
  const offlineReady = worker.kind === 'ready-offline' || worker.kind === 'update-waiting';

  return (
    <header class="header">
      <div class="header__brand">
        <img src="/icons/crankhouse.svg" alt="" width="40" height="40" />
        <div>
          <p class="header__app">Crankhouse</p>
          <h1 class="header__site" data-testid="site-name">
            {siteName ?? 'Site not yet loaded on this tablet'}
          </h1>
        </div>
      </div>
      <ul class="pills" aria-label="Tablet status">
        <li class={`pill pill--${connectionState.status}`} data-testid="connection-state" title={connectionText.detail}>
          <span class="pill__mark" aria-hidden="true" />
          {connectionText.label}
        </li>
        <li class={`pill ${storageOk ? 'pill--ok' : 'pill--warn'}`} data-testid="storage-state">
          <span class="pill__mark" aria-hidden="true" />
          {storageState.persisted === null ? 'Storage: checking' : storageOk ? 'Storage kept' : 'Storage at risk'}
        </li>
        <li class={`pill ${offlineReady ? 'pill--ok' : 'pill--warn'}`} data-testid="offline-state">
          <span class="pill__mark" aria-hidden="true" />
          {offlineReady ? 'Works offline' : worker.kind === 'registering' ? 'Preparing offline…' : 'Online only'}
        </li>
      </ul>
      <ThemeSwitch />
    </header>
  );
}
