import { useEffect, useMemo, useState } from 'preact/hooks';
import { barometerOf } from '../../../checks';
import type { Reading, SiteConfig } from '../../../schema';
import type { Store } from '../../../store';
import { FindingLine, SEVERITY_WORDS } from '../../components/PointCard';
import { describeStoreError } from '../../models/data';
import {
  type BoardFilter,
  type BoardItem,
  type BoardState,
  boardCounts,
  DISPOSITIONS,
  type Disposition,
  filterBoard,
  loadBoard,
  makeReview,
} from '../../models/findings-board';
import { currentPerson } from '../../models/person';
import { displayUnits } from '../../models/round-entry';
import { type Disagreement, type DisagreementResult, serverDisagreements } from '../../models/server-findings';
import { requestBackgroundSync } from '../../models/sync';
import { Link, type ScreenProps } from '../../router';
import { useServices } from '../../services';

const STATES: ReadonlyArray<{ id: BoardState; label: string }> = [
  { id: 'open', label: 'Open' },
  { id: 'acknowledged', label: 'Acknowledged' },
  { id: 'closed', label: 'Closed' },
];
const when = (iso: string) => new Date(iso).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });
/** Items drawn at once; more on request, so a year of findings stays quick to show. */
const PAGE = 50;

interface Loaded {
  store: Store;
  config: SiteConfig;
  items: BoardItem[];
}

