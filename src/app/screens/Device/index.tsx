import { useEffect, useRef, useState } from 'preact/hooks';
import { describeConnection } from '../../models/connection';
import { describeStoreError } from '../../models/data';
import { useObservable } from '../../models/observable';
import { formatBytes } from '../../models/storage';
import { useServices } from '../../services';
import { serviceWorker } from '../../sw-bridge';

function displayMode(): 'standalone' | 'browser tab' {
  return window.matchMedia('(display-mode: standalone)').matches ? 'standalone' : 'browser tab';
}

/** Everything about this tablet that matters when something does not sync or does not start offline. */
export default function Device() {
  const { connection, storage, data } = useServices();
  const dataState = useObservable(data.state);
  const [backupMessage, setBackupMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);
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
    [
      'Site configuration',
      dataState.kind === 'ready'
        ? dataState.configName === null
          ? 'none yet'
          : `${dataState.configName}, version ${dataState.configVersion}`
        : dataState.kind,
    ],
    ['Rounds on this tablet', dataState.kind === 'ready' ? String(dataState.rounds) : '–'],
    ['Waiting to be sent', dataState.kind === 'ready' ? String(dataState.pending) : '–'],
    ['Needing attention', dataState.kind === 'ready' ? String(dataState.attention) : '–'],
  ];

  const saveBackup = async () => {
    try {
      const blob = await data.exportBackup();
      const link = document.createElement('a');
      link.href = URL.createObjectURL(blob);
      link.download = `crankhouse-backup-${new Date().toISOString().slice(0, 19).replaceAll(':', '')}.json`;
      link.click();
      setTimeout(() => URL.revokeObjectURL(link.href), 10_000);
      setBackupMessage({ ok: true, text: 'Backup file saved to the downloads folder.' });
    } catch (error) {
      setBackupMessage({ ok: false, text: `The backup could not be made: ${describeStoreError(error)}` });
    }
  };

  const restoreBackup = async (file: File | undefined) => {
    if (!file) return;
    try {
      const result = await data.importBackup(await file.text());
      const conflicts = result.conflicts.length
        ? ` ${result.conflicts.length} kept as they were (they differ): ${result.conflicts.slice(0, 3).join('; ')}`
        : '';
      setBackupMessage({
        ok: true,
        text: `Restored ${result.added} records; ${result.skipped} were already here.${conflicts}`,
      });
    } catch (error) {
      setBackupMessage({ ok: false, text: `Nothing was changed: ${describeStoreError(error)}` });
    } finally {
      if (fileInput.current) fileInput.current.value = '';
    }
  };

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
      <section class="card">
        <h2>Backup</h2>
        <p>
          A backup file holds every round, reading and record on this tablet. Keep one before a tablet is reset or
          replaced; restoring merges it with what is here and never overwrites a record.
        </p>
        <div class="actions">
          <button type="button" class="button" data-testid="backup-save" onClick={() => void saveBackup()}>
            Save a backup file
          </button>
          <label class="button button--quiet file-button">
            Restore from a backup file
            <input
              ref={fileInput}
              type="file"
              accept="application/json,.json"
              data-testid="backup-restore"
              onChange={(event) => void restoreBackup(event.currentTarget.files?.[0])}
            />
          </label>
        </div>
        {backupMessage ? (
          <p class={backupMessage.ok ? '' : 'warning'} role="status" data-testid="backup-message">
            {backupMessage.text}
          </p>
        ) : null}
      </section>
    </div>
  );
}
