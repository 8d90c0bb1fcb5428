import { useEffect, useState } from 'preact/hooks';
import { ValveLifeTable } from '../../components/ValveLifeTable';
import { describeStoreError } from '../../models/data';
import { siteValveLife } from '../../models/valve-history';
import { Link, type ScreenProps } from '../../router';
import { useServices } from '../../services';

/** The site's valve life, for the supervisor: read-only, from the valve changes the tablet holds. */
export default function ValveLife(_props: ScreenProps) {
  const { data } = useServices();
  const [rows, setRows] = useState<ReturnType<typeof siteValveLife> | string | null>(null);
  useEffect(() => {
    void (async () => {
      try {
        const store = await data.store();
        const config = await store.getConfig();
        if (!config) return setRows('No site configuration on this tablet yet: connect to the site network once.');
        setRows(siteValveLife(config, await store.listRecords('valveChange'), new Date().toISOString()));
      } catch (error) {
        setRows(describeStoreError(error));
      }
    })();
  }, [data]);
  if (rows === null) return <p class="loading">Loading…</p>;
  if (typeof rows === 'string') {
    return (
      <section class="card card--watch">
        <h2>Valve life cannot open</h2>
        <p>{rows}</p>
      </section>
    );
  }
  return (
    <section class="card" aria-labelledby="valve-life-heading" data-testid="site-valve-life">
      <h2 id="valve-life-heading">Valve life across the site</h2>
      <p>
        Positions with at least one valve change, the ones that eat valves first: most as-found failures, then the
        shortest mean time between changes. Fewer than three changes give an indicative figure only. Details per
        position are in the <Link href="/maintenance/history">mechanic's valve position history</Link>.
      </p>
      {rows.length === 0 ? (
        <p>No valve changes recorded yet.</p>
      ) : (
        <ValveLifeTable
          rows={rows}
          caption="Valve positions ranked by failures and shortest life"
          captionHidden
          machineColumn
          rowTestId={(h) => `life-${h.machineId}-${h.positionId}`}
        />
      )}
    </section>
  );
}
