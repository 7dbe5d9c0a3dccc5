import { describe, expect, it } from 'vitest';
import {
  can, createStudyRequestSchema, permissionsFor, PERMISSIONS, ROLES, setPasswordRequestSchema, zodFieldErrors,
} from '../../shared/api';

describe('roles and permissions (shared/api/roles.ts)', () => {
  it('gives each role the permissions the foundation issue lists', () => {
    // Foundation issue, "Roles": the suggested permission table, written out per role, plus the
    // issue 6 contract's decoder/session/training/recording rows.
    expect(permissionsFor('reviewer')).toEqual(['study:read', 'decoder:read', 'session:read']);
    expect(permissionsFor('experimenter')).toEqual(['study:read', 'participant:create', 'participant:edit', 'rig:read',
      'decoder:read', 'decoder:import', 'session:read', 'session:run', 'training:run', 'recording:upload']);
    // Issue 6 contract: freezing a decoder is the investigator's (and admin's) call, not the experimenter's.
    expect(can('experimenter', 'decoder:freeze')).toBe(false);
    expect(can('investigator', 'decoder:freeze')).toBe(true);
    expect(permissionsFor('admin')).toEqual(Object.keys(PERMISSIONS));
    expect(ROLES).toEqual(['admin', 'investigator', 'experimenter', 'reviewer']);
  });

  it('answers no for a signed-out caller', () => {
    // Common practice: no role, no permission.
    expect(can(null, 'study:read')).toBe(false);
    expect(can('reviewer', 'study:edit')).toBe(false);
    expect(can('investigator', 'study:archive')).toBe(true);
  });
});

describe('request schemas', () => {
  it('accepts the demo study definition and the 10-10 names of a 64-channel cap', () => {
    const names = ['Fc5', 'FCz', 'Fp1', 'AFz', 'T9', 'T10', 'Iz', 'PO8', 'TP7', 'FT8', 'Nz'];
    const r = createStudyRequestSchema.safeParse({ name: 'Cap', ethicsReference: 'IRB-1', cueClasses: ['a', 'b'], epochStartS: -2,
      epochEndS: 10, channelNames: names, sampleRateHz: 160, powerLineHz: 60, recipe: 'component-tf' });
    // Boundary values from the study definition: start >= -2, end <= 10; names per Oostenveld & Praamstra 2001.
    expect(r.success).toBe(true);
  });

  it('refuses non-10-10 labels, too many classes and a password over 72 bytes', () => {
    const study = createStudyRequestSchema.safeParse({ name: 'Cap', ethicsReference: 'IRB-1', epochStartS: 0, epochEndS: 1,
      cueClasses: ['a', 'b', 'c', 'd', 'e', 'f', 'g', 'h', 'i'], channelNames: ['EOG left', 'C3'], sampleRateHz: 250.5,
      powerLineHz: 50, recipe: 'covariance' });
    // Study definition: 2-8 cue classes, 10-10 style channel names.
    expect(Object.keys(zodFieldErrors(study.error!)).sort()).toEqual(['channelNames.0', 'cueClasses']);
    // bcrypt reads 72 bytes at most (Provos & Mazières 1999); 'é' is 2 bytes in UTF-8.
    expect(setPasswordRequestSchema.safeParse({ token: 't', password: 'é'.repeat(37) }).success).toBe(false);
    expect(setPasswordRequestSchema.safeParse({ token: 't', password: 'é'.repeat(36) }).success).toBe(true);
  });
});
