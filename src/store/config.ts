/** Site configurations, one record per published version. */
import { SiteConfig } from '../schema';
import { sameContent } from './canonical';
import { StoreError } from './errors';
import { type Ctx, read, write } from './tx';
import { invalid, parse } from './validate';

export async function putConfig(ctx: Ctx, input: SiteConfig): Promise<'saved' | 'unchanged'> {
  const config = parse(SiteConfig, input, 'site configuration', 'config');
  return write(ctx, ['configs'], async (tx) => {
    const configs = tx.objectStore('configs');
    const existing = await configs.get(config.version);
    if (existing) {
      if (sameContent(existing, config)) return 'unchanged' as const;
      throw new StoreError(
        'E_IMMUTABLE',
        `Configuration version ${config.version} is already stored with different content; a changed configuration is published as a new version.`,
      );
    }
    await configs.add(config);
    return 'saved' as const;
  });
}

export async function getConfig(ctx: Ctx, version?: number): Promise<SiteConfig | undefined> {
  if (version !== undefined && (!Number.isInteger(version) || version < 1)) {
    throw invalid(`The configuration query is not valid: version: must be a whole number of 1 or more, not ${version}`);
  }
  return read(ctx, ['configs'], async (tx) => {
    const configs = tx.objectStore('configs');
    if (version !== undefined) return configs.get(version);
    return (await configs.openCursor(null, 'prev'))?.value;
  });
}
