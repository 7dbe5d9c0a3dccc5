/**
 * A stopped session built straight in SQLite for the gap-review tests: a decoder whose training
 * report holds the nested-CV figures, and 48 constructed trials (the same construction as
 * tests/shared/review/gap-review.test.ts: 29 of 40 clean trials correct, 8 excluded).
 */
import type { ServerHandle } from '../../../server/index';

export const CLASSES = ['left-hand', 'right-hand'] as const;

export function insertReviewDecoder(h: ServerHandle, studyId: number): number {
  const report = { nestedCvAccuracy: 0.864, trials: 500, foldAccuracies: [0.86, 0.88, 0.84, 0.87, 0.862], wilson95: [0.831165, 0.891285] };
  const metrics = { cvAccuracy: 0.864, wilson95: [0.831165, 0.891285], chanceThreshold95: 0.538, trials: 500 };
  const now = Date.now();
  const r = h.db.sqlite.prepare(`INSERT INTO decoders (study_id, name, recipe, classes, channel_names, sample_rate_hz, epoch_start_s,
    epoch_end_s, artifact, sha256, status, metrics, report, source, created_at, frozen_at) VALUES (?, 'Review decoder', 'covariance', ?, ?,
    160, 0.5, 2, '{}', ?, 'frozen', ?, ?, 'import', ?, ?)`).run(studyId, JSON.stringify(CLASSES), JSON.stringify(['C3', 'Cz', 'C4']),
    'a'.repeat(64), JSON.stringify(metrics), JSON.stringify(report), now, now);
  return Number(r.lastInsertRowid);
}

/** A session row of `status`; with `trials`, the 48 constructed trials. */
export function insertReviewSession(h: ServerHandle, ids: { studyId: number; participantId: number; rigId: number; decoderId: number },
                                    status: 'ready' | 'stopped', withTrials = true): number {
  const start = Date.parse('2026-01-05T10:00:00.000Z');
  const r = h.db.sqlite.prepare(`INSERT INTO pilot_sessions (study_id, participant_id, rig_id, decoder_id, status, notes, dropped_samples,
    gap_count, created_at, started_at, stopped_at) VALUES (?, ?, ?, ?, ?, '', 160, 2, ?, ?, ?)`).run(ids.studyId, ids.participantId,
    ids.rigId, ids.decoderId, status, start, status === 'stopped' ? start : null, status === 'stopped' ? start + 200_000 : null);
  const sessionId = Number(r.lastInsertRowid);
  if (!withTrials) return sessionId;
  const ins = h.db.sqlite.prepare(`INSERT INTO trials (id, session_id, cue_id, sample_index, onset_s, true_class, predicted_class,
    probabilities, latency, flags, artifact_channels, marked_bad, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, '[]', ?, ?)`);
  const base = sessionId * 1000;
  for (let i = 0; i < 48; i++) {
    const trueClass = i % 2;
    const correct = i < 20 ? i !== 6 : i < 40 ? (i - 20) % 2 === 0 : i < 43;
    const pred = correct ? trueClass : 1 - trueClass;
    const p1 = pred === 1 ? 0.8 : 0.2;
    const flags = i >= 40 && i < 44 ? ['artifact'] : i === 44 || i === 45 ? ['gap'] : i === 46 ? ['dropout'] : [];
    const total = i === 5 ? 2500 : 5;
    const latency = { receivedMs: 0.1, epochMs: 1, featuresMs: 2, predictMs: 3, broadcastMs: total - 0.5, totalMs: total };
    ins.run(base + i, sessionId, i + 1, 640 * i, 4 * i, i === 47 ? null : CLASSES[trueClass], CLASSES[pred], JSON.stringify([1 - p1, p1]),
      JSON.stringify(latency), JSON.stringify(flags), i === 47 ? 1 : 0, start + 4000 * i);
  }
  return sessionId;
}
