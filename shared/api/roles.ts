/**
 * Roles and permissions shared by the server (the authority) and the client (which only
 * mirrors them to hide what a user may not do). Framework-free: zod and plain TypeScript only.
 */

/** The four account roles. Participants are never accounts. */
export type Role = 'admin' | 'investigator' | 'experimenter' | 'reviewer';

/** Every role, in the order the UI lists them. */
export const ROLES: readonly Role[] = ['admin', 'investigator', 'experimenter', 'reviewer'];

/** One action a role may be allowed to take; `area:verb`. */
export type Permission =
  | 'study:read'
  | 'study:create'
  | 'study:edit'
  | 'study:archive'
  | 'participant:create'
  | 'participant:edit'
  | 'rig:read'
  | 'rig:manage'
  | 'user:manage'
  | 'audit:read'
  | 'outbox:read'
  | 'decoder:read'
  | 'decoder:import'
  | 'decoder:freeze'
  | 'session:read'
  | 'session:run'
  | 'training:run'
  | 'recording:upload';

/** Which roles hold each permission. Later features add rows here. */
export const PERMISSIONS: Record<Permission, readonly Role[]> = {
  'study:read': ['admin', 'investigator', 'experimenter', 'reviewer'],
  'study:create': ['admin', 'investigator'],
  'study:edit': ['admin', 'investigator'],
  'study:archive': ['admin', 'investigator'],
  'participant:create': ['admin', 'investigator', 'experimenter'],
  'participant:edit': ['admin', 'investigator', 'experimenter'],
  'rig:read': ['admin', 'investigator', 'experimenter'],
  'rig:manage': ['admin'],
  'user:manage': ['admin'],
  'audit:read': ['admin'],
  'outbox:read': ['admin'],
  'decoder:read': ['admin', 'investigator', 'experimenter', 'reviewer'],
  'decoder:import': ['admin', 'investigator', 'experimenter'],
  'decoder:freeze': ['admin', 'investigator'],
  'session:read': ['admin', 'investigator', 'experimenter', 'reviewer'],
  /** Create, start, pause, resume, stop, annotate, mark trials, display link. */
  'session:run': ['admin', 'investigator', 'experimenter'],
  'training:run': ['admin', 'investigator', 'experimenter'],
  'recording:upload': ['admin', 'investigator', 'experimenter'],
};

/** Every permission name, in declaration order. */
export const ALL_PERMISSIONS = Object.keys(PERMISSIONS) as Permission[];

/** True when `role` holds `permission`; false for a missing role (signed out). */
export function can(role: Role | null | undefined, permission: Permission): boolean {
  return role != null && PERMISSIONS[permission].includes(role);
}

/** The permissions a role holds, in declaration order (what GET /api/auth/me returns). */
export function permissionsFor(role: Role): Permission[] {
  return ALL_PERMISSIONS.filter((p) => PERMISSIONS[p].includes(role));
}

/** Type guard for a role name coming from outside (a form, the database). */
export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}
