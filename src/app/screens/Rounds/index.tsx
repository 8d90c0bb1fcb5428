import { useEffect, useState } from 'preact/hooks';
import type { PersonRef, Round, SiteConfig } from '../../../schema';
import { describeStoreError } from '../../models/data';
import { currentPerson } from '../../models/person';
import { Link, navigate } from '../../router';
import { useServices } from '../../services';

const when = (iso: string) => new Date(iso).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });

/** Start a round on a route, resume a draft, or open a finished round. */
export default function Rounds() {
  const { data } = useServices();
  const [config, setConfig] = useState<SiteConfig | null | undefined>(undefined);
  const [rounds, setRounds] = useState<Round[]>([]);
  const [person, setPerson] = useState<PersonRef | null>(null);
  const [error, setError] = useState<string | null>(null);

  useEffect(() => {
    let live = true;
    (async () => {
      const store = await data.store();
      const [c, r, p] = await Promise.all([store.getConfig(), store.listRounds(), currentPerson(store)]);
      if (!live) return;
      setConfig(c ?? null);
      setRounds(r);
      setPerson(p);
    })().catch((e: unknown) => setError(describeStoreError(e)));
    return () => {
      live = false;
    };
  }, [data]);

  const start = async (routeId: string) => {
    try {
      const store = await data.store();
      const who = person;
      if (!config || !who) return;
      const id = crypto.randomUUID();
      await store.startRound({
        id,
        siteName: config.name,
        routeId,
        configVersion: config.version,
        by: who,
        deviceId: await store.deviceId(),
        startedAt: new Date().toISOString(),
        finishedAt: null,
        state: 'draft',
      });
      await data.refresh();
      navigate(`/rounds/${id}`);
    } catch (e) {
      setError(e instanceof Error ? e.message : describeStoreError(e));
    }
  };

  if (config === undefined) return <p class="loading">Loading…</p>;
  if (config === null) {
    return (
      <section class="card card--watch">
        <h2>No site configuration on this tablet yet</h2>
        <p>Connect to the site network once so the tablet can load its routes, then come back here.</p>
      </section>
    );
  }
  const drafts = rounds.filter((r) => r.state === 'draft');
  const finished = rounds.filter((r) => r.state === 'finished').slice(0, 20);
  const routeName = (id: string) => config.routes.find((r) => r.id === id)?.name ?? id;

  return (
    <div class="stack">
      {error ? (
        <p class="warning" role="alert">
          {error}
        </p>
      ) : null}
      {drafts.length ? (
        <section class="card" aria-labelledby="drafts-heading">
          <h2 id="drafts-heading">Rounds in progress</h2>
          <ul class="list">
            {drafts.map((round) => (
              <li key={round.id}>
                <button type="button" class="button list__button" onClick={() => navigate(`/rounds/${round.id}`)}>
                  Resume: {routeName(round.routeId)} · started {when(round.startedAt)} by {round.by.name}
                </button>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <section class="card" aria-labelledby="start-heading">
        <h2 id="start-heading">Start a round</h2>
        {person ? (
          <p>
            Rounds are recorded as <strong>{person.name}</strong>, who is signed in on this tablet.
          </p>
        ) : (
          <p class="warning" data-testid="sign-in-first">
            Sign in on the <Link href="/">Home</Link> screen first: a round carries the name of the person who walked
            it, and the server takes it only from that person.
          </p>
        )}
        <div class="actions">
          {config.routes.map((route) => (
            <button
              type="button"
              key={route.id}
              class="button"
              data-testid={`start-${route.id}`}
              disabled={!person}
              onClick={() => void start(route.id)}
            >
              {route.name} ({route.points.length} points)
            </button>
          ))}
        </div>
      </section>
      {finished.length ? (
        <section class="card" aria-labelledby="finished-heading">
          <h2 id="finished-heading">Finished rounds on this tablet</h2>
          <ul class="list">
            {finished.map((round) => (
              <li key={round.id}>
                <button
                  type="button"
                  class="button button--quiet list__button"
                  onClick={() => navigate(`/rounds/${round.id}`)}
                >
                  {routeName(round.routeId)} · {when(round.finishedAt ?? round.startedAt)} · {round.by.name}
                </button>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}
