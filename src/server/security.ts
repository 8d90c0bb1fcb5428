import type { MiddlewareHandler } from 'hono';
import { secureHeaders } from 'hono/secure-headers';

/** Path of the service worker script in the build output. */
export const SERVICE_WORKER_PATH = '/sw.js';

const SELF = "'self'";
const NONE = "'none'";

/** CSP for pages and everything else the browser loads as a document or subresource. */
export const PAGE_CSP = {
  defaultSrc: [SELF],
  scriptSrc: [SELF],
  styleSrc: [SELF],
  imgSrc: [SELF, 'data:', 'blob:'],
  fontSrc: [SELF],
  connectSrc: [SELF],
  workerSrc: [SELF],
  manifestSrc: [SELF],
  objectSrc: [NONE],
  baseUri: [NONE],
  formAction: [SELF],
  frameAncestors: [NONE],
};

// A worker runs under the CSP of its own script response, not the page's; without this header
// the service worker could fetch or import from anywhere.
export const WORKER_CSP = {
  defaultSrc: [SELF],
  scriptSrc: [SELF],
  connectSrc: [SELF],
  objectSrc: [NONE],
  baseUri: [NONE],
};

const COMMON = {
  strictTransportSecurity: 'max-age=31536000; includeSubDomains',
  xFrameOptions: 'DENY',
  referrerPolicy: 'no-referrer',
  xContentTypeOptions: 'nosniff',
  crossOriginOpenerPolicy: 'same-origin',
  permissionsPolicy: {
    camera: ['self'],
    geolocation: [],
    microphone: [],
    payment: [],
    usb: [],
    serial: [],
    bluetooth: [],
    hid: [],
    midi: [],
    displayCapture: [],
    browsingTopics: [],
  },
};

/** Security headers on every response; `sw.js` gets its own CSP. */
export function securityHeaders(): MiddlewareHandler {
  const page = secureHeaders({ ...COMMON, contentSecurityPolicy: PAGE_CSP });
  const worker = secureHeaders({ ...COMMON, contentSecurityPolicy: WORKER_CSP });
  return (c, next) => (c.req.path === SERVICE_WORKER_PATH ? worker(c, next) : page(c, next));
}
