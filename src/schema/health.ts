import { z } from 'zod';

/** `GET /api/v1/health`: the reachability probe. Field names are a wire contract. */
export const HealthResponse = z.object({
  ok: z.boolean(),
  version: z.string().min(1).max(64),
  database: z.enum(['ok', 'unavailable']),
});
export type HealthResponse = z.infer<typeof HealthResponse>;

/** `GET /api/v1/site`: what the app shell shows before a site configuration is on the tablet. */
export const SiteSummary = z.object({
  name: z.string().min(1).max(200),
});
export type SiteSummary = z.infer<typeof SiteSummary>;
