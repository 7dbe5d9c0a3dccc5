/**
 * Reads the training report that comes with a decoder (shared/api/decoders.ts keeps it as an open
 * record: REPORT.json of `aftercue train`, issue 4 part 7) into what the report panel draws.
 * Each figure is read on its own, so a report missing some fields still shows the others.
 */
import { z } from 'zod';

const num = z.number().finite();
const numArray = z.array(num);

function pick<T>(schema: z.ZodType<T>, value: unknown): T | null {
  const r = schema.safeParse(value);
  return r.success ? r.data : null;
}

/**
 * The chance threshold as a fraction: a number, or a Combrisson & Jerbi threshold object
 * (shared/evaluation/stats.ts ChanceThreshold, of which the accuracy needed is the figure shown).
 */
function readChance(value: unknown): number | null {
  const n = pick(num, value);
  if (n !== null) return n;
  const o = pick(z.object({ accuracyNeeded: num }).loose(), value);
  return o?.accuracyNeeded ?? null;
}

export interface BaselineFigures {
  key: string;
  label: string;
  accuracy: number;
  foldAccuracies: number[];
}

export interface ReportFigures {
  accuracy: number | null;
  wilson95: [number, number] | null;
  chanceThreshold95: number | null;
  auc: number | null;
  kappa: number | null;
  itrBitsPerMin: number | null;
  trials: number | null;
  foldAccuracies: number[];
  repeatAccuracies: number[];
  lambda: number | null;
  rank: number | null;
  baselines: BaselineFigures[];
  totalSeconds: number | null;
  citation: string | null;
}

const BASELINE_LABELS: Record<string, string> = {
  cspLda: 'CSP + shrinkage LDA',
  bandpowerLogreg: 'Log band power + logistic',
};

export function readReport(report: Record<string, unknown> | null): ReportFigures | null {
  if (!report) return null;
  const baselineRecord = pick(z.record(z.string(), z.unknown()), report.baselines) ?? {};
  const baselines: BaselineFigures[] = [];
  for (const [key, value] of Object.entries(baselineRecord)) {
    const b = pick(z.object({ accuracy: num, foldAccuracies: numArray.optional() }).loose(), value);
    if (b) baselines.push({ key, label: BASELINE_LABELS[key] ?? key, accuracy: b.accuracy, foldAccuracies: b.foldAccuracies ?? [] });
  }
  const timings = pick(z.object({ totalSeconds: num }).loose(), report.timings);
  const citation = pick(z.string(), report.citation) ?? pick(z.object({ text: z.string() }).loose(), report.citation)?.text ?? null;
  return {
    accuracy: pick(num, report.nestedCvAccuracy) ?? pick(num, report.accuracy),
    wilson95: pick(z.tuple([num, num]), report.wilson95),
    chanceThreshold95: readChance(report.chanceThreshold95),
    auc: pick(num, report.auc),
    kappa: pick(num, report.kappa),
    itrBitsPerMin: pick(num, report.itrBitsPerMin),
    trials: pick(num, report.trials),
    foldAccuracies: pick(numArray, report.foldAccuracies) ?? [],
    repeatAccuracies: pick(numArray, report.repeatAccuracies) ?? [],
    // λ is a number, or {final, perFold, ...} from the trainer (issue 4 REPORT.json).
    lambda: pick(num, report.lambda) ?? pick(z.object({ final: num }).loose(), report.lambda)?.final ?? null,
    rank: pick(num, report.rank),
    baselines,
    totalSeconds: timings?.totalSeconds ?? null,
    citation,
  };
}

/** One row of the accuracy comparison (AccuracyComparison.vue). */
export interface AccuracyRow {
  label: string;
  accuracy: number;
  interval?: [number, number] | null;
  main?: boolean;
}

/** A baseline's per-fold accuracies drawn over the decoder's fold bars (FoldBars.vue). */
export interface FoldMarks {
  label: string;
  values: readonly number[];
  shape: 'tick' | 'diamond';
}
