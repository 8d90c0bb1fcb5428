import { useEffect, useMemo, useState } from 'preact/hooks';
import type { CheckPoint, Finding } from '../../../schema';
import { LockoutGate } from '../../components/LockoutGate';
import { FindingLine, PointCard, SEVERITY_WORDS } from '../../components/PointCard';
import { StagePanel } from '../../components/StagePanel';
import { describeStoreError } from '../../models/data';
import { useObservable } from '../../models/observable';
import { displayUnits, groupPoints, progressOf, severityCounts } from '../../models/round-entry';
import { RoundSession } from '../../models/round-session';
import { requestBackgroundSync } from '../../models/sync';
import { navigate, type ScreenProps } from '../../router';
import { useServices } from '../../services';
import { registerUnsavedInput } from '../../unsaved-input';

function focusPoint(pointId: string): void {
  const card = document.getElementById(`card-${pointId}`);
  const field = card?.querySelector<HTMLElement>(
    'input:not([disabled]), textarea:not([disabled]), button.answer:not([disabled]), button:not([disabled])',
  );
  card?.scrollIntoView({ block: 'center', behavior: 'auto' });
  field?.focus({ preventScroll: true });
}

/** Walks a route: every point in order, results beside each reading, the lockout gate, and finishing the round. */
export default function RoundScreen({ params }: ScreenProps) {
  const { data } = useServices();
  const [session, setSession] = useState<RoundSession | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [gatePoint, setGatePoint] = useState<CheckPoint | null>(null);
  const [finishing, setFinishing] = useState(false);
  const [finishError, setFinishError] = useState<string | null>(null);
  const [noteText, setNoteText] = useState('');
  const [noteSaved, setNoteSaved] = useState<string | null>(null);
  const id = params.id ?? '';

  useEffect(() => {
    let live = true;
    setSession(null);
    setError(null);
    data
      .store()
      .then((store) => RoundSession.open(store, id))
      .then((opened) => live && setSession(opened))
      .catch((e: unknown) => live && setError(e instanceof Error ? e.message : describeStoreError(e)));
    return () => {
      live = false;
    };
  }, [data, id]);

  useEffect(
    () => (session ? registerUnsavedInput(`round-${session.round.id}`, () => session.hasUnsavedInput()) : undefined),
    [session],
  );

  if (error) {
    return (
      <section class="card card--alarm" role="alert">
        <h2>This round cannot be opened</h2>
        <p>{error}</p>
      </section>
    );
  }
  if (!session) return <p class="loading">Loading the round…</p>;
  return (
    <RoundView
      session={session}
      gatePoint={gatePoint}
      setGatePoint={setGatePoint}
      finishing={finishing}
      setFinishing={setFinishing}
      finishError={finishError}
      setFinishError={setFinishError}
      noteText={noteText}
      setNoteText={setNoteText}
      noteSaved={noteSaved}
      setNoteSaved={setNoteSaved}
    />
  );
}

