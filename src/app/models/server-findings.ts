/**
 * Where the site server's recomputation of a round disagreed with the tablet that recorded it. Online only and a
 * bonus: the board works from the tablet's own records, and this only adds marks when the server answers.
 */
import { z } from 'zod';
import { Severity } from '../../schema';
import type { Store } from '../../store';
import { readSession } from '../../sync';

const ServerFindings = z.object({
  findings: z.array(
    z.object({
      key: z.string(),
      severity: Severity,
      mismatch: z.object({ deviceSeverity: Severity.nullable(), serverSeverity: Severity }).nullable(),
    }),
  ),
});

export interface Disagreement {
  deviceSeverity: Severity | null;
  serverSeverity: Severity;
}

export type DisagreementResult =
  | { state: 'checked'; byKey: Map<string, Disagreement> }
  | { state: 'unavailable'; reason: string };

/** The server's marks for up to 1000 newest findings; the reason when they cannot be had (offline, not allowed…). */
export async function serverDisagreements(store: Store, fetchImpl: typeof fetch = fetch): Promise<DisagreementResult> {
  const session = await readSession(store);
  if (!session) return { state: 'unavailable', reason: 'not signed in' };
  if (!session.user.roles.some((role) => role === 'supervisor' || role === 'admin')) {
    return { state: 'unavailable', reason: "only a supervisor's sign-in can ask the server" };
  }
  try {
    const response = await fetchImpl('/api/v1/findings?limit=1000', {
      headers: { Accept: 'application/json', Authorization: `Bearer ${session.token}` },
      cache: 'no-store',
    });
    if (!response.ok) return { state: 'unavailable', reason: `the server answered ${response.status}` };
    const parsed = ServerFindings.safeParse(await response.json());
    if (!parsed.success) return { state: 'unavailable', reason: "the server's answer has an unexpected shape" };
    const byKey = new Map<string, Disagreement>();
    for (const finding of parsed.data.findings) if (finding.mismatch) byKey.set(finding.key, finding.mismatch);
    return { state: 'checked', byKey };
  } catch {
    return { state: 'unavailable', reason: 'the server cannot be reached' };
  }
}
