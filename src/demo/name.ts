/** The demo site's name, on its own so the app can recognise the demo without loading the demo data. */
export const DEMO_SITE_NAME = 'Cedar Flats Compressor Station (demo)';
