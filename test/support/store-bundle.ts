/**
 * Entry of the browser bundle the store's end-to-end tests and bench load into a blank page (as the global
 * `crankhouseStore`): the store itself, its version-1 builder, the fixture and plain idb for comparisons.
 */
export { openDB } from 'idb';
export * from '../../src/store';
export { openDb } from '../../src/store/db';
export {
  dumpDatabase,
  fixtureId,
  fixtureReading,
  fixtureRecord,
  fixtureRound,
  makeFixture,
  pointIdOf,
  writeV1Database,
} from './store-fixture';