function RoundView(props: {
  session: RoundSession;
  gatePoint: CheckPoint | null;
  setGatePoint: (point: CheckPoint | null) => void;
  finishing: boolean;
  setFinishing: (value: boolean) => void;
  finishError: string | null;
  setFinishError: (value: string | null) => void;
  noteText: string;
  setNoteText: (value: string) => void;
  noteSaved: string | null;
  setNoteSaved: (value: string | null) => void;
}) {
  const { session } = props;
  useObservable(session.changed);
  const { data, sync } = useServices();
  const groups = useMemo(() => groupPoints(session.config, session.route), [session]);
  const units = useMemo(() => displayUnits(session.config), [session]);
  const progress = progressOf(session.route, session.readings);
  const counts = severityCounts(session.findings);
  // Only the finish summary needs this; it walks every finding.
  const needed = props.finishing ? session.notesNeeded() : [];
  const order = session.route.points;

  const next = (from: CheckPoint) => {
    const start = order.indexOf(from);
    const after = [...order.slice(start + 1), ...order.slice(0, start)].find((p) => !session.readings.has(p.id));
    if (after) focusPoint(after.id);
  };

  const cautions = (point: CheckPoint) =>
    session.config.cautionSets.find((set) => set.id === point.lockout?.cautionSetId);

  const finish = async () => {
    props.setFinishError(null);
    try {
      await session.finish();
      props.setFinishing(false);
      await data.refresh();
      // Send it now if the server is there; otherwise the browser may wake us when it is (background sync).
      void sync.run('round finished');
      void requestBackgroundSync();
      window.scrollTo(0, 0);
    } catch (e) {
      props.setFinishError(e instanceof Error ? e.message : describeStoreError(e));
    }
  };

  // Findings per stage and their signatures, worked out once per set of findings (not on every keystroke).
  const byStage = useMemo(() => {
    const map = new Map<string, { findings: Finding[]; signature: string }>();
    for (const finding of session.findings) {
      if (!finding.subject.stageId || finding.subject.pointId) continue;
      const key = `${finding.subject.machineId}/${finding.subject.stageId}`;
      const entry = map.get(key) ?? { findings: [], signature: '' };
      entry.findings.push(finding);
      entry.signature += `${finding.key}|${finding.severity}|${finding.message}\n`;
      map.set(key, entry);
    }
    return map;
  }, [session.findings]);
  const noFindings = { findings: [] as Finding[], signature: '' };

  return (
    <div class="stack round">
      <section class="card round__head" aria-labelledby="round-title">
        <h2 id="round-title">
          {session.route.name}
          {session.finished ? ' (finished)' : ''}
        </h2>
        <p>
          {session.round.by.name} · started {new Date(session.round.startedAt).toLocaleString()}
          {session.round.finishedAt ? ` · finished ${new Date(session.round.finishedAt).toLocaleString()}` : ''}
        </p>
        {session.finished ? (
          <button type="button" class="button button--quiet" onClick={() => window.print()} data-testid="print-round">
            Print the round report
          </button>
        ) : null}
        <div class="progress" data-testid="progress">
          <progress max={progress.total} value={progress.done + progress.skipped} aria-label="Round progress" />
          <p>
            {progress.done} done · {progress.skipped} skipped · {progress.remaining} remaining
          </p>
        </div>
        <p class="counts" data-testid="severity-counts">
          {(['trip', 'alarm', 'watch'] as const).map((severity) => (
            <span key={severity} class={`badge badge--${severity}`}>
              {counts[severity]} {SEVERITY_WORDS[severity].toLowerCase()}
            </span>
          ))}
        </p>
        <nav class="jumps" aria-label="Jump to">
          {groups.map((group) => (
            <a
              key={group.key}
              class="button button--quiet jump"
              href={`#group-${group.key.replace(/[^A-Za-z0-9-]/g, '-')}`}
            >
              {group.title}
            </a>
          ))}
        </nav>
      </section>

      {groups.map((group) => {
        const stageId = group.points[0]?.stageId;
        const machine = session.config.machines.find((m) => m.id === group.machineId);
        const stage = machine?.stages.find((s) => s.id === stageId);
        return (
          <section
            key={group.key}
            class="group"
            id={`group-${group.key.replace(/[^A-Za-z0-9-]/g, '-')}`}
            aria-labelledby={`title-${group.key.replace(/[^A-Za-z0-9-]/g, '-')}`}
          >
            <h2 class="group__title" id={`title-${group.key.replace(/[^A-Za-z0-9-]/g, '-')}`}>
              {group.title}
            </h2>
            {group.points.map((point) => (
              <PointCard
                key={point.id}
                point={point}
                session={session}
                version={session.versionOf(point.id)}
                units={units}
                onNext={() => next(point)}
                onOpenGate={(p) => props.setGatePoint(p)}
              />
            ))}
            {stage ? (
              <StagePanel
                title={`${machine?.name} stage ${stage.index}`}
                findings={(byStage.get(`${group.machineId}/${stageId}`) ?? noFindings).findings}
                signature={(byStage.get(`${group.machineId}/${stageId}`) ?? noFindings).signature}
                units={units}
                barometricPa={session.barometricPa}
              />
            ) : null}
          </section>
        );
      })}

      {session.finished ? (
        <section class="card" aria-labelledby="note-heading">
          <h2 id="note-heading">Add to this round</h2>
          <p>A finished round cannot change. A note is added beside it, with your name and the time.</p>
          <label class="field">
            <span class="field__label">Note on this round</span>
            <textarea
              class="field__input field__input--text"
              rows={3}
              value={props.noteText}
              onInput={(e) => props.setNoteText(e.currentTarget.value)}
            />
          </label>
          <button
            type="button"
            class="button"
            disabled={props.noteText.trim() === ''}
            onClick={() =>
              void session.addNote(props.noteText.trim()).then(
                () => {
                  props.setNoteText('');
                  props.setNoteSaved('Note saved; it goes to the server with the next sync.');
                },
                (e: unknown) => props.setNoteSaved(`Not saved: ${describeStoreError(e)}`),
              )
            }
          >
            Save the note
          </button>
          {props.noteSaved ? <p role="status">{props.noteSaved}</p> : null}
        </section>
      ) : (
        <section class="card finish" aria-labelledby="finish-heading">
          <h2 id="finish-heading">Finish the round</h2>
          {!props.finishing ? (
            <button type="button" class="button" data-testid="finish-open" onClick={() => props.setFinishing(true)}>
              Review and finish
            </button>
          ) : (
            <div data-testid="finish-summary">
              <p>
                {counts.trip} trip, {counts.alarm} alarm, {counts.watch} watch, {counts.ok} ok.{' '}
                {progress.remaining
                  ? `${progress.remaining} points not read will be recorded as not read.`
                  : 'Every point is read or skipped.'}
              </p>
              {session.findings
                .filter((f) => f.severity !== 'ok')
                .map((finding) => (
                  <FindingLine key={finding.key} finding={finding} units={units} barometricPa={session.barometricPa} />
                ))}
              {needed.length ? (
                <div class="warning" role="alert" data-testid="notes-needed">
                  <p>Add a note to each of these before finishing (what you saw, what you did or who you told):</p>
                  <ul>
                    {needed.map(({ finding, pointId }) => (
                      <li key={finding.key}>
                        <button type="button" class="link-button" onClick={() => pointId && focusPoint(pointId)}>
                          {finding.message.split(':')[0]}
                        </button>
                      </li>
                    ))}
                  </ul>
                </div>
              ) : null}
              {props.finishError ? (
                <p class="warning" role="alert">
                  {props.finishError}
                </p>
              ) : null}
              <div class="actions">
                <button
                  type="button"
                  class="button"
                  data-testid="finish-confirm"
                  disabled={needed.length > 0}
                  onClick={() => void finish()}
                >
                  Finish and send when online
                </button>
                <button type="button" class="button button--quiet" onClick={() => props.setFinishing(false)}>
                  Back to the round
                </button>
              </div>
            </div>
          )}
        </section>
      )}
      <p>
        <button type="button" class="link-button" onClick={() => navigate('/rounds')}>
          All rounds
        </button>
      </p>

      {props.gatePoint && cautions(props.gatePoint) ? (
        <LockoutGate
          cautions={cautions(props.gatePoint) as NonNullable<ReturnType<typeof cautions>>}
          stepLabel={props.gatePoint.label}
          person={session.person.name}
          onCancel={() => props.setGatePoint(null)}
          onAcknowledged={async (acknowledgements) => {
            const point = props.gatePoint as CheckPoint;
            await session.acknowledgeLockout(point, acknowledgements);
            props.setGatePoint(null);
            focusPoint(point.id);
          }}
        />
      ) : null}
    </div>
  );
}
