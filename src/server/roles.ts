/** Who may do what: the roles a person holds, the record types each may send, and what each may read. */
import { RECORD_TYPES, type RecordType } from '../schema';

export const ROLES = ['operator', 'mechanic', 'supervisor', 'admin'] as const;
export type Role = (typeof ROLES)[number];

const ALL_TYPES = Object.keys(RECORD_TYPES) as RecordType[];

/** The record types each role may send. */
export const ROLE_RECORD_TYPES: Readonly<Record<Role, readonly RecordType[]>> = {
  operator: ['round', 'note', 'lockoutAck'],
  mechanic: ['valveChange', 'bearingClearance', 'rodDrop', 'lockoutAck', 'note'],
  supervisor: ['review', 'note', 'round'],
  admin: ALL_TYPES,
};

/** Record types a mechanic reads from everyone (besides their own records). */
export const MAINTENANCE_READ_TYPES: readonly RecordType[] = [
  'valveChange',
  'bearingClearance',
  'rodDrop',
  'lockoutAck',
];

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

/** The record types any of `roles` may send, in RECORD_TYPES order. */
export function typesFor(roles: readonly Role[]): RecordType[] {
  return ALL_TYPES.filter((type) => roles.some((role) => ROLE_RECORD_TYPES[role].includes(type)));
}

export function mayRecord(roles: readonly Role[], type: RecordType): boolean {
  return roles.some((role) => ROLE_RECORD_TYPES[role].includes(type));
}

/** What a set of roles may read when pulling records. */
export interface ReadScope {
  /** Every record (supervisor, admin). */
  all: boolean;
  /** Maintenance records and lockout acknowledgements of everyone (mechanic). */
  maintenance: boolean;
  /** Reviews and notes on rounds the person made (operator). */
  notesOnOwnRounds: boolean;
}

export function readScope(roles: readonly Role[]): ReadScope {
  return {
    all: roles.includes('supervisor') || roles.includes('admin'),
    maintenance: roles.includes('mechanic'),
    notesOnOwnRounds: roles.includes('operator'),
  };
}
