import { useEffect, useState } from 'preact/hooks';
import type { OutboxEntry } from '../../store';
import { useObservable } from '../models/observable';
import { useServices } from '../services';

const when = (iso: string | null) =>
  iso ? new Date(iso).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' }) : 'never';

/** Sign-in, and the sync state at a glance: waiting, last success, needing attention, progress, "Sync now". */
export function SyncPanel() {
  const { sync, data } = useServices();
  const status = useObservable(sync.status);
  const [user, setUser] = useState('');
  const [passcode, setPasscode] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [attention, setAttention] = useState<OutboxEntry[]>([]);

  useEffect(() => {
    if (!status?.attention) {
      setAttention([]);
      return;
    }
    void data
      .store()
      .then((store) => store.outboxAttention(50))
      .then(setAttention);
  }, [status?.attention, data]);

  if (!status) return <p class="loading">Loading…</p>;

  const signIn = async (event: Event) => {
    event.preventDefault();
    setBusy(true);
    setMessage(null);
    try {
      const engine = await sync.engine();
      const who = await engine.signIn(user.trim(), passcode, `Tablet ${navigator.platform || ''}`.trim());
      setPasscode('');
      setMessage(`Signed in as ${who.name}.`);
    } catch (error) {
      setMessage(error instanceof Error ? error.message : String(error));
    } finally {
      setBusy(false);
    }
  };

  if (!status.user) {
    return (
      <section class="card" aria-labelledby="signin-heading" data-testid="sign-in">
        <h2 id="signin-heading">Sign in on this tablet</h2>
        <p>Sign in once while the server is reachable; the tablet then keeps working offline as you.</p>
        {status.lastError ? <p class="warning">{status.lastError}</p> : null}
        <form onSubmit={(e) => void signIn(e)}>
          <label class="field">
            <span class="field__label">User</span>
            <input
              class="field__input"
              type="text"
              autocomplete="username"
              value={user}
              onInput={(e) => setUser(e.currentTarget.value)}
              data-testid="sign-in-user"
            />
          </label>
          <label class="field">
            <span class="field__label">Passcode</span>
            <input
              class="field__input"
              type="password"
              autocomplete="current-password"
              inputmode="numeric"
              value={passcode}
              onInput={(e) => setPasscode(e.currentTarget.value)}
              data-testid="sign-in-passcode"
            />
          </label>
          <button
            type="submit"
            class="button"
            disabled={busy || !user.trim() || !passcode}
            data-testid="sign-in-submit"
          >
            Sign in
          </button>
        </form>
        {message ? <p role="status">{message}</p> : null}
      </section>
    );
  }

  const progress = status.progress;
  return (
    <section class="card" aria-labelledby="sync-heading" data-testid="sync-panel">
      <h2 id="sync-heading">Sending and receiving</h2>
      <p>
        Signed in as <strong>{status.user.name}</strong> ({status.user.roles.join(', ')}).
      </p>
      <dl class="facts">
        <div class="facts__row">
          <dt>Waiting to be sent</dt>
          <dd data-testid="sync-pending">{status.pending}</dd>
        </div>
        <div class="facts__row">
          <dt>Last successful sync</dt>
          <dd data-testid="sync-last">{when(status.lastSuccessAt)}</dd>
        </div>
        <div class="facts__row">
          <dt>State</dt>
          <dd data-testid="sync-phase">
            {status.phase === 'waiting' ? `will try again at ${when(status.nextAttemptAt)}` : status.phase}
            {status.lastError && status.phase !== 'idle' ? ` (${status.lastError})` : ''}
          </dd>
        </div>
      </dl>
      {progress ? (
        <div class="progress">
          <progress max={progress.total ?? undefined} value={progress.done} aria-label={`${progress.label} records`} />
          <p>
            {progress.label}: {progress.done}
            {progress.total !== null ? ` of ${progress.total}` : ''}
          </p>
        </div>
      ) : null}
      {attention.length ? (
        <div class="warning" data-testid="sync-attention">
          <p>{attention.length} records need attention: the server would not take them.</p>
          <ul>
            {attention.map((entry) => (
              <li key={entry.id}>
                {entry.type} {entry.id.slice(0, 8)}: {entry.lastError}{' '}
                <button
                  type="button"
                  class="link-button"
                  onClick={() =>
                    void data
                      .store()
                      .then((store) => store.retryAttention(entry.id))
                      .then(() => sync.run('manual'))
                  }
                >
                  Try again
                </button>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <div class="actions">
        <button type="button" class="button" data-testid="sync-now" onClick={() => void sync.run('manual')}>
          Sync now
        </button>
        <button
          type="button"
          class="button button--quiet"
          onClick={() =>
            void sync
              .engine()
              .then((engine) => engine.signOut())
              .then(
                () => setMessage('Signed out.'),
                (error: unknown) => setMessage(error instanceof Error ? error.message : String(error)),
              )
          }
        >
          Sign out
        </button>
      </div>
      {message ? <p role="status">{message}</p> : null}
    </section>
  );
}
