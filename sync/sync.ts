/** The sync's public surface, for store/ and tests. */
export { applyPullPage, beginFullResync, type ApplySummary } from './apply';
export { synchronize, isSyncRunning, type SynchronizeOptions, type SyncResult } from './engine';
export { SyncBusy, SyncError, type SyncStep } from './errors';
export { pullAll, type PullSummary, type SyncProgress } from './pull';
export { pushOutbox, type PushSummary } from './push';
export { ServerUnavailable, RequestRefused, ResyncRequired, TransportError, isRetryable, type PullQuery, type SyncTransport } from './transport';
