/** The message workbox-window's `messageSkipWaiting()` posts to a waiting worker. */
export function isSkipWaitingMessage(data: unknown): boolean {
  return typeof data === 'object' && data !== null && (data as { type?: unknown }).type === 'SKIP_WAITING';
}
