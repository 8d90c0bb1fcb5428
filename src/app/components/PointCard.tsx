import { memo } from 'preact/compat';
import { useEffect, useState } from 'preact/hooks';
import type { CheckPoint, Finding } from '../../schema';
import { type DisplayUnits, formatNumber, label } from '../models/format';
import { entryUnits, findingsForPoint, isNumeric, plainUnit } from '../models/round-entry';
import type { RoundSession } from '../models/round-session';

export const SEVERITY_WORDS: Record<Finding['severity'], string> = {
  ok: 'OK',
  watch: 'Watch',
  alarm: 'Alarm',
  trip: 'Trip',
};

const SKIP_REASONS = ['Machine stopped', 'Gauge broken or missing', 'No safe access', 'Not due on this round'];

export function FindingLine(props: { finding: Finding; units: DisplayUnits; barometricPa: number }) {
  const { finding } = props;
  // SI values behind a limit check are for the server and the supervisor; the message states them in the person's unit.
  const numbers = Object.entries(finding.numbers).filter(([key]) => !key.endsWith('SI'));
  return (
    <div class={`finding finding--${finding.severity}`} data-severity={finding.severity}>
      <p>
        <span class="badge">{SEVERITY_WORDS[finding.severity]}</span> {finding.message}
      </p>
      {numbers.length ? (
        <details>
          <summary>Numbers</summary>
          <dl class="numbers">
            {numbers.map(([key, value]) => (
              <div key={key}>
                <dt>{label(key)}</dt>
                <dd>{formatNumber(key, value, props.units, props.barometricPa)}</dd>
              </div>
            ))}
          </dl>
        </details>
      ) : null}
    </div>
  );
}

/** One check point: its field (or buttons), unit, save state, result beside it, note and skip. */
interface PointCardProps {
  point: CheckPoint;
  session: RoundSession;
  units: DisplayUnits;
  /** session.versionOf(point.id): the card is drawn again only when it changes. */
  version: string;
  onNext: () => void;
  onOpenGate: (point: CheckPoint) => void;
}

/**
 * One check point card. Memoised on the point's version: typing in one field redraws that card (and the cards whose
 * findings changed), not all of the route.
 */
export const PointCard = memo(
  PointCardView,
  (before, after) =>
    before.version === after.version &&
    before.point === after.point &&
    before.units === after.units &&
    before.session === after.session,
);

