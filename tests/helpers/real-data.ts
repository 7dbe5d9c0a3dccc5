import { existsSync, readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/**
 * The real recordings: PhysioNet EEG Motor Movement/Imagery Dataset (eegmmidb v1.0.0),
 * Schalk et al. 2004, IEEE TBME 51(6):1034-1043; Goldberger et al. 2000, Circulation 101(23).
 * They live beside the checkout in ../shared/data/eegmmidb and are never committed.
 */
export const EEGMMIDB_DIR = fileURLToPath(new URL('../../../shared/data/eegmmidb/', import.meta.url));

export const hasRealData = existsSync(EEGMMIDB_DIR);

/**
 * Tests on the real recordings skip when the folder is absent, except in CI (CI=true),
 * where a missing folder is a failure.
 */
export const skipWithoutRealData = !hasRealData && process.env.CI !== 'true';

export function eegmmidbPath(file: string): string {
  return EEGMMIDB_DIR + file;
}

export function readEegmmidb(file: string): Uint8Array {
  if (!hasRealData) throw new Error(`real data folder missing: ${EEGMMIDB_DIR}`);
  return new Uint8Array(readFileSync(eegmmidbPath(file)));
}