/** The supervisor's findings board: every out-of-limit finding the tablet holds, with its reviews. */
export default function Review(_props: ScreenProps) {
  const { data, sync } = useServices();
  const [loaded, setLoaded] = useState<Loaded | string | null>(null);
  const [filter, setFilter] = useState<BoardFilter>({ states: ['open', 'acknowledged'] });
  const [shown, setShown] = useState(PAGE);
  const [server, setServer] = useState<DisagreementResult | null>(null);
  const reload = async () => {
    try {
      const store = await data.store();
      const config = await store.getConfig();
      if (!config) return setLoaded('No site configuration on this tablet yet: connect to the site network once.');
      setLoaded({ store, config, items: await loadBoard(store) });
      void serverDisagreements(store).then(setServer);
    } catch (error) {
      setLoaded(describeStoreError(error));
    }
  };
  useEffect(() => {
    void reload();
  }, [data]);

  const filtered = useMemo(() => {
    if (!loaded || typeof loaded === 'string') return { items: [] as BoardItem[], error: null };
    try {
      return { items: filterBoard(loaded.items, filter), error: null };
    } catch (error) {
      return { items: [] as BoardItem[], error: error instanceof Error ? error.message : String(error) };
    }
  }, [loaded, filter]);

  if (loaded === null) return <p class="loading">Loading…</p>;
  if (typeof loaded === 'string') {
    return (
      <section class="card card--watch" data-testid="board-unavailable">
        <h2>The findings board cannot open</h2>
        <p>{loaded}</p>
      </section>
    );
  }
  const { config } = loaded;
  const machine = config.machines.find((m) => m.id === filter.machineId) ?? null;
  const counts = boardCounts(filtered.items);
  const set = (patch: Partial<BoardFilter>) => {
    setShown(PAGE);
    setFilter((current) => ({ ...current, ...patch }));
  };
  const toggleState = (state: BoardState) => {
    const states = filter.states ?? [];
    set({ states: states.includes(state) ? states.filter((s) => s !== state) : [...states, state] });
  };

  return (
    <div class="stack">
      <section class="card" aria-labelledby="board-heading">
        <h2 id="board-heading">Findings from every tablet</h2>
        <p>
          Every finding outside its limits in the rounds this tablet holds, its own and those pulled from the site
          server at the last sync. Most severe first, then the newest round.
        </p>
        <div class="filters">
          <label class="field">
            <span class="field__label">Machine</span>
            <select
              class="unit-select"
              value={filter.machineId ?? ''}
              onChange={(e) => set({ machineId: e.currentTarget.value || undefined, stageId: undefined })}
              data-testid="filter-machine"
            >
              <option value="">All machines</option>
              {config.machines.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name}
                </option>
              ))}
            </select>
          </label>
          <label class="field">
            <span class="field__label">Stage</span>
            <select
              class="unit-select"
              value={filter.stageId ?? ''}
              disabled={!machine}
              onChange={(e) => set({ stageId: e.currentTarget.value || undefined })}
              data-testid="filter-stage"
            >
              <option value="">All stages</option>
              {(machine?.stages ?? []).map((s) => (
                <option key={s.id} value={s.id}>
                  {s.id}
                </option>
              ))}
            </select>
          </label>
          <label class="field">
            <span class="field__label">At least</span>
            <select
              class="unit-select"
              value={filter.minSeverity ?? 'watch'}
              onChange={(e) => set({ minSeverity: e.currentTarget.value as BoardFilter['minSeverity'] })}
              data-testid="filter-severity"
            >
              <option value="watch">Watch</option>
              <option value="alarm">Alarm</option>
              <option value="trip">Trip</option>
            </select>
          </label>
          <label class="field">
            <span class="field__label">Rounds from</span>
            <input
              class="field__input"
              type="date"
              value={filter.from?.slice(0, 10) ?? ''}
              onChange={(e) => set({ from: e.currentTarget.value || undefined })}
              data-testid="filter-from"
            />
          </label>
          <label class="field">
            <span class="field__label">Rounds before</span>
            <input
              class="field__input"
              type="date"
              value={filter.to?.slice(0, 10) ?? ''}
              onChange={(e) => set({ to: e.currentTarget.value || undefined })}
              data-testid="filter-to"
            />
          </label>
        </div>
        <fieldset class="actions">
          <legend class="field__label">State</legend>
          {STATES.map((s) => (
            <button
              type="button"
              key={s.id}
              class={`button ${filter.states?.includes(s.id) ? '' : 'button--quiet'}`}
              aria-pressed={filter.states?.includes(s.id) ?? false}
              onClick={() => toggleState(s.id)}
              data-testid={`filter-state-${s.id}`}
            >
              {s.label}
            </button>
          ))}
        </fieldset>
        {filtered.error ? (
          <p class="warning" role="alert">
            {filtered.error}
          </p>
        ) : null}
        <p data-testid="board-counts" aria-live="polite">
          {filtered.items.length} findings: {counts.trip} trip, {counts.alarm} alarm, {counts.watch} watch;{' '}
          {counts.open} open, {counts.acknowledged} acknowledged, {counts.closed} closed.
        </p>
        <p data-testid="server-check">
          {server === null
            ? 'Asking the site server for its own evaluation of these rounds…'
            : server.state === 'checked'
              ? `The site server recomputed every round it holds: ${server.byKey.size} ${server.byKey.size === 1 ? 'finding differs' : 'findings differ'} from what the tablet computed, marked below.`
              : `Not compared with the site server's own evaluation (${server.reason}).`}
        </p>
        <div class="actions">
          {config.machines.map((m) => (
            <Link key={m.id} href={`/machines/${m.id}`} class="button button--quiet">
              {m.name}: performance
            </Link>
          ))}
          <Link href="/valve-life" class="button button--quiet">
            Valve life
          </Link>
          <Link href="/trends" class="button button--quiet">
            Trends
          </Link>
          <Link href="/export" class="button button--quiet">
            Export and reports
          </Link>
        </div>
      </section>
      <ul class="board" data-testid="board">
        {filtered.items.slice(0, shown).map((item) => (
          <li key={item.finding.key}>
            <BoardCard
              item={item}
              config={config}
              store={loaded.store}
              disagreement={server?.state === 'checked' ? (server.byKey.get(item.finding.key) ?? null) : null}
              onSaved={() => {
                void reload();
                void sync.run('review saved');
                void requestBackgroundSync();
              }}
            />
          </li>
        ))}
      </ul>
      {filtered.items.length > shown ? (
        <button type="button" class="button button--quiet" onClick={() => setShown(shown + PAGE)}>
          Show {Math.min(PAGE, filtered.items.length - shown)} more of {filtered.items.length - shown}
        </button>
      ) : null}
    </div>
  );
}

