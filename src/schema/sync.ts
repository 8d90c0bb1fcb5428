/** Bodies of the sync API (wire contract): the tablet and the server validate them with the same schemas. */
import { z } from 'zod';
import { ConfigId, Name } from './common';
import { Envelope } from './envelope';

export const ROLES = ['operator', 'mechanic', 'supervisor', 'admin'] as const;
export const Role = z.enum(ROLES);
export type Role = z.infer<typeof Role>;

export const SessionRequest = z.strictObject({
  user: ConfigId,
  passcode: z.string().min(1, 'enter the passcode').max(200),
  device: z.strictObject({ id: ConfigId, name: Name }),
});
export type SessionRequest = z.infer<typeof SessionRequest>;

export const SignedInUser = z.strictObject({ id: ConfigId, name: Name, roles: z.array(Role).min(1) });
export type SignedInUser = z.infer<typeof SignedInUser>;

export const SessionResponse = z.strictObject({ token: z.string().min(32).max(200), user: SignedInUser });
export type SessionResponse = z.infer<typeof SessionResponse>;

export const MAX_RECORDS_PER_PUSH = 500;
export const MAX_PUSH_BYTES = 2 * 1024 * 1024;

export const PushRequest = z.strictObject({ records: z.array(z.unknown()).max(MAX_RECORDS_PER_PUSH) });

export const PushResult = z.strictObject({
  id: z.string().max(200),
  status: z.enum(['stored', 'duplicate', 'conflict', 'rejected']),
  seq: z.int().min(1).optional(),
  error: z.string().max(20_000).optional(),
});
export type PushResult = z.infer<typeof PushResult>;

export const PushResponse = z.strictObject({ results: z.array(PushResult) });
export type PushResponse = z.infer<typeof PushResponse>;

export const PulledRecord = Envelope.extend({ seq: z.int().min(1) });
export const PullResponse = z.strictObject({
  records: z.array(PulledRecord),
  next: z.int().min(0),
  more: z.boolean(),
});
export type PullResponse = z.infer<typeof PullResponse>;
