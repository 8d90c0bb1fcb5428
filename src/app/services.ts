import { type ConnectionMonitor, startConnectionMonitor } from './models/connection';
import { type DataModel, startDataModel } from './models/data';
import { type SiteModel, startSiteModel } from './models/site';
import { type StorageMonitor, startStorageMonitor } from './models/storage';
import { type SyncModel, startSyncModel } from './models/sync';

/** The long-lived models the shell and the screens share. Created once by main.tsx. */
export interface Services {
  connection: ConnectionMonitor;
  storage: StorageMonitor;
  site: SiteModel;
  data: DataModel;
  sync: SyncModel;
}

let services: Services | null = null;

export function startServices(): Services {
  if (services) return services;
  const storage = startStorageMonitor();
  const connection = startConnectionMonitor();
  // Ask the browser to keep this origin's data as soon as there is something worth keeping.
  const data = startDataModel({ onFirstSave: () => void storage.requestPersistence() });
  services = {
    connection,
    storage,
    site: startSiteModel(),
    data,
    sync: startSyncModel(data, connection),
  };
  const { site } = services;
  // On the demo site, a new tablet loads the demo configuration and history once.
  site.name.subscribe((name) => {
    if (name) void data.importDemoIfNeeded(name);
  });
  const cachedName = site.name.get();
  if (cachedName) void data.importDemoIfNeeded(cachedName);
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
