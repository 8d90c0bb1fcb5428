/**
 * Who is using this tablet: the person signed in (sync keeps the session on the tablet, so it works offline after
 * one sign-in). Records carry this person as author; the server accepts them only from that person's sign-in.
 */
import type { PersonRef } from '../../schema';
import type { Store } from '../../store';
import { readSession } from '../../sync';

export async function currentPerson(store: Store): Promise<PersonRef | null> {
  const session = await readSession(store);
  return session ? { id: session.user.id, name: session.user.name } : null;
}
