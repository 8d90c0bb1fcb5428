/** The demo site and its history as a backup file, which a tablet imports like any other backup. */
import { BACKUP_FORMAT, BACKUP_FORMAT_VERSION, type Backup } from '../schema/backup';
import { type DemoHistory, demoHistory } from './history';

export function demoBackup(options: { end?: string; history?: DemoHistory } = {}): Backup {
  const history = options.history ?? demoHistory(options.end ? { end: options.end } : {});
  return {
    format: BACKUP_FORMAT,
    formatVersion: BACKUP_FORMAT_VERSION,
    exportedAt: history.rounds.at(-1)?.round.finishedAt ?? new Date(0).toISOString(),
    deviceId: 'demo',
    configs: [history.config],
    rounds: history.rounds,
    records: [
      ...history.lockoutAcks.map((body) => ({ type: 'lockoutAck' as const, body })),
      ...history.valveChanges.map((body) => ({ type: 'valveChange' as const, body })),
      ...history.bearingClearances.map((body) => ({ type: 'bearingClearance' as const, body })),
    ],
    // The demo history belongs to the server already: nothing of it is for this tablet to send.
    outbox: [],
  };
}
