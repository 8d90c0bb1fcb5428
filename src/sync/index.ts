export { createApi, RETRYABLE, type SyncApi, SyncError, type SyncErrorCode } from './api';
export { BACKOFF_BASE_MS, BACKOFF_CAP_MS, backoffDelayMs } from './backoff';
export { readSession, SESSION_KEY, type StoredSession, SyncEngine, type SyncPhase, type SyncStatus } from './engine';
export { DEFAULT_PROBE_TIMEOUT_MS, HEALTH_PATH, type ProbeResult, probeServer } from './health';
export { PULL_PAGE, type PullProgress, pullAll } from './pull';
export { PUSH_BATCH_RECORDS, PUSH_BYTES_BUDGET, type PushProgress, pushOutbox, takeBatch } from './push';
