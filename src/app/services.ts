import { type ConnectionMonitor, startConnectionMonitor } from './models/connection';
import { type SiteModel, startSiteModel } from './models/site';
import { type StorageMonitor, startStorageMonitor } from './models/storage';

/** The long-lived models the shell and the screens share. Created once by main.tsx. */
export interface Services {
  connection: ConnectionMonitor;
  storage: StorageMonitor;
  site: SiteModel;
}

let services: Services | null = null;

export function startServices(): Services {
  services ??= {
    connection: startConnectionMonitor(),
    storage: startStorageMonitor(),
    site: startSiteModel(),
  };
  const { connection, site } = services;
  // Refresh the site name whenever the server becomes reachable.
  let wasReachable = false;
  connection.state.subscribe((state) => {
    const reachable = state.status === 'reachable';
    if (reachable && !wasReachable) void site.refresh();
    wasReachable = reachable;
  });
  return services;
}

export function useServices(): Services {
  if (!services) throw new Error('startServices() must run before the app renders (see main.tsx).');
  return services;
}