function PointCardView(props: PointCardProps) {
  const { point, session } = props;
  const [, redraw] = useState(0);
  useEffect(() => session.subscribePoint(point.id, () => redraw((n) => n + 1)), [session, point.id]);
  const draft = session.draftFor(point);
  const reading = session.readings.get(point.id);
  const findings = findingsForPoint(point, session.findings);
  const [noteOpen, setNoteOpen] = useState(draft.note !== '');
  const [skipOpen, setSkipOpen] = useState(false);
  const [skipReason, setSkipReason] = useState('');
  const locked = session.needsLockout(point);
  const readOnly = session.finished;
  const fieldId = `point-${point.id}`;
  const units = entryUnits(point);
  const plain = plainUnit(point);
  const saveText =
    draft.save.kind === 'saving'
      ? 'Saving…'
      : draft.save.kind === 'saved'
        ? reading?.skipped
          ? `Skipped: ${reading.skipped.reason}`
          : 'Saved'
        : draft.save.kind === 'invalid' || draft.save.kind === 'error'
          ? draft.save.message
          : '';
  const worst = findings.reduce<Finding['severity']>(
    (w, f) =>
      ['ok', 'watch', 'alarm', 'trip'].indexOf(f.severity) > ['ok', 'watch', 'alarm', 'trip'].indexOf(w)
        ? f.severity
        : w,
    'ok',
  );

  const answerButtons = (options: string[]) => (
    <fieldset class="answers">
      <legend class="visually-hidden">{point.label}</legend>
      {options.map((option) => (
        <button
          type="button"
          key={option}
          class={`button answer ${draft.text === option ? 'answer--chosen' : 'button--quiet'}`}
          aria-pressed={draft.text === option ? 'true' : 'false'}
          disabled={readOnly || locked}
          onClick={() => void session.enter(point, option).then(props.onNext)}
        >
          {option}
          <span class="visually-hidden"> — {point.label}</span>
        </button>
      ))}
    </fieldset>
  );

  return (
    <article
      class={`point point--${findings.length ? worst : 'none'}`}
      id={`card-${point.id}`}
      data-testid={`point-${point.id}`}
    >
      <div class="point__head">
        {point.kind === 'yesNo' || point.kind === 'choice' ? (
          <p class="point__label">{point.label}</p>
        ) : (
          <label class="point__label" for={fieldId}>
            {point.label}
          </label>
        )}
        {point.hint ? <p class="point__hint">{point.hint}</p> : null}
      </div>
      {point.lockout ? (
        locked ? (
          <div class="lockout">
            <p>
              <strong>Lockout-related step.</strong> The machine must be isolated before this check. Review and confirm
              the cautions first.
            </p>
            <button
              type="button"
              class="button"
              disabled={readOnly}
              data-testid={`gate-open-${point.id}`}
              onClick={() => props.onOpenGate(point)}
            >
              Review the cautions<span class="visually-hidden"> for {point.label}</span>
            </button>
          </div>
        ) : (
          <p class="lockout lockout--done">
            Cautions confirmed by {session.acks.get(point.id)?.by.name} at{' '}
            {new Date(session.acks.get(point.id)?.completedAt ?? '').toLocaleTimeString([], {
              hour: '2-digit',
              minute: '2-digit',
            })}
            .
          </p>
        )
      ) : null}
      <div class="point__entry">
        {point.kind === 'yesNo' ? (
          answerButtons(['yes', 'no'])
        ) : point.kind === 'choice' ? (
          answerButtons(point.choices ?? [])
        ) : point.kind === 'text' ? (
          <textarea
            id={fieldId}
            class="field__input field__input--text"
            rows={2}
            value={draft.text}
            disabled={readOnly || locked}
            onChange={(e) => void session.enter(point, e.currentTarget.value)}
          />
        ) : isNumeric(point) ? (
          <div class="number">
            <input
              id={fieldId}
              class="field__input number__input"
              type="text"
              inputmode="decimal"
              autocomplete="off"
              enterkeyhint="next"
              value={draft.text}
              disabled={readOnly || locked}
              aria-describedby={`status-${point.id}`}
              data-testid={`input-${point.id}`}
              onInput={(e) => void session.enter(point, e.currentTarget.value)}
              onKeyDown={(e) => {
                if (e.key === 'Enter') {
                  e.preventDefault();
                  props.onNext();
                }
              }}
            />
            {units.length ? (
              <select
                class="unit-select"
                aria-label={`Unit for ${point.label}`}
                value={draft.unit ?? ''}
                disabled={readOnly || locked}
                data-testid={`unit-${point.id}`}
                onChange={(e) => void session.switchUnit(point, e.currentTarget.value)}
              >
                {units.map((unit) => (
                  <option key={unit.id} value={unit.id}>
                    {unit.label}
                  </option>
                ))}
              </select>
            ) : plain ? (
              <span class="unit-fixed">{plain}</span>
            ) : null}
          </div>
        ) : null}
      </div>
      <p
        id={`status-${point.id}`}
        class={`save save--${draft.save.kind}`}
        role={draft.save.kind === 'invalid' || draft.save.kind === 'error' ? 'alert' : 'status'}
        data-testid={`save-${point.id}`}
      >
        {saveText}
      </p>
      {findings.map((finding) => (
        <FindingLine key={finding.key} finding={finding} units={props.units} barometricPa={session.barometricPa} />
      ))}
      {readOnly ? (
        reading?.note ? (
          <p class="point__note">Note: {reading.note}</p>
        ) : null
      ) : (
        <div class="point__tools">
          <button
            type="button"
            class="button button--quiet"
            aria-expanded={noteOpen}
            onClick={() => setNoteOpen(!noteOpen)}
          >
            {noteOpen ? 'Hide note' : draft.note ? 'Note (1)' : 'Add a note'}
            <span class="visually-hidden"> on {point.label}</span>
          </button>
          <button
            type="button"
            class="button button--quiet"
            aria-expanded={skipOpen}
            onClick={() => setSkipOpen(!skipOpen)}
          >
            Skip<span class="visually-hidden"> {point.label}</span>
          </button>
        </div>
      )}
      {noteOpen && !readOnly ? (
        <label class="field">
          <span class="field__label">Note on {point.label}</span>
          <textarea
            class="field__input field__input--text"
            rows={2}
            value={draft.note}
            data-testid={`note-${point.id}`}
            onChange={(e) => void session.setNote(point, e.currentTarget.value)}
          />
        </label>
      ) : null}
      {skipOpen && !readOnly ? (
        <div class="skip">
          <p>Why is this point skipped?</p>
          <div class="answers">
            {SKIP_REASONS.map((reason) => (
              <button
                type="button"
                key={reason}
                class="button button--quiet"
                onClick={() => {
                  setSkipOpen(false);
                  void session.skip(point, reason).then(props.onNext);
                }}
              >
                {reason}
                <span class="visually-hidden"> — skip {point.label}</span>
              </button>
            ))}
          </div>
          <label class="field">
            <span class="field__label">
              Other reason<span class="visually-hidden"> for skipping {point.label}</span>
            </span>
            <input
              class="field__input"
              type="text"
              value={skipReason}
              onInput={(e) => setSkipReason(e.currentTarget.value)}
            />
          </label>
          <button
            type="button"
            class="button"
            disabled={skipReason.trim() === ''}
            onClick={() => {
              setSkipOpen(false);
              void session.skip(point, skipReason).then(props.onNext);
            }}
          >
            Skip with this reason<span class="visually-hidden"> — {point.label}</span>
          </button>
        </div>
      ) : null}
    </article>
  );
}
