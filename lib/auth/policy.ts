import type { Role } from '@/db/schema';
import { AppError } from '@/lib/errors';
import type { Actor } from './actor';

/** What each role may do; the one table every route, page and socket handler consults. */
const everyone = ['technician', 'expert', 'reviewer', 'admin'] as const;

const permissions = {
  'session:open': ['technician'],
  'session:view': everyone,
  'reading:submit': ['technician'],
  /** Comment on, return or approve an ended session's record (the service manager's part). */
  'session:review': ['reviewer', 'admin'],
  /** Bring in a session record exported from Levelwire (its chain is verified first). */
  'session:import': ['admin'],
  'fleet:read': everyone,
  'fleet:write': ['admin'],
  'instrument:read': everyone,
  'instrument:write': ['admin'],
  'visit:read': everyone,
  'visit:write': ['admin'],
  /** Choosing an instrument past its calibration due date for a visit. */
  'instrument:override': ['admin'],
  'user:manage': ['admin'],
  'mailbox:read': ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissions;

export function can(actor: Actor, permission: Permission): boolean {
  return (permissions[permission] as readonly Role[]).includes(actor.role);
}

/** Throws 403 naming the role when the actor may not do this. */
export function assertCan(actor: Actor, permission: Permission): void {
  if (!can(actor, permission)) {
    throw new AppError(`forbidden:${permission.split(':')[0]}`, `A ${actor.role} may not ${describe[permission]}`);
  }
}

const describe: Record<Permission, string> = {
  'session:open': 'open a leveling session',
  'session:view': 'view this session',
  'reading:submit': 'record readings',
  'session:review': 'review a session’s record',
  'session:import': 'import a session record; ask an admin',
  'fleet:read': 'read the fleet',
  'fleet:write': 'change customers, sites or machines',
  'instrument:read': 'read instruments',
  'instrument:write': 'change instruments',
  'visit:read': 'read visits',
  'visit:write': 'schedule or change visits',
  'instrument:override': 'allow an instrument past its calibration due date',
  'user:manage': 'manage users',
  'mailbox:read': 'read the development mailbox',
};

/** Records of another organisation do not exist for the caller: 404, so their existence does not leak. */
export function assertSameOrganisation(actor: Actor, organisationId: string | null | undefined, what: string): void {
  if (!organisationId || organisationId !== actor.organisationId) {
    throw new AppError(`not_found:${what}`, `No such ${what}`);
  }
}
