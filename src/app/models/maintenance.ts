/** What the mechanic's screens need from the tablet: configuration, person, device, and saving records. */
import type { LockoutAck, PersonRef, RecordBodies, SiteConfig } from '../../schema';
import type { RecordKind, Store } from '../../store';
import { currentPerson } from './person';

export interface MaintenanceContext {
  store: Store;
  config: SiteConfig;
  person: PersonRef;
  deviceId: string;
}

export async function openMaintenance(store: Store): Promise<MaintenanceContext | string> {
  const config = await store.getConfig();
  if (!config) return 'No site configuration on this tablet yet: connect to the site network once.';
  const person = await currentPerson(store);
  if (!person) return 'Sign in on the Home screen first: each record carries the name of the person who made it.';
  return { store, config, person, deviceId: await store.deviceId() };
}

export async function saveMaintenance<T extends RecordKind>(
  context: MaintenanceContext,
  type: T,
  body: RecordBodies[T],
): Promise<void> {
  await context.store.saveRecord(type, body, {
    author: context.person.id,
    device: context.deviceId,
    createdAt: new Date().toISOString(),
  });
}

/** Records the acknowledged cautions before a maintenance task; returns the acknowledgement the task then points at. */
export async function acknowledgeTask(
  context: MaintenanceContext,
  task: LockoutAck['task'],
  cautionSetId: string,
  acknowledgements: LockoutAck['acknowledgements'],
): Promise<LockoutAck> {
  const ack: LockoutAck = {
    id: crypto.randomUUID(),
    task,
    cautionSetId,
    configVersion: context.config.version,
    by: context.person,
    acknowledgements,
    completedAt: new Date().toISOString(),
  };
  await saveMaintenance(context, 'lockoutAck', ack);
  return ack;
}

/** The caution set for opening a machine: the first one configured (the demo has one: before opening anything). */
export function openingCautions(config: SiteConfig) {
  return config.cautionSets[0] ?? null;
}
