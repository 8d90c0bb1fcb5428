/** One status ladder for every threshold result: ok < watch < alarm < trip (trip only where a trip value exists). */
export type Status = 'ok' | 'watch' | 'alarm' | 'trip';

export const STATUS_ORDER: readonly Status[] = ['ok', 'watch', 'alarm', 'trip'];

/** The worst of several statuses; a finding takes the worst status of its sub-checks. */
export function worstStatus(...statuses: Status[]): Status {
  let worst: Status = 'ok';
  for (const status of statuses) {
    if (STATUS_ORDER.indexOf(status) > STATUS_ORDER.indexOf(worst)) worst = status;
  }
  return worst;
}
