export { demoBackup } from './backup';
export {
  CREEP,
  DEMO_DAYS,
  DEMO_DEVICES,
  DEMO_END,
  DEMO_SEED,
  type DemoHistory,
  demoEnvelopes,
  demoHistory,
  LEAK,
} from './history';
export { DEMO_ELEVATION_M, DEMO_PEOPLE, DEMO_SITE_NAME, demoConfig, OPEN_MACHINE_CAUTIONS } from './site';
