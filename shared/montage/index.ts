/**
 * 10-10 electrode names and positions.
 *
 * Naming: Jasper 1958, "The ten-twenty electrode system of the International Federation",
 * Electroencephalogr Clin Neurophysiol 10:371-375; Chatrian, Lettich & Nelson 1985, "Ten percent
 * electrode system for topographic studies of spontaneous and evoked EEG activity", Am J EEG
 * Technol 25:83-92; Oostenveld & Praamstra 2001, "The five percent electrode system for
 * high-resolution EEG and ERP measurements", Clin Neurophysiol 112(4):713-719. Modern names
 * T7/T8/P7/P8 replace T3/T4/T5/T6 (ACNS Guideline 2, Acharya et al. 2016).
 *
 * Positions are the idealised spherical construction of REFERENCES.md section 8, computed by
 * refvalues/electrodes_1010.py (adapted as tests/fixtures/montage/make_positions.py, which
 * generates `positions-1010.ts`): the Fpz-T7-Oz-T8 circumference is the equator, 10 % of the
 * nasion-inion arc is 22.5°, 5 % of the circumference is 18°. It is not a measured head and no
 * published coordinate table was copied.
 */
import { COMMON_32_NAMES, POSITIONS_1010 } from './positions-1010';
import type { ElectrodePosition } from './types';

export type { ElectrodePosition } from './types';

/**
 * The 65 positions of REFERENCES.md section 8: the 64 channels of the PhysioNet eegmmidb
 * recordings in their file order, then Nz. Unit sphere, see {@link ElectrodePosition}.
 */
export const MONTAGE_1010: readonly ElectrodePosition[] = POSITIONS_1010;

/** A common 32-channel 10-20/10-10 subset (the "in 32" column of REFERENCES.md section 8). */
export const COMMON_32: readonly string[] = COMMON_32_NAMES;

const BY_NAME = new Map<string, ElectrodePosition>(MONTAGE_1010.map((p) => [p.name, p]));

/** Old 10-20 temporal names and their modern 10-10 equivalents (Acharya et al. 2016). */
const LEGACY_NAMES: Readonly<Record<string, string>> = { T3: 'T7', T4: 'T8', T5: 'P7', T6: 'P8' };

const EEG_PREFIX = /^EEG[\s_:]+/i;
// Reference-electrode suffixes of referential derivations ("Fp1-REF", "C3-A2", "Cz_LE").
// A bipolar pair such as "Fp1-F7" is left alone: it is not one electrode.
const REF_SUFFIX = /[\s]*[-_][\s]*(REF|REFERENCE|LE|RE|AR|AVG|AV|CAR|A1|A2|A1A2|M1|M2|M1M2|LM|RM)$/i;
const TEN_TEN = /^(FP|AF|FC|FT|CP|TP|PO|F|C|T|P|O|I|N)(Z|\d{1,2})$/i;

/**
 * Canonical 10-10 spelling of a channel label: strips an "EEG " prefix, a reference suffix
 * ("-REF", "-LE", "-A1", "-M2" ...), padding dots and spaces, and fixes case ("Fp", "AF", "FC",
 * ... upper case except the "p" of "Fp" and a midline "z").
 * Examples: 'C3..' -> 'C3', 'Fc5.' -> 'FC5', 'FPZ' -> 'Fpz', 'cz' -> 'Cz', 'EEG Fp1-REF' -> 'Fp1'.
 * A label that is not a 10-10 name (e.g. 'EDF Annotations', 'EOG left', 'Fp1-F7') comes back
 * trimmed and otherwise unchanged. Old names (T3 ...) are not renamed here; see {@link positionOf}.
 */
export function normaliseChannelName(label: string): string {
  const trimmed = label.trim();
  const core = trimmed.replace(EEG_PREFIX, '').replace(/[.\s]+$/, '').replace(REF_SUFFIX, '')
    .replace(/[.\s]+/g, '');
  const m = TEN_TEN.exec(core);
  if (!m) return trimmed;
  const prefix = m[1]!.toUpperCase() === 'FP' ? 'Fp' : m[1]!.toUpperCase();
  const site = m[2]!.toUpperCase() === 'Z' ? 'z' : m[2]!;
  return prefix + site;
}

/**
 * Position of an electrode given any label spelling ({@link normaliseChannelName} is applied);
 * the old 10-20 names T3/T4/T5/T6 resolve to T7/T8/P7/P8 (the returned `name` is the modern one).
 * @returns the unit-sphere position, or undefined when the name is not in {@link MONTAGE_1010}
 */
export function positionOf(name: string): ElectrodePosition | undefined {
  const canonical = normaliseChannelName(name);
  return BY_NAME.get(LEGACY_NAMES[canonical] ?? canonical);
}
