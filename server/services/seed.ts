/**
 * First-start seeding (only when the users table is empty): four demo accounts sharing the
 * demo password, one demo study of our own hand-imagery scenario with two participants, and
 * one demo rig. Invented data, for the demo only.
 */
import type { CreateStudyRequest, Role } from '../../shared/api';
import { countUsers, insertUser } from '../db/queries/users';
import type { AppContext } from '../context';
import { writeAudit } from './audit';
import { insertParticipantFrom } from './participants';
import { hashPassword } from './passwords';
import { insertRigWithKey } from './rigs';
import { insertStudyFrom } from './studies';

export const DEMO_ACCOUNTS: readonly { email: string; displayName: string; role: Role }[] = [
  { email: 'admin@aftercue.test', displayName: 'Demo Admin', role: 'admin' },
  { email: 'investigator@aftercue.test', displayName: 'Demo Investigator', role: 'investigator' },
  { email: 'experimenter@aftercue.test', displayName: 'Demo Experimenter', role: 'experimenter' },
  { email: 'reviewer@aftercue.test', displayName: 'Demo Reviewer', role: 'reviewer' },
];

/** A common 32-channel 10-20 subset, in the order a 32-channel cap usually lists it. */
const DEMO_CHANNELS = ['Fp1', 'Fp2', 'AF3', 'AF4', 'F7', 'F3', 'Fz', 'F4', 'F8', 'FC5', 'FC1', 'FC2', 'FC6', 'T7', 'C3',
  'Cz', 'C4', 'T8', 'CP5', 'CP1', 'CP2', 'CP6', 'P7', 'P3', 'Pz', 'P4', 'P8', 'PO3', 'PO4', 'O1', 'Oz', 'O2'];

export const DEMO_STUDY: CreateStudyRequest = {
  name: 'Hand-imagery pilot (demo)',
  description: 'Demo study: imagined left- versus right-hand movement after a visual cue, '
    + 'recorded from the bundled synthetic bridge. Invented data, for trying Aftercue out.',
  ethicsReference: 'DEMO-ETHICS-0001 (demo only)',
  cueClasses: ['left-hand', 'right-hand'],
  epochStartS: -0.5,
  epochEndS: 4.0,
  channelNames: DEMO_CHANNELS,
  sampleRateHz: 250,
  powerLineHz: 50,
  recipe: 'component-tf',
};

export interface SeedResult {
  accounts: { email: string; role: Role }[];
  password: string;
  studyId: number;
  rig: { id: number; name: string; key: string };
}

/** Seeds an empty database; returns what was created, or null when users already exist. */
export async function seedIfEmpty(ctx: AppContext): Promise<SeedResult | null> {
  const { db } = ctx;
  if (countUsers(db) > 0) return null;
  const passwordHash = await hashPassword(ctx.config.demoPassword, ctx.config.bcryptCost);
  const now = ctx.now();
  return db.transaction(() => {
    if (countUsers(db) > 0) return null;
    const ids = new Map(DEMO_ACCOUNTS.map((a) => [a.role, insertUser(db, { ...a, passwordHash }, now).id]));
    const studyId = insertStudyFrom(db, DEMO_STUDY, ids.get('investigator')!, now);
    insertParticipantFrom(db, studyId, { code: 'P-001', consentStatus: 'given', consentDate: now.toISOString().slice(0, 10),
      notes: 'Demo participant.' }, now);
    insertParticipantFrom(db, studyId, { code: 'P-002', consentStatus: 'pending', notes: 'Demo participant.' }, now);
    const rig = insertRigWithKey(db, { name: 'Demo rig', location: 'Synthetic bridge (bundled)' }, ids.get('admin')!, now);
    writeAudit(db, null, { action: 'system.seed', targetType: 'system', details: {
      accounts: DEMO_ACCOUNTS.map((a) => a.email), studyId, rigId: rig.rig.id } }, now);
    return {
      accounts: DEMO_ACCOUNTS.map((a) => ({ email: a.email, role: a.role })),
      password: ctx.config.demoPassword,
      studyId,
      rig: { id: rig.rig.id, name: rig.rig.name, key: rig.rigKey },
    };
  });
}
