import { useObservable } from '../models/observable';
import { useServices } from '../services';

/** Tells the person when the tablet's records cannot be used in this tab, and what to do. */
export function DataBanner() {
  const { data } = useServices();
  const state = useObservable(data.state);
  let text: string | null = null;
  if (state.kind === 'blocked')
    text = 'Crankhouse is open in another tab with an older version. Close the other tab to continue.';
  if (state.kind === 'outdated')
    text = 'A newer version of Crankhouse was opened in another tab. Reload this tab to continue.';
  if (state.kind === 'failed') text = `The records on this tablet cannot be opened: ${state.reason}`;
  if (state.kind === 'importing') text = `Loading ${state.what} onto this tablet…`;
  if (!text) return null;
  return (
    <section
      class={`banner ${state.kind === 'importing' ? '' : 'banner--alarm'}`}
      role={state.kind === 'importing' ? 'status' : 'alert'}
      data-testid="data-banner"
    >
      <p>{text}</p>
      {state.kind === 'outdated' ? (
        <button type="button" class="button" onClick={() => window.location.reload()}>
          Reload
        </button>
      ) : null}
    </section>
  );
}
