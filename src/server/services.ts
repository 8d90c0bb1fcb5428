/** The stateful parts of the API, made once per app: prepared statements, caches and the sign-in throttle. */
import type { Database } from './db';
import type { Logger } from './errors';
import { FindingsQuery } from './findings';
import { Ingestor } from './ingest';
import { RecordsPull } from './records';
import { type AuthOptions, SessionStore, SignInThrottle } from './sessions';
import { PasscodeChecker } from './users';

export interface Services extends AuthOptions {
  db: Database;
  passcodes: PasscodeChecker;
  throttle: SignInThrottle;
  ingestor: Ingestor;
  pull: RecordsPull;
  findings: FindingsQuery;
}

export interface ServiceOptions {
  log: Logger;
  now?: () => Date;
  throttle?: SignInThrottle;
}

export function createServices(db: Database, options: ServiceOptions): Services {
  return {
    db,
    log: options.log,
    now: options.now ?? (() => new Date()),
    sessions: new SessionStore(db),
    passcodes: new PasscodeChecker(db),
    throttle: options.throttle ?? new SignInThrottle(),
    ingestor: new Ingestor(db, options.log),
    pull: new RecordsPull(db),
    findings: new FindingsQuery(db),
  };
}
