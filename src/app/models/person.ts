/**
 * Who is using this tablet. Until sign-in exists, the person types their name once; it is kept on the tablet and
 * written on every round and acknowledgement they make.
 */
import type { PersonRef } from '../../schema';
import type { Store } from '../../store';

const PERSON_KEY = 'person';

/** A stable id from a name: lower case, letters and digits joined by dashes (e.g. `mara-oyelaran`). */
export function personIdFrom(name: string): string {
  const id = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 64);
  return id || 'person';
}

export async function currentPerson(store: Store): Promise<PersonRef | null> {
  const value = await store.getMeta(PERSON_KEY);
  if (value && typeof value === 'object' && 'id' in value && 'name' in value) return value as PersonRef;
  return null;
}

export async function setCurrentPerson(store: Store, name: string): Promise<PersonRef> {
  const trimmed = name.trim().slice(0, 200);
  if (!trimmed) throw new Error('Enter your name.');
  const person = { id: personIdFrom(trimmed), name: trimmed };
  await store.setMeta(PERSON_KEY, person);
  return person;
}
