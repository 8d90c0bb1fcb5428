import { useEffect, useMemo, useState } from 'preact/hooks';
import type { Reading, Round, SiteConfig } from '../../../schema';
import type { Store } from '../../../store';
import { SEVERITY_WORDS } from '../../components/PointCard';
import { findingsCsv, maintenanceCsv, parseRange, readingsCsv } from '../../models/csv';
import { describeStoreError } from '../../models/data';
import { type BoardItem, DISPOSITIONS, filterBoard, loadBoard } from '../../models/findings-board';
import type { ScreenProps } from '../../router';
import { useServices } from '../../services';

const DAY_MS = 86_400_000;
const isoDay = (ms: number) => new Date(ms).toISOString().slice(0, 10);
const when = (iso: string) => new Date(iso).toLocaleString([], { dateStyle: 'medium', timeStyle: 'short' });

/** Hands a text file to the browser's download (the tablet keeps it in its Downloads). */
function download(name: string, text: string) {
  const url = URL.createObjectURL(new Blob([text], { type: 'text/csv;charset=utf-8' }));
  const link = document.createElement('a');
  link.href = url;
  link.download = name;
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** CSV exports of a chosen range and the printable weekly exceptions report. */
export default function Export(_props: ScreenProps) {
  const { data } = useServices();
  const [context, setContext] = useState<{ store: Store; config: SiteConfig; items: BoardItem[] } | string | null>(
    null,
  );
  const today = Date.UTC(new Date().getUTCFullYear(), new Date().getUTCMonth(), new Date().getUTCDate());
  const [from, setFrom] = useState(isoDay(today - 7 * DAY_MS));
  const [to, setTo] = useState(isoDay(today + DAY_MS));
  const [message, setMessage] = useState<string | null>(null);

  useEffect(() => {
    void (async () => {
      try {
        const store = await data.store();
        const config = await store.getConfig();
        if (!config) return setContext('No site configuration on this tablet yet: connect to the site network once.');
        setContext({ store, config, items: await loadBoard(store) });
      } catch (error) {
        setContext(describeStoreError(error));
      }
    })();
  }, [data]);

  const range = { from, to };
  const rangeError = useMemo(() => {
    try {
      parseRange({ from, to });
      return null;
    } catch (error) {
      return error instanceof Error ? error.message : String(error);
    }
  }, [from, to]);

  if (context === null) return <p class="loading">Loading…</p>;
  if (typeof context === 'string') {
    return (
      <section class="card card--watch">
        <h2>Exports cannot open</h2>
        <p>{context}</p>
      </section>
    );
  }
  const { store, config, items } = context;
  const name = (kind: string) => `crankhouse-${kind}-${from}-to-${to}.csv`;
  const run = async (kind: string, make: () => Promise<string>) => {
    setMessage(null);
    try {
      const text = await make();
      download(name(kind), text);
      const rows = text.split('\r\n').length - 2;
      setMessage(`${name(kind)}: ${rows} ${rows === 1 ? 'row' : 'rows'} saved to the tablet's downloads.`);
    } catch (error) {
      setMessage(error instanceof Error ? error.message : String(error));
    }
  };
  const finishedRounds = () => store.listRounds({ state: 'finished' });

  const exportReadings = () =>
    run('readings', async () => {
      const rounds = await finishedRounds();
      const readings = new Map<string, Reading[]>();
      for (const round of rounds) readings.set(round.id, await store.readingsOf(round.id));
      return readingsCsv(rounds, readings, config, range);
    });
  const exportFindings = () =>
    run('findings', async () => {
      const rounds: Round[] = await finishedRounds();
      const findings = (await Promise.all(rounds.map((round) => store.findingsOf(round.id)))).flat();
      return findingsCsv(findings, rounds, await store.listRecords('review'), range);
    });
  const exportMaintenance = () =>
    run('maintenance', async () => {
      const [valveChanges, bearingClearances, rodDrops, lockoutAcks] = await Promise.all([
        store.listRecords('valveChange'),
        store.listRecords('bearingClearance'),
        store.listRecords('rodDrop'),
        store.listRecords('lockoutAck'),
      ]);
      return maintenanceCsv({ valveChanges, bearingClearances, rodDrops, lockoutAcks }, range);
    });

  const weekly = rangeError ? [] : filterBoard(items, { from, to });
  const machines = config.machines.filter((m) => weekly.some((item) => item.finding.subject.machineId === m.id));

  return (
    <div class="stack">
      <section class="card no-print" aria-labelledby="export-heading">
        <h2 id="export-heading">Export and reports</h2>
        <p>
          CSV files follow RFC 4180 (UTF-8, comma separated, units in the header, values exactly as entered beside their
          SI value). Rounds are chosen by their start, records by their time; "to" is not included.
        </p>
        <div class="filters">
          <label class="field">
            <span class="field__label">From</span>
            <input
              class="field__input"
              type="date"
              value={from}
              onChange={(e) => setFrom(e.currentTarget.value)}
              data-testid="export-from"
            />
          </label>
          <label class="field">
            <span class="field__label">To (not included)</span>
            <input
              class="field__input"
              type="date"
              value={to}
              onChange={(e) => setTo(e.currentTarget.value)}
              data-testid="export-to"
            />
          </label>
        </div>
        {rangeError ? (
          <p class="warning" role="alert">
            {rangeError}
          </p>
        ) : null}
        <div class="actions">
          <button
            type="button"
            class="button"
            disabled={!!rangeError}
            onClick={() => void exportReadings()}
            data-testid="export-readings"
          >
            Readings CSV
          </button>
          <button
            type="button"
            class="button"
            disabled={!!rangeError}
            onClick={() => void exportFindings()}
            data-testid="export-findings"
          >
            Findings CSV
          </button>
          <button
            type="button"
            class="button"
            disabled={!!rangeError}
            onClick={() => void exportMaintenance()}
            data-testid="export-maintenance"
          >
            Maintenance CSV
          </button>
          <button
            type="button"
            class="button button--quiet"
            disabled={!!rangeError}
            onClick={() => window.print()}
            data-testid="print-report"
          >
            Print the exceptions report
          </button>
        </div>
        {message ? (
          <p role="status" data-testid="export-message">
            {message}
          </p>
        ) : null}
      </section>
      <section class="card report" aria-labelledby="report-heading" data-testid="exceptions-report">
        <h2 id="report-heading">
          Exceptions at {config.name}, rounds from {from} to before {to}
        </h2>
        <p>
          {weekly.length} findings outside their limits; {weekly.filter((i) => i.state === 'open').length} still open.
          Printed {when(new Date().toISOString())}.
        </p>
        {machines.map((machine) => (
          <div key={machine.id} class="report__machine">
            <h3>{machine.name}</h3>
            <table class="table">
              <caption class="visually-hidden">Findings on {machine.name}</caption>
              <thead>
                <tr>
                  <th scope="col">Severity</th>
                  <th scope="col">Round</th>
                  <th scope="col">Finding</th>
                  <th scope="col">Decision</th>
                </tr>
              </thead>
              <tbody>
                {weekly
                  .filter((item) => item.finding.subject.machineId === machine.id)
                  .map((item) => (
                    <tr key={item.finding.key}>
                      <td>{SEVERITY_WORDS[item.finding.severity]}</td>
                      <td>
                        {when(item.round.startedAt)}, {item.round.by.name}
                      </td>
                      <td>{item.finding.message}</td>
                      <td>
                        {item.latest
                          ? `${DISPOSITIONS.find((d) => d.id === item.latest?.disposition)?.label}: ${item.latest.comment} (${item.latest.by.name})`
                          : 'Open'}
                      </td>
                    </tr>
                  ))}
              </tbody>
            </table>
          </div>
        ))}
      </section>
    </div>
  );
}
