/** Build-time constants that vite.config.ts defines for the page and the service worker. */
declare const __APP_VERSION__: string;