function BoardCard(props: {
  item: BoardItem;
  config: SiteConfig;
  store: Store;
  disagreement: Disagreement | null;
  onSaved: () => void;
}) {
  const { item, config, store } = props;
  const [open, setOpen] = useState(false);
  const [readings, setReadings] = useState<Reading[] | null>(null);
  const [disposition, setDisposition] = useState<Disposition | null>(null);
  const [comment, setComment] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const units = useMemo(() => displayUnits(config), [config]);
  const barometricPa = useMemo(() => barometerOf(config), [config]);
  const subject = item.finding.subject;
  const where = [subject.machineId, subject.stageId, subject.cylinderId, subject.bearingId, subject.valvePositionId]
    .filter(Boolean)
    .join(' · ');
  const pointName = (id: string) => config.routes.flatMap((r) => r.points).find((p) => p.id === id)?.label ?? id;

  useEffect(() => {
    if (open && readings === null) void store.readingsOf(item.round.id).then(setReadings);
  }, [open, readings, store, item.round.id]);

  const related = (readings ?? []).filter((reading) => {
    if (subject.pointId) return reading.pointId === subject.pointId;
    const inputs = JSON.stringify(item.finding.inputs);
    return inputs.includes(`"${reading.pointId}"`);
  });

  const save = async () => {
    if (!disposition) return;
    try {
      const person = await currentPerson(store);
      if (!person) return setMessage('Sign in on the Home screen first: a review carries the name of its author.');
      const review = makeReview(item, {
        disposition,
        comment,
        by: person,
        at: new Date().toISOString(),
        id: crypto.randomUUID(),
      });
      await store.saveRecord('review', review, {
        author: person.id,
        device: await store.deviceId(),
        createdAt: review.at,
      });
      setMessage(null);
      setComment('');
      setDisposition(null);
      props.onSaved();
    } catch (error) {
      setMessage(error instanceof Error && !('code' in error) ? error.message : describeStoreError(error));
    }
  };

  return (
    <details
      class={`card board__item board__item--${item.state}`}
      open={open}
      onToggle={(e) => setOpen(e.currentTarget.open)}
      data-testid={`board-item-${item.finding.key}`}
      data-state={item.state}
    >
      <summary>
        <span class={`finding finding--${item.finding.severity}`} data-severity={item.finding.severity}>
          <span class="badge">{SEVERITY_WORDS[item.finding.severity]}</span>
        </span>{' '}
        <strong>{where}</strong> — {item.finding.message}
        <span class="board__meta">
          {' '}
          · round {when(item.round.startedAt)} by {item.round.by.name} · {item.state}
          {item.latest ? ` (${item.latest.by.name})` : ''}
          {props.disagreement ? ' · server differs' : ''}
        </span>
      </summary>
      <div class="stack">
        {props.disagreement ? (
          <p class="warning" data-testid={`mismatch-${item.finding.key}`}>
            The site server computed this otherwise: {props.disagreement.serverSeverity} on the server,{' '}
            {props.disagreement.deviceSeverity ?? 'no finding'} on the tablet that recorded it. Check the readings and
            the configuration version before deciding.
          </p>
        ) : null}
        <FindingLine finding={item.finding} units={units} barometricPa={barometricPa} />
        {readings === null ? (
          <p class="loading">Loading the round's readings…</p>
        ) : related.length ? (
          <table class="table">
            <caption>Readings behind this finding</caption>
            <thead>
              <tr>
                <th scope="col">Point</th>
                <th scope="col">Entered</th>
                <th scope="col">At</th>
              </tr>
            </thead>
            <tbody>
              {related.map((reading) => (
                <tr key={reading.id}>
                  <td>{pointName(reading.pointId)}</td>
                  <td>
                    {reading.entered
                      ? `${reading.entered.text} ${reading.entered.unit}`
                      : reading.skipped
                        ? `skipped: ${reading.skipped.reason}`
                        : '–'}
                  </td>
                  <td>{when(reading.at)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : null}
        <p>
          <Link href={`/rounds/${item.round.id}`}>Open the round of {when(item.round.startedAt)}</Link>
        </p>
        {item.reviews.length ? (
          <ol class="list" data-testid="review-history">
            {item.reviews.map((review) => (
              <li key={review.id}>
                {when(review.at)} · {review.by.name}: {DISPOSITIONS.find((d) => d.id === review.disposition)?.label} —{' '}
                {review.comment}
              </li>
            ))}
          </ol>
        ) : null}
        <fieldset class="form">
          <legend>Decide</legend>
          <div class="actions">
            {DISPOSITIONS.map((d) => (
              <button
                type="button"
                key={d.id}
                class={`button ${disposition === d.id ? '' : 'button--quiet'}`}
                aria-pressed={disposition === d.id}
                onClick={() => setDisposition(d.id)}
                data-testid={`disposition-${d.id}`}
              >
                {d.label}
              </button>
            ))}
          </div>
          <label class="field">
            <span class="field__label">Comment (what was decided and why)</span>
            <textarea
              class="field__input field__input--text"
              rows={2}
              value={comment}
              onInput={(e) => setComment(e.currentTarget.value)}
              data-testid="review-comment"
            />
          </label>
          <button
            type="button"
            class="button"
            disabled={!disposition || comment.trim() === ''}
            onClick={() => void save()}
            data-testid="review-save"
          >
            Save the decision
          </button>
          {message ? (
            <p class="warning" role="alert">
              {message}
            </p>
          ) : null}
        </fieldset>
      </div>
    </details>
  );
}
