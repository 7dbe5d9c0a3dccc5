import type { Role } from '@shared/api/roles';

/** How the UI names and explains each role (DESIGN.md, "People involved"). */
export const ROLE_INFO: Record<Role, { label: string; text: string }> = {
  admin: { label: 'Admin', text: 'Accounts, rigs, audit log and outbox' },
  investigator: { label: 'Investigator', text: 'Owns studies, approves decoders' },
  experimenter: { label: 'Experimenter', text: 'Records, trains, runs sessions' },
  reviewer: { label: 'Reviewer', text: 'Reads studies and results' },
};
