import { useEffect, useRef, useState } from 'preact/hooks';
import type { CautionSet } from '../../schema';

/**
 * The caution sequence before a lockout-related step. Each caution is acknowledged on its own, with its time; the
 * step opens only when all are. The site's procedure, permits and local codes govern, and the dialog says so.
 */
export function LockoutGate(props: {
  cautions: CautionSet;
  stepLabel: string;
  person: string;
  onAcknowledged: (acknowledgements: Array<{ cautionId: string; at: string }>) => Promise<void>;
  onCancel: () => void;
}) {
  const dialog = useRef<HTMLDialogElement>(null);
  const [done, setDone] = useState<Record<string, string>>({});
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  useEffect(() => {
    const element = dialog.current;
    if (element && !element.open) element.showModal();
    return () => element?.close();
  }, []);

  const all = props.cautions.cautions.every((caution) => done[caution.id]);
  const confirm = async () => {
    setBusy(true);
    try {
      await props.onAcknowledged(
        props.cautions.cautions.map((caution) => ({ cautionId: caution.id, at: done[caution.id] as string })),
      );
    } catch (e) {
      setError(e instanceof Error ? e.message : String(e));
      setBusy(false);
    }
  };

  return (
    <dialog ref={dialog} class="gate" aria-labelledby="gate-title" onCancel={props.onCancel} data-testid="lockout-gate">
      <h2 id="gate-title">{props.cautions.title}</h2>
      <p class="gate__step">
        Step: <strong>{props.stepLabel}</strong>. Acknowledged by {props.person}.
      </p>
      <p class="gate__governs">
        The site's isolation procedure, permits and local codes govern. This list only supports them.
      </p>
      <ol class="gate__list">
        {props.cautions.cautions.map((caution, index) => {
          const at = done[caution.id];
          return (
            <li key={caution.id} class={`gate__item ${at ? 'gate__item--done' : ''}`}>
              <p>{caution.text}</p>
              <button
                type="button"
                class={`button ${at ? 'button--quiet' : ''}`}
                aria-pressed={at ? 'true' : 'false'}
                data-testid={`caution-${caution.id}`}
                onClick={() =>
                  setDone((current) =>
                    current[caution.id] ? current : { ...current, [caution.id]: new Date().toISOString() },
                  )
                }
              >
                {at
                  ? `Done at ${new Date(at).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}`
                  : `Confirm ${index + 1}`}
              </button>
            </li>
          );
        })}
      </ol>
      {error ? (
        <p class="warning" role="alert">
          {error}
        </p>
      ) : null}
      <div class="actions">
        <button
          type="button"
          class="button"
          disabled={!all || busy}
          data-testid="gate-start"
          onClick={() => void confirm()}
        >
          {all ? 'Start the step' : `Confirm all ${props.cautions.cautions.length} first`}
        </button>
        <button type="button" class="button button--quiet" onClick={props.onCancel}>
          Not now
        </button>
      </div>
    </dialog>
  );
}
