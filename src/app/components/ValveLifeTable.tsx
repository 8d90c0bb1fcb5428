import type { PositionHistory } from '../models/valve-history';

export const hours = (h: number | null | undefined) =>
  h === null || h === undefined ? '–' : `${Math.round(h).toLocaleString()} h`;

type Row = PositionHistory & { machineId?: string; machineName?: string };

/** Valve positions with their changes, failures, mean life and as-found words, in the order given. */
export function ValveLifeTable(props: {
  rows: readonly Row[];
  caption: string;
  captionHidden?: boolean;
  rowTestId: (row: Row) => string;
  machineColumn?: boolean;
}) {
  return (
    <table class="table">
      <caption class={props.captionHidden ? 'visually-hidden' : undefined}>{props.caption}</caption>
      <thead>
        <tr>
          {props.machineColumn ? <th scope="col">Machine</th> : null}
          <th scope="col">Position</th>
          <th scope="col">Changes</th>
          <th scope="col">Failures</th>
          <th scope="col">Mean between changes</th>
          <th scope="col">Counting the valve in service</th>
          <th scope="col">As found</th>
        </tr>
      </thead>
      <tbody>
        {props.rows.map((h) => (
          <tr key={props.rowTestId(h)} data-testid={props.rowTestId(h)}>
            {props.machineColumn ? <td>{h.machineName}</td> : null}
            <th scope="row">{h.positionId}</th>
            <td>{h.changes.length}</td>
            <td>{h.life?.failures ?? '–'}</td>
            <td>
              {hours(h.life?.meanTimeBetweenChangesH)}
              {h.life?.indicative ? ' (indicative)' : ''}
            </td>
            <td>{hours(h.life?.censoredMeanH)}</td>
            <td>{h.failuresByWord.map((w) => `${w.word} × ${w.count}`).join(', ') || '–'}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
